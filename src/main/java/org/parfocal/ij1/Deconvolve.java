package org.parfocal.ij1;

import java.awt.Color;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.gui.Plot;
import ij.plugin.PlugIn;

import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.IterationReport;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * {@code Plugins > Parfocal > Deconvolve...}: Richardson–Lucy (plain, with total variation, accelerated) or a
 * Wiener filter, on every channel and time point of a stack. The PSF is an open image (one for all channels, or
 * one channel per image channel) or is computed from the optics in a second dialog. Output: a new calibrated
 * 32-bit image with provenance and, for the iterative methods, a plot of the relative change per iteration.
 * Esc cancels: nothing is created and the input is untouched.
 * <p>
 * Macro keys (public API): {@code image psf method iterations regularization stop threshold edges offset
 * background plot}; with {@code psf=from_optics} also the keys of {@code PSF from Optics...} (without
 * {@code show_profiles}). {@code offset} and {@code background} take a number or {@code auto}.
 */
public class Deconvolve implements PlugIn {

	static final String COMMAND = "Deconvolve";
	/** PSF choice that computes the PSF from the optics instead of taking an open image. */
	public static final String FROM_OPTICS = "from_optics";
	private static final String PREFS = "parfocal.deconvolve.";

	/**
	 * What the dialogs decide. {@code optics} is set when {@code psf} is {@link #FROM_OPTICS}.
	 */
	public record Options(String image, String psf, PsfFromOptics.Options optics, DeconvolutionOptions deconvolution, boolean plot) {

		public String macroOptions() {
			final DeconvolutionOptions d = deconvolution;
			final String s = "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " method=" + d.method().key() + " iterations="
					+ d.iterations() + " regularization=" + MacroOptions.number(d.regularization()) + " stop=" + d.stopping().key() + " threshold="
					+ MacroOptions.number(d.changeThreshold()) + " edges=" + d.edges().key() + " offset=" + level(d.offset()) + " background="
					+ level(d.background()) + (plot ? " plot" : "");
			return optics == null ? s : s + " " + optics.macroOptions();
		}

		private static String level(final Level l) {
			return switch (l.kind()) {
			case ESTIMATED -> "auto";
			case NONE -> "0";
			default -> MacroOptions.number(l.value());
			};
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, () -> {
			final Options o = showDialog();
			if (o == null) return;
			final Output out = run(o);
			if (out.convergence() != null) out.convergence().show();
			out.image().show(); // last, so that it is the current image for the next macro line
		});
	}

	/** The deconvolved image and the convergence plot (null for Wiener or when not asked). */
	public record Output(ImagePlus image, Plot convergence, List<DeconvolutionResult> results) {}

	Options showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the stack to deconvolve first");
		final String[] psfChoices = new String[titles.length + 1];
		System.arraycopy(titles, 0, psfChoices, 0, titles.length);
		psfChoices[titles.length] = FROM_OPTICS;
		final GenericDialog gd = new GenericDialog(COMMAND);
		gd.addChoice("Image:", titles, guessImage(titles));
		gd.addChoice("PSF:", psfChoices, guessPsf(titles));
		gd.addChoice("Method:", DeconvolutionMethod.keys(), Prefs.get(PREFS + "method", DeconvolutionMethod.RL_TV.key()));
		gd.addNumericField("Iterations:", Prefs.get(PREFS + "iterations", 30), 0, 6, "at most, with relative-change stop");
		gd.addNumericField("Regularization:", Prefs.get(PREFS + "regularization", 0.002), 4, 8, "TV weight (RL-TV) or Wiener weight");
		gd.addChoice("Stop:", new String[] { Stopping.FIXED.key(), Stopping.RELATIVE_CHANGE.key() }, Prefs.get(PREFS + "stop", Stopping.FIXED.key()));
		gd.addNumericField("Threshold:", Prefs.get(PREFS + "threshold", 0.001), 5, 8, "relative change that stops");
		gd.addChoice("Edges:", EdgeMode.keys(), Prefs.get(PREFS + "edges", EdgeMode.NON_CIRCULANT.key()));
		gd.addStringField("Offset:", Prefs.get(PREFS + "offset", "auto"), 8);
		gd.addStringField("Background:", Prefs.get(PREFS + "background", "auto"), 8);
		gd.addCheckbox("Plot convergence", true);
		gd.addHelp("Offset: camera offset subtracted first (a number, or auto = 0.1 % quantile). Background: constant in the model "
				+ "H x + b (a number, or auto = sigma-clipped median). PSF: an open image, or from_optics to compute it in the next dialog.");
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "PSF (an open image or " + FROM_OPTICS + ")");
		final DeconvolutionMethod method = DeconvolutionMethod.parse(Commands.checkChoice("method", gd.getNextChoice(), "method"));
		final double iterations = Commands.number(gd, "iterations"), regularization = Commands.number(gd, "regularization");
		final Stopping stop = Stopping.parse(Commands.checkChoice("stop", gd.getNextChoice(), "stopping rule"));
		final double threshold = Commands.number(gd, "threshold");
		final EdgeMode edges = EdgeMode.parse(Commands.checkChoice("edges", gd.getNextChoice(), "edge mode"));
		final String offset = gd.getNextString().trim(), background = gd.getNextString().trim();
		final boolean plot = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (iterations != Math.rint(iterations)) throw new IllegalArgumentException("Iterations must be a whole number, got " + iterations);
		final DeconvolutionOptions d = new DeconvolutionOptions(method, (int) iterations, regularization, stop,
				stop == Stopping.RELATIVE_CHANGE ? threshold : threshold > 0 && threshold < 1 ? threshold : 0.001, edges, level("offset", offset),
				level("background", background));
		PsfFromOptics.Options optics = null;
		if (FROM_OPTICS.equals(psf)) {
			optics = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (optics == null) return null;
		}
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "method", method.key());
			Prefs.set(PREFS + "iterations", (int) iterations);
			Prefs.set(PREFS + "regularization", regularization);
			Prefs.set(PREFS + "stop", stop.key());
			Prefs.set(PREFS + "threshold", threshold);
			Prefs.set(PREFS + "edges", edges.key());
			Prefs.set(PREFS + "offset", offset);
			Prefs.set(PREFS + "background", background);
		}
		return new Options(image, psf, optics, d, plot);
	}

	/** "auto" = estimated, "0" or "" = none, else a number. */
	static Level level(final String key, final String text) {
		if (text.isEmpty() || text.equals("0")) return Level.NONE;
		if (text.equalsIgnoreCase("auto")) return Level.ESTIMATED;
		try {
			final double v = Double.parseDouble(text);
			return v == 0 ? Level.NONE : Level.of(v);
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException("'" + text + "' is not a number or auto (" + key + "=)");
		}
	}

	/** Deconvolves every channel and frame; returns the new image (not shown). */
	public static Output run(final Options o) {
		final long start = System.nanoTime();
		final ImagePlus imp = Commands.image(o.image(), "image");
		final Hyperstack in = ImageBridge.toCore(imp);
		final ImagePlus psfImp = o.optics() == null ? Commands.image(o.psf(), "PSF") : null;
		final List<String> notes = new ArrayList<>();
		final List<Volume> psfs = psfsFor(in, psfImp, o.optics(), notes);
		MemoryBudget.require(Deconvolution.bytesNeeded(in.first().shape(), psfs.get(0).shape(), o.deconvolution()) + 8L * in.first().size(),
				"deconvolving " + in.nx() + " x " + in.ny() + " x " + in.nz());
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final int n = in.volumes().size();
		final List<DeconvolutionResult> results = Commands.withImageJThreads(() -> {
			final List<DeconvolutionResult> rs = new ArrayList<>();
			for (int t = 0; t < in.frames(); t++)
				for (int c = 0; c < in.channels(); c++) {
					final int index = rs.size();
					final String where = n > 1 ? " (channel " + (c + 1) + ", frame " + (t + 1) + ")" : "";
					rs.add(Deconvolution.run(in.get(c, t), psfs.get(c), o.deconvolution(), null, new org.parfocal.core.Monitor() {
						@Override
						public void progress(final int done, final int total, final String status) {
							monitor.progress(index * total + done, n * total, status + where);
						}

						@Override
						public boolean isCancelled() {
							return monitor.isCancelled();
						}
					}, org.parfocal.deconv.IterationListener.NONE));
				}
			return rs;
		});
		final List<Volume> vols = new ArrayList<>();
		for (final DeconvolutionResult r : results) {
			vols.add(r.estimate());
			for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		}
		final String title = WindowManager.makeUniqueName(ConvolveWithPsf.stripExtension(imp.getTitle()) + "-deconvolved.tif");
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), vols), title, imp.getCalibration());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final var prov = Provenance.start(COMMAND, o.macroOptions()).input(Provenance.input("image", imp));
		if (psfImp != null) prov.input(Provenance.input("psf", psfImp));
		final DeconvolutionResult first = results.get(0);
		prov.run("iterations", first.iterations()).run("stop_reason", stopReason(o.deconvolution(), first)).run("offset", first.offset())
				.run("background", first.background());
		if (n > 1) prov.run("volumes", n);
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		Provenance.attach(out, prov, start);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s", first.iterations(), (System.nanoTime() - start) / 1e9));
		final Plot plot = o.plot() && !first.history().isEmpty() ? convergencePlot(results, title) : null;
		return new Output(out, plot, results);
	}

	/** Why the run stopped, in words, for provenance. */
	static String stopReason(final DeconvolutionOptions d, final DeconvolutionResult r) {
		if (d.method() == DeconvolutionMethod.WIENER) return "one-shot filter";
		if (r.converged())
			return String.format(Locale.ROOT, "relative change %.3g fell below %.3g at iteration %d", r.history().get(r.history().size() - 1).relativeChange(),
					d.changeThreshold(), r.iterations());
		return "the " + r.iterations() + " iteration(s) asked for were done";
	}

	/** One PSF per channel: resampled to the image's voxel size if needed, with a note. */
	static List<Volume> psfsFor(final Hyperstack in, final ImagePlus psfImp, final PsfFromOptics.Options optics, final List<String> notes) {
		final List<Volume> out = new ArrayList<>();
		if (optics != null) {
			final PsfGrid grid = optics.grid();
			final Volume v = Commands.withImageJThreads(() -> PsfModels.get(optics.model()).compute(optics.optics(), grid));
			final Volume fitted = in.nz() == 1 && v.nz() > 1 ? centralPlane(v) : v;
			for (int c = 0; c < in.channels(); c++) out.add(fitted);
			return out;
		}
		final Hyperstack p = ImageBridge.toCore(psfImp);
		if (p.frames() != 1) throw new IllegalArgumentException("The PSF '" + psfImp.getTitle() + "' has " + p.frames() + " frames; one is expected");
		if (p.channels() != 1 && p.channels() != in.channels())
			throw new IllegalArgumentException("The PSF has " + p.channels() + " channels but the image has " + in.channels()
					+ ": give one PSF, or one channel per image channel");
		for (int c = 0; c < in.channels(); c++) {
			Volume v = p.get(p.channels() == 1 ? 0 : c, 0);
			v = matchVoxelSize(v, in.voxelSize(), notes);
			out.add(v);
		}
		return out;
	}

	private static Volume matchVoxelSize(final Volume psf, final VoxelSize image, final List<String> notes) {
		final VoxelSize p = psf.voxelSize();
		if (!p.isCalibrated() || !image.isCalibrated()) return psf;
		final double fp = PsfGrid.micronsPer(p), fi = PsfGrid.micronsPer(image);
		final double[] a = { p.dx() * fp, p.dy() * fp, p.dz() * fp }, b = { image.dx() * fi, image.dy() * fi, image.dz() * fi };
		boolean same = true;
		for (int d = 0; d < (psf.nz() > 1 ? 3 : 2); d++) same &= Math.abs(a[d] - b[d]) <= 1e-3 * b[d];
		if (same) return psf;
		final Volume r = Psfs.resampleTo(psf.withVoxelSize(VoxelSize.microns(a[0], a[1], a[2])), VoxelSize.microns(b[0], b[1], b[2]));
		notes.add("PSF resampled from " + fmt(a[0]) + " x " + fmt(a[1]) + " x " + fmt(a[2]) + " µm to the image's " + fmt(b[0]) + " x " + fmt(b[1])
				+ " x " + fmt(b[2]) + " µm voxels (" + r.nx() + "x" + r.ny() + "x" + r.nz() + ")");
		return r;
	}

	/** Four significant digits, no trailing zeros. */
	static String fmt(final double v) {
		return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).stripTrailingZeros().toPlainString();
	}

	private static Volume centralPlane(final Volume v) {
		final Volume out = Volume.zeros(v.nx(), v.ny(), 1, v.voxelSize());
		System.arraycopy(v.data(), ((v.nz() - 1) / 2) * v.nx() * v.ny(), out.data(), 0, v.nx() * v.ny());
		return Psfs.normalized(out);
	}

	/** Relative change per iteration, log scale, one curve per channel/frame. */
	static Plot convergencePlot(final List<DeconvolutionResult> results, final String title) {
		final Plot plot = new Plot("Convergence of " + title, "Iteration", "Relative change");
		plot.setLogScaleY();
		final Color[] colors = { new Color(0, 90, 170), new Color(200, 80, 0), new Color(0, 140, 60), new Color(120, 0, 140) };
		int i = 0;
		for (final DeconvolutionResult r : results) {
			final double[] x = new double[r.history().size()], y = new double[x.length];
			for (int k = 0; k < x.length; k++) {
				final IterationReport rep = r.history().get(k);
				x[k] = rep.iteration();
				y[k] = Math.max(1e-12, rep.relativeChange());
			}
			plot.setColor(colors[i++ % colors.length]);
			plot.addPoints(x, y, Plot.LINE);
		}
		plot.setLimitsToFit(false);
		return plot;
	}

	private static String guessImage(final String[] titles) {
		final String cur = Commands.currentTitle(titles);
		if (!cur.toLowerCase(Locale.ROOT).contains("psf")) return cur;
		for (final String t : titles) if (!t.toLowerCase(Locale.ROOT).contains("psf")) return t;
		return cur;
	}

	private static String guessPsf(final String[] titles) {
		for (final String t : titles) if (t.toLowerCase(Locale.ROOT).contains("psf")) return t;
		return FROM_OPTICS;
	}
}
