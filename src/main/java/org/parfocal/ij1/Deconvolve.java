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

import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.BlockSink;
import org.parfocal.blocks.BlockSource;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.DefaultRun;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.IterationReport;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.quality.StoppingRule;
import org.parfocal.quality.WatchedRun;
import org.parfocal.psf.PsfExtent;
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
 * background plot watch}; with {@code psf=from_optics} also the keys of {@code PSF from Optics...} (without
 * {@code show_profiles}). {@code offset} and {@code background} take a number or {@code auto}; {@code background} also
 * {@code dark}, {@code fit} and {@code fit-smooth} (fitted with the object, {@link org.parfocal.deconv.BackgroundFit}).
 * <p>
 * <b>Watch mode</b> ({@code watch}, off by default; iterative methods only): a second dialog (keys {@code every
 * reference_folder reference_images photons read_noise stop_at_suggestion ignore_calibration}) sets up a
 * {@link QualityWatch} per channel and frame: every {@code every} iterations the iterate's patch distance to
 * sharp references (a folder of TIFFs and/or open images matching a title pattern; optional) and its re-blur
 * χ² against the data (noise model: {@code photons} per intensity unit, {@code read_noise}) are computed; a
 * plot shows both against the iteration, and {@link StoppingRule} suggests an iteration. With
 * {@code stop_at_suggestion} the output is the suggested iterate: the watch keeps a copy of the best iterate
 * so far (4 bytes per voxel more) rather than running a second time to that iteration, which would double the
 * time. The suggestion, the rule and the curve go into the provenance.
 */
public class Deconvolve implements PlugIn {

	static final String COMMAND = "Deconvolve";
	/** PSF choice that computes the PSF from the optics instead of taking an open image. */
	public static final String FROM_OPTICS = "from_optics";
	private static final String PREFS = "parfocal.deconvolve.";

	/**
	 * What the dialogs decide. {@code optics} is set when {@code psf} is {@link #FROM_OPTICS}.
	 */
	public record Options(String image, String psf, PsfFromOptics.Options optics, DeconvolutionOptions deconvolution, boolean plot, Watch watch,
			boolean recentre, OutputDepth output) {

		/** A 32-bit output (what a macro without {@code output=} gets). */
		public Options(final String image, final String psf, final PsfFromOptics.Options optics, final DeconvolutionOptions deconvolution, final boolean plot,
				final Watch watch, final boolean recentre) {
			this(image, psf, optics, deconvolution, plot, watch, recentre, OutputDepth.FLOAT);
		}

		/** Without re-centring the PSF ({@code recentre}: shift an open PSF's centre of mass to its centre voxel). */
		public Options(final String image, final String psf, final PsfFromOptics.Options optics, final DeconvolutionOptions deconvolution, final boolean plot,
				final Watch watch) {
			this(image, psf, optics, deconvolution, plot, watch, false);
		}

		/** Without watch mode. */
		public Options(final String image, final String psf, final PsfFromOptics.Options optics, final DeconvolutionOptions deconvolution, final boolean plot) {
			this(image, psf, optics, deconvolution, plot, null);
		}

		public Options {
			if (watch != null && deconvolution != null && deconvolution.method() == DeconvolutionMethod.WIENER)
				throw new IllegalArgumentException("Watch mode needs an iterative method: the Wiener filter has no iterations to watch");
			if (output == null) output = OutputDepth.FLOAT;
		}

		public String macroOptions() {
			final DeconvolutionOptions d = deconvolution;
			final String s = "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " method=" + d.method().key() + " iterations="
					+ d.iterations() + " regularization=" + MacroOptions.number(d.regularization()) + " stop=" + d.stopping().key() + " threshold="
					+ MacroOptions.number(d.changeThreshold()) + " edges=" + d.edges().key() + " offset=" + level(d.offset()) + " background="
					+ level(d.background()) + (plot ? " plot" : "") + (watch != null ? " watch" : "") + (recentre ? " recentre" : "") + (output == OutputDepth.FLOAT ? "" : " output=" + output.key());
			final String withOptics = optics == null ? s : s + " " + optics.macroOptions();
			return watch == null ? withOptics : withOptics + " " + watch.macroOptions();
		}

		static String level(final Level l) {
			return switch (l.kind()) {
			case ESTIMATED -> "auto";
			case DARK -> "dark";
			case FIT -> "fit";
			case FIT_SMOOTH -> "fit-smooth";
			case NONE -> "0";
			default -> MacroOptions.number(l.value());
			};
		}
	}

	/**
	 * Watch-mode settings (the second dialog).
	 *
	 * @param every evaluate every this many iterations
	 * @param referenceFolder folder of sharp reference TIFFs, or ""
	 * @param openReferences wildcard pattern of open reference images, or ""
	 * @param photons photons per intensity unit of the data (noise model of the χ²)
	 * @param readNoise read-noise σ in intensity units
	 * @param stopAtSuggestion return the suggested iterate instead of the last one
	 * @param ignoreCalibration compare with references voxel for voxel
	 * @param estimateNoise take gain and read noise estimated from each recording ({@link org.parfocal.core.CameraNoise})
	 *        instead of {@code photons} and {@code read_noise} (which stay the fallback when the estimate fails);
	 *        absent from old macros, so they keep their given values
	 */
	public record Watch(int every, String referenceFolder, String openReferences, double photons, double readNoise, boolean stopAtSuggestion,
			boolean ignoreCalibration, boolean estimateNoise) {

		/** Without the noise estimate (the given photons and read noise). */
		public Watch(final int every, final String referenceFolder, final String openReferences, final double photons, final double readNoise,
				final boolean stopAtSuggestion, final boolean ignoreCalibration) {
			this(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, ignoreCalibration, false);
		}

		public Watch {
			if (every < 1 || every > DeconvolutionOptions.MAX_ITERATIONS)
				throw new IllegalArgumentException("Evaluate every 1 to " + DeconvolutionOptions.MAX_ITERATIONS + " iterations, got " + every + " (every=)");
			if (!(photons > 0) || !Double.isFinite(photons)) throw new IllegalArgumentException("Photons per unit must be positive, got " + photons + " (photons=)");
			if (!(readNoise >= 0) || !Double.isFinite(readNoise)) throw new IllegalArgumentException("Read noise must be 0 or more, got " + readNoise + " (read_noise=)");
		}

		public String macroOptions() {
			return "every=" + every + " reference_folder=" + MacroOptions.quote(referenceFolder) + " reference_images=" + MacroOptions.quote(openReferences)
					+ " photons=" + MacroOptions.number(photons) + " read_noise=" + MacroOptions.number(readNoise) + (stopAtSuggestion ? " stop_at_suggestion" : "")
					+ (ignoreCalibration ? " ignore_calibration" : "") + (estimateNoise ? " estimate_noise" : "");
		}

		Watch withIgnoreCalibration() {
			return new Watch(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, true, estimateNoise);
		}

		/**
		 * {photons per unit, read noise} of the χ² for one recording: estimated from it with
		 * {@code estimateNoise} ({@link org.parfocal.quality.ReblurConsistency.NoiseModel#fromCamera}; the
		 * given values when that fails, with a note), else the given values.
		 */
		double[] noise(final Volume recording, final double offset, final List<String> notes) {
			if (!estimateNoise) return new double[] { photons, readNoise };
			try {
				final org.parfocal.core.CameraNoise c = org.parfocal.core.CameraNoise.estimate(recording, offset);
				final var m = org.parfocal.quality.ReblurConsistency.NoiseModel.fromCamera(c, 0, offset);
				final String note = String.format(Locale.ROOT, "watch noise model estimated from the recording: %.4g photons per unit, read noise %.4g units",
						m.photonsPerUnit(), m.readNoise());
				if (!notes.contains(note)) notes.add(note);
				return new double[] { m.photonsPerUnit(), m.readNoise() };
			} catch (final IllegalArgumentException e) {
				notes.add("watch noise model not estimated (" + e.getMessage() + "): photons=" + MacroOptions.number(photons) + " read_noise="
						+ MacroOptions.number(readNoise) + " used");
				return new double[] { photons, readNoise };
			}
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.provenance.CommandKeys.DECONVOLVE, () -> {
			Options o = showDialog();
			if (o == null) throw Commands.cancelled();
			if (o.watch() != null && !o.watch().ignoreCalibration()) {
				final ImagePlus imp = Commands.image(o.image(), "image");
				final String problem = CompareWithReferences.calibrationProblem(imp,
						CompareWithReferences.references(o.watch().referenceFolder(), o.watch().openReferences(), List.of(o.image(), o.psf())), null);
				if (problem != null) {
					if (!CompareWithReferences.askIgnoreCalibration(COMMAND, problem)) throw Commands.cancelled();
					o = new Options(o.image(), o.psf(), o.optics(), o.deconvolution(), o.plot(), o.watch().withIgnoreCalibration(), o.recentre(), o.output());
				}
			}
			final Output out = run(o);
			if (out.convergence() != null) out.convergence().show();
			if (out.quality() != null) out.quality().show();
			out.image().show(); // last, so that it is the current image for the next macro line
		});
	}

	/**
	 * The deconvolved image, the convergence plot (null for Wiener or when not asked), and in watch mode the
	 * quality plot and the watches (one per channel and frame; otherwise null and empty).
	 */
	public record Output(ImagePlus image, Plot convergence, List<DeconvolutionResult> results, Plot quality, List<QualityWatch> watches) {

		public Output(final ImagePlus image, final Plot convergence, final List<DeconvolutionResult> results) {
			this(image, convergence, results, null, List.of());
		}
	}

	Options showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the stack to deconvolve first");
		final String imageDefault = Commands.currentNonPsfTitle(titles);
		final String[] psfChoices = PsfChoices.items(WindowManager.getImage(imageDefault)); // plausible PSFs, newest Parfocal PSF first
		Commands.acceptOldValue("edges", EdgeMode.OLD_NON_CIRCULANT_KEY, EdgeMode.NON_CIRCULANT.key());
		final GenericDialog gd = new GenericDialog(COMMAND);
		gd.addChoice("Image:", titles, imageDefault);
		gd.addChoice("PSF:", psfChoices, psfChoices[0]);
		// the default run (DefaultRun) when method, iterations or stop are left out; a macro line that gives iterations without stop runs them all
		final boolean iterationsGiven = Commands.isMacro() && ij.Macro.getValue(ij.Macro.getOptions(), "iterations", null) != null;
		gd.addChoice("Method:", DeconvolutionMethod.keys(), Commands.remembered(PREFS + "method", DefaultRun.METHOD.key()));
		gd.addNumericField("Iterations:", Commands.remembered(PREFS + "iterations", DefaultRun.CAP), 0, 6, "at most, with relative-change or held-out stop");
		gd.addNumericField("Regularization:", Commands.remembered(PREFS + "regularization", 0.002), 4, 8, "TV weight (RL-TV) or Wiener weight");
		gd.addChoice("Stop:", new String[] { Stopping.FIXED.key(), Stopping.RELATIVE_CHANGE.key(), Stopping.HELD_OUT.key() },
				Commands.remembered(PREFS + "stop", DefaultRun.stop(iterationsGiven).key()));
		gd.addNumericField("Threshold:", Commands.remembered(PREFS + "threshold", 0.001), 5, 8, "relative change that stops");
		gd.addChoice("Edges:", EdgeMode.keys(), Commands.remembered(PREFS + "edges", EdgeMode.NON_CIRCULANT.key()));
		gd.addStringField("Offset:", Commands.remembered(PREFS + "offset", "auto"), 8);
		gd.addStringField("Background:", Commands.remembered(PREFS + "background", DefaultRun.BACKGROUND), 8);
		gd.addChoice("Output:", OutputDepth.keys(), Commands.remembered(PREFS + "output", OutputDepth.FLOAT.key()));
		gd.addCheckbox("Plot convergence", true);
		gd.addCheckbox("Watch quality every few iterations (next dialog)", false);
		gd.addCheckbox("Recentre the PSF (shift its centre of mass to the centre voxel)", false);
		gd.addHelp(DialogHelp.deconvolve().html());
		ChoiceWords.show(gd, "image", "psf", "method", "stop", "edges", "output");
		PsfChoices.follow(gd);
		DeconvolveHints.follow(gd);
		final DeconvolvePreview preview = DeconvolvePreview.attach(gd);
		try {
			gd.showDialog();
		} finally {
			if (preview != null) preview.close();
		}
		if (gd.wasCanceled()) return null;
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "PSF (an open image or " + FROM_OPTICS + ")");
		final DeconvolutionMethod method = DeconvolutionMethod.parse(Commands.checkChoice("method", gd.getNextChoice(), "method"));
		final double iterations = Commands.number(gd, "iterations"), regularization = Commands.number(gd, "regularization");
		final Stopping stop = Stopping.parse(Commands.checkChoice("stop", gd.getNextChoice(), "stopping rule (fixed, relative-change or held-out)"));
		final double threshold = Commands.number(gd, "threshold");
		final EdgeMode edges = EdgeMode.parse(Commands.checkChoice("edges", gd.getNextChoice(), "edge mode"));
		final String offset = gd.getNextString().trim(), background = gd.getNextString().trim();
		final boolean plot = gd.getNextBoolean();
		final boolean watch = gd.getNextBoolean();
		final boolean recentre = gd.getNextBoolean();
		final OutputDepth output = OutputDepth.parse(Commands.checkChoice("output", gd.getNextChoice(), "output depth (32-bit or 16-bit)"));
		if (output == OutputDepth.FLOAT) ChoiceWords.forgetRecorded("output"); // the default is left out, as in lines recorded before the key
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (iterations != Math.rint(iterations)) throw new IllegalArgumentException("Iterations must be a whole number, got " + iterations);
		final DeconvolutionOptions d = new DeconvolutionOptions(method, (int) iterations, regularization, stop,
				stop == Stopping.RELATIVE_CHANGE ? threshold : threshold > 0 && threshold < 1 ? threshold : 0.001, edges, level("offset", offset),
				level("background", background, true));
		PsfFromOptics.Options optics = null;
		if (FROM_OPTICS.equals(psf)) {
			optics = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (optics == null) return null;
		}
		Watch w = null;
		if (watch) {
			w = showWatchDialog();
			if (w == null) return null;
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
			Prefs.set(PREFS + "output", output.key());
		}
		return new Options(image, psf, optics, d, plot, w, recentre, output);
	}

	/** The watch-mode dialog; in a macro, values not given take the defaults (never remembered ones). */
	static Watch showWatchDialog() {
		final boolean macro = Commands.isMacro();
		final GenericDialog gd = new GenericDialog(COMMAND + ": watch quality");
		gd.addNumericField("Every:", macro ? 5 : Commands.remembered(PREFS + "every", 5), 0, 6, "iterations");
		gd.addStringField("Reference_folder:", macro ? "" : Commands.remembered(PREFS + "references", ""), 30);
		gd.addStringField("Reference_images:", macro ? "" : Commands.remembered(PREFS + "open_references", ""), 20);
		gd.addNumericField("Photons:", macro ? 1 : Commands.remembered(PREFS + "photons", 1), 4, 8, "per intensity unit (1 = photon counts)");
		gd.addNumericField("Read_noise:", macro ? 0 : Commands.remembered(PREFS + "read_noise", 0), 3, 8, "sigma, intensity units");
		gd.addCheckbox("Stop_at_suggestion (return the suggested iterate)", false);
		gd.addCheckbox("Ignore_calibration of the references", false);
		gd.addCheckbox("Estimate_noise from the recording (camera gain and read noise, instead of Photons and Read_noise)",
				!macro && Commands.remembered(PREFS + "estimate_noise", true));
		gd.addHelp(DialogHelp.watch().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final double every = Commands.number(gd, "every");
		final String folder = gd.getNextString().trim(), pattern = gd.getNextString().trim();
		final double photons = Commands.number(gd, "photons"), readNoise = Commands.number(gd, "read_noise");
		final boolean stop = gd.getNextBoolean(), ignore = gd.getNextBoolean(), estimate = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (every != Math.rint(every)) throw new IllegalArgumentException("Every must be a whole number of iterations, got " + every + " (every=)");
		if (!macro) {
			Prefs.set(PREFS + "every", (int) every);
			Prefs.set(PREFS + "references", folder);
			Prefs.set(PREFS + "open_references", pattern);
			Prefs.set(PREFS + "photons", photons);
			Prefs.set(PREFS + "read_noise", readNoise);
			Prefs.set(PREFS + "estimate_noise", estimate);
		}
		return new Watch((int) every, folder, pattern, photons, readNoise, stop, ignore, estimate);
	}

	/** "auto" = estimated, "0" or "" = none, else a number. */
	static Level level(final String key, final String text) {
		return level(key, text, false);
	}

	/** As {@link #level(String, String)}; with {@code fit}, "fit" = fitted with the object (background only). */
	static Level level(final String key, final String text, final boolean fit) {
		if (text.isEmpty() || text.equals("0")) return Level.NONE;
		if ((text.equalsIgnoreCase("fit") || text.equalsIgnoreCase("fit-smooth")) && key.equals("background")) {
			// fitted with the object inside Richardson–Lucy (BackgroundFit): a constant, or slowly varying
			if (fit) return text.equalsIgnoreCase("fit") ? Level.FIT : Level.FIT_SMOOTH;
			throw new IllegalArgumentException("background=" + text + " is available in Deconvolve only: give a number, auto or dark");
		}
		if (text.equalsIgnoreCase("auto")) return Level.ESTIMATED;
		if (text.equalsIgnoreCase("dark") && key.equals("background")) return Level.DARK; // the darkest region (background only)
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
		final List<Volume> psfs = psfsFor(in, psfImp, o.optics(), notes, o.recentre());
		final long budget = Long.getLong(BUDGET_PROPERTY, BlockPlan.heapBudget());
		if (o.watch() == null && BlockPlan.needed(in.first().shape(), psfs.get(0).shape(), o.deconvolution(), budget))
			return runInBlocks(o, imp, in, psfImp, psfs, notes, budget, start);
		MemoryBudget.require(Deconvolution.bytesNeeded(in.first().shape(), psfs.get(0).shape(), o.deconvolution()) + 8L * in.first().size()
				+ (o.watch() == null ? 0 : 8L * in.first().size() * in.volumes().size()), "deconvolving " + in.nx() + " x " + in.ny() + " x " + in.nz());
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final int n = in.volumes().size();
		final List<CompareWithReferences.Reference> refs = o.watch() == null ? List.of()
				: CompareWithReferences.references(o.watch().referenceFolder(), o.watch().openReferences(), List.of(o.image(), o.psf()));
		if (o.watch() != null && !o.watch().ignoreCalibration()) {
			final String problem = CompareWithReferences.calibrationProblem(imp, refs, null);
			if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		}
		final List<QualityWatch> watches = new ArrayList<>();
		final List<DeconvolutionResult> results = Commands.withImageJThreads(() -> {
			final List<DeconvolutionResult> rs = new ArrayList<>();
			final ReferenceComparison.References prepared = o.watch() == null || refs.isEmpty() ? null
					: CompareWithReferences.named(refs, () -> ReferenceComparison.prepare(refs.stream().map(CompareWithReferences.Reference::volume).toList(), in.first(),
							ReferenceComparison.Options.defaults().withIgnoreCalibration(o.watch().ignoreCalibration()), monitor));
			if (prepared != null) for (final String note : prepared.notes()) if (!notes.contains(note)) notes.add(note);
			for (int t = 0; t < in.frames(); t++)
				for (int c = 0; c < in.channels(); c++) {
					final int index = rs.size();
					final String where = n > 1 ? " (channel " + (c + 1) + ", frame " + (t + 1) + ")" : "";
					final org.parfocal.deconv.IterationListener listener;
					if (o.watch() != null) {
						final DeconvolutionOptions d = o.deconvolution();
						final double[] lv = QualityWatch.Consistency.levels(in.get(c, t), d.offset(), d.background());
						final double[] noise = o.watch().noise(in.get(c, t), lv[0], notes);
						final QualityWatch w = new QualityWatch(prepared, QualityWatch.Consistency.forDeconvolution(in.get(c, t), psfs.get(c),
								d.edges() == EdgeMode.PERIODIC, lv[0], lv[1], noise[0], noise[1]), o.watch().every(),
								o.watch().stopAtSuggestion(), in.voxelSize());
						watches.add(w);
						listener = w;
					} else listener = org.parfocal.deconv.IterationListener.NONE;
					rs.add(Deconvolution.run(in.get(c, t), psfs.get(c), o.deconvolution(), null, new org.parfocal.core.Monitor() {
						@Override
						public void progress(final int done, final int total, final String status) {
							monitor.progress(index * total + done, n * total, status + where);
						}

						@Override
						public boolean isCancelled() {
							return monitor.isCancelled();
						}
					}, listener));
				}
			return rs;
		});
		final List<Volume> vols = new ArrayList<>();
		for (int i = 0; i < results.size(); i++) {
			final DeconvolutionResult r = results.get(i);
			final boolean best = o.watch() != null && o.watch().stopAtSuggestion() && watches.get(i).best() != null;
			vols.add(best ? watches.get(i).best() : r.estimate());
			for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		}
		for (int i = 0; i < watches.size(); i++) {
			final StoppingRule.Suggestion sg = watches.get(i).suggestion();
			final String note = "watch" + (watches.size() > 1 ? " (volume " + (i + 1) + ")" : "") + ": " + sg.reason();
			if (!sg.interior()) notes.add(note);
			else IJ.log(COMMAND + ": suggested iteration " + sg.iteration() + " (" + sg.reason() + ")");
		}
		final String title = WindowManager.makeUniqueName(ConvolveWithPsf.stripExtension(imp.getTitle()) + "-deconvolved.tif");
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), vols), title, imp.getCalibration());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		final DeconvolutionResult first = results.get(0);
		prov.run("iterations", first.iterations()).run("stop_reason", stopReason(o.deconvolution(), first) + (o.watch() != null && o.watch().stopAtSuggestion() && !watches.isEmpty()
				&& watches.get(0).best() != null ? "; the suggested iterate " + watches.get(0).suggestion().iteration() + " was returned (watch mode)" : "")).run("offset", first.offset())
				.run("background", first.background());
		if (o.deconvolution().stopping() == Stopping.HELD_OUT) // an edge of the range is not a choice: say so in the warnings box too
			for (final String note : notes) if (note.startsWith(HELD_OUT_NOTE) && note.contains("no interior peak")) prov.warning(note);
		if (n > 1) prov.run("volumes", n).run("offset_per_volume", results.stream().map(r -> (Object) r.offset()).toList())
				.run("background_per_volume", results.stream().map(r -> (Object) r.background()).toList());
		if (!first.history().isEmpty()) prov.run("relative_change", first.history().stream().map(h -> (Object) h.relativeChange()).toList());
		if (o.watch() != null) watchProvenance(prov, o.watch(), watches, refs);
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		outputDepth(o, out, prov);
		ImageProvenance.attach(out, prov, start);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s", first.iterations(), (System.nanoTime() - start) / 1e9));
		final Plot plot = o.plot() && !first.history().isEmpty() ? convergencePlot(results, title) : null;
		final Plot quality = o.watch() == null ? null : qualityPlot(watches, title);
		return new Output(out, plot, results, quality, List.copyOf(watches));
	}

	/** Stores the output at the asked depth; for 16-bit the scale and offset go into the record. */
	static void outputDepth(final Options o, final ImagePlus out, final org.parfocal.provenance.Provenance.Builder prov) {
		final OutputDepth.Scaling s = o.output().apply(out);
		if (s != null) prov.run("output_depth", o.output().key()).run("output_offset", s.offset()).run("output_scale", s.scale());
	}

	/** System property (bytes) that overrides the memory budget deciding when to work block by block. */
	public static final String BUDGET_PROPERTY = "parfocal.blocks.budget";

	/**
	 * The same run block by block, when the padded stack would not fit in the memory budget: the user is told,
	 * and the provenance records the block plan. Watch mode is not available this way.
	 */
	static Output runInBlocks(final Options o, final ImagePlus imp, final Hyperstack in, final ImagePlus psfImp, final List<Volume> psfs,
			final List<String> notes, final long budget, final long start) {
		final BlockPlan plan = BlockPlan.forBudget(in.first().shape(), psfs.get(0).shape(), o.deconvolution(), budget);
		IJ.log(COMMAND + ": the padded stack does not fit in " + MemoryBudget.format(budget) + "; deconvolving block by block: " + plan);
		MemoryBudget.require(4L * in.first().size() * in.volumes().size(), "the block-wise result");
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final int n = in.volumes().size();
		final List<BlockDeconvolution.Result> runs = new ArrayList<>();
		final List<Volume> vols = Commands.withImageJThreads(() -> {
			final List<Volume> vs = new ArrayList<>();
			for (int t = 0; t < in.frames(); t++)
				for (int c = 0; c < in.channels(); c++) {
					final int index = vs.size();
					final BlockSink.Memory sink = BlockSink.memory(in.first().shape(), in.voxelSize());
					try {
						runs.add(BlockDeconvolution.run(BlockSource.of(in.get(c, t)), psfs.get(c), o.deconvolution(), plan, sink, new org.parfocal.core.Monitor() {
							@Override
							public void progress(final int done, final int total, final String status) {
								monitor.progress(index * total + done, n * total, status);
							}

							@Override
							public boolean isCancelled() {
								return monitor.isCancelled();
							}
						}));
					} catch (final java.io.IOException e) {
						throw new IllegalStateException("Block-wise run failed: " + e.getMessage());
					}
					vs.add(sink.result());
				}
			return vs;
		});
		for (final BlockDeconvolution.Result r : runs) for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		final String title = WindowManager.makeUniqueName(ConvolveWithPsf.stripExtension(imp.getTitle()) + "-deconvolved.tif");
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), vols), title, imp.getCalibration());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final BlockDeconvolution.Result first = runs.get(0);
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		prov.run("iterations", first.maxIterations()).run("stop_reason", "block by block (" + plan.count() + " blocks); each block ran "
				+ (first.minIterations() == first.maxIterations() ? first.maxIterations() : first.minIterations() + " to " + first.maxIterations()) + " iteration(s)")
				.run("offset", first.levels().offset()).run("background", first.levels().background()).run("block_plan", plan.describe());
		if (n > 1) prov.run("volumes", n);
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		outputDepth(o, out, prov);
		ImageProvenance.attach(out, prov, start);
		monitor.done("block by block, " + plan.count() + " blocks");
		return new Output(out, null, List.of());
	}

	/** Watch-mode facts: the rule, the suggestion(s), what was returned, and the curve(s). */
	static void watchProvenance(final org.parfocal.provenance.Provenance.Builder prov, final Watch w, final List<? extends WatchedRun> watches,
			final List<CompareWithReferences.Reference> refs) {
		prov.run("watch_rule", StoppingRule.DESCRIPTION).run("watch_references", refs.size());
		for (final CompareWithReferences.Reference r : refs) prov.input(ImageProvenance.input("reference", r.image()));
		final int n = watches.size();
		for (int i = 0; i < n; i++) {
			final WatchedRun q = watches.get(i);
			final String suffix = n > 1 ? "_" + (i + 1) : "";
			final StoppingRule.Suggestion s = q.suggestion();
			prov.run("suggested_iteration" + suffix, s.iteration()).run("suggestion" + suffix, s.reason()).run("suggestion_interior" + suffix, s.interior());
			if (w.stopAtSuggestion()) prov.run("returned_iteration" + suffix, q.best() != null ? s.iteration() : q.points().isEmpty() ? 0 : q.points().get(q.points().size() - 1).iteration());
			if (!Double.isNaN(q.floor())) prov.run("watch_floor" + suffix, q.floor());
			final StringBuilder sb = new StringBuilder();
			for (final StoppingRule.Point p : q.points()) {
				if (sb.length() > 0) sb.append("; ");
				sb.append(String.format(Locale.ROOT, "%d: d %.5g chi2 %.5g", p.iteration(), p.distance(), p.chiSquare()));
			}
			prov.run("watch_curve" + suffix, sb.toString());
		}
	}

	/**
	 * Patch distance ÷ its noise floor and re-blur χ² against the iteration, on one log axis where 1 means
	 * "indistinguishable from the references" and "consistent with the noise" respectively; a dotted line marks
	 * the suggested iteration (first channel and frame).
	 */
	static Plot qualityPlot(final List<? extends WatchedRun> watches, final String title) {
		return qualityPlot(watches, title, "Iteration", "chi-square");
	}

	/** As {@link #qualityPlot(List, String)} with the axis and χ² legend named by the caller (Blind Deconvolve). */
	static Plot qualityPlot(final List<? extends WatchedRun> watches, final String title, final String xLabel, final String chiLabel) {
		final Plot plot = new Plot("Quality of " + title, xLabel, "Distance / floor, chi-square");
		plot.setLogScaleY();
		final Color[] colors = { new Color(0, 90, 170), new Color(200, 80, 0), new Color(0, 140, 60), new Color(120, 0, 140) };
		final StringBuilder legend = new StringBuilder();
		double xmax = 1, ymin = 1, ymax = 1;
		for (int i = 0; i < watches.size(); i++) {
			final WatchedRun q = watches.get(i);
			final List<StoppingRule.Point> pts = q.points();
			final double[] x = new double[pts.size()], d = new double[pts.size()], chi = new double[pts.size()];
			for (int k = 0; k < x.length; k++) {
				x[k] = pts.get(k).iteration();
				d[k] = pts.get(k).distance() / q.floor();
				chi[k] = pts.get(k).chiSquare();
				xmax = Math.max(xmax, x[k]);
				for (final double v : new double[] { d[k], chi[k] }) if (v > 0 && Double.isFinite(v)) { ymin = Math.min(ymin, v); ymax = Math.max(ymax, v); }
			}
			final String which = watches.size() > 1 ? " (" + (i + 1) + ")" : "";
			plot.setColor(colors[i % colors.length]);
			if (!Double.isNaN(q.floor())) {
				plot.setLineWidth(2);
				plot.addPoints(x, d, Plot.CONNECTED_CIRCLES);
				legend.append("distance / floor").append(which).append('\t');
			}
			plot.setLineWidth(1);
			plot.addPoints(x, chi, Plot.LINE);
			legend.append(chiLabel).append(which).append('\t');
		}
		plot.setLimits(0, xmax * 1.02, ymin / 1.2, ymax * 1.2);
		plot.setColor(Color.GRAY);
		plot.drawDottedLine(0, 1, xmax * 1.02, 1, 2);
		if (!watches.isEmpty() && watches.get(0).suggestion().iteration() > 0) {
			final StoppingRule.Suggestion sg = watches.get(0).suggestion();
			final int s = sg.iteration();
			plot.drawDottedLine(s, ymin / 1.2, s, ymax * 1.2, 4);
			plot.addLabel(0.02, 0.08, sg.interior() ? "suggested: iteration " + s : "no interior minimum: iteration " + s + " is the edge of the evaluated range");
		}
		plot.setColor(Color.BLACK);
		plot.addLegend(legend.toString().strip());
		return plot;
	}

	/** Start of the held-out stop's note (deconv/HoldOutStop). */
	static final String HELD_OUT_NOTE = "Held-out stop (Coakley 1991):";

	/** Why the run stopped, in words, for provenance. */
	static String stopReason(final DeconvolutionOptions d, final DeconvolutionResult r) {
		if (d.method() == DeconvolutionMethod.WIENER) return "one-shot filter";
		if (d.stopping() == Stopping.HELD_OUT)
			for (final String note : r.notes()) if (note.startsWith(HELD_OUT_NOTE)) return note.substring(HELD_OUT_NOTE.length()).trim();
		if (r.converged())
			return String.format(Locale.ROOT, "relative change %.3g fell below %.3g at iteration %d", r.history().get(r.history().size() - 1).relativeChange(),
					d.changeThreshold(), r.iterations());
		return "the " + r.iterations() + " iteration(s) asked for were done";
	}

	/** One PSF per channel: resampled to the image's voxel size if needed, with a note. */
	static List<Volume> psfsFor(final Hyperstack in, final ImagePlus psfImp, final PsfFromOptics.Options optics, final List<String> notes) {
		return psfsFor(in, psfImp, optics, notes, false);
	}

	/**
	 * The PSF per channel; an open PSF whose centre of mass is more than half a voxel off its centre voxel is
	 * re-centred (whole voxels, {@link Psfs#recentred}) when {@code recentre}, else a warning note is added.
	 */
	static List<Volume> psfsFor(final Hyperstack in, final ImagePlus psfImp, final PsfFromOptics.Options optics, final List<String> notes,
			final boolean recentre) {
		final List<Volume> out = new ArrayList<>();
		if (optics != null) {
			final PsfGrid grid = gridFor(optics, in);
			final Volume v = Commands.withImageJThreads(() -> PsfModels.get(optics.model()).compute(optics.optics(), grid));
			final Volume fitted = in.nz() == 1 && v.nz() > 1 ? centralPlane(v) : v;
			for (int c = 0; c < in.channels(); c++) out.add(fitted);
			if (in.channels() > 1) notes.add("one PSF from the optics used for all " + in.channels() + " channels");
			notes.addAll(PsfExtent.warnings(fitted, in.first().shape(), microns(in.voxelSize()), optics.optics()));
			return out;
		}
		final Hyperstack p = ImageBridge.toCore(psfImp);
		if (p.frames() != 1) throw new IllegalArgumentException("The PSF '" + psfImp.getTitle() + "' has " + p.frames() + " frames; one is expected");
		if (p.channels() != 1 && p.channels() != in.channels())
			throw new IllegalArgumentException("The PSF has " + p.channels() + " channels but the image has " + in.channels()
					+ ": give one PSF, or one channel per image channel");
		if (p.channels() == 1 && in.channels() > 1)
			notes.add("one PSF ('" + psfImp.getTitle() + "') used for all " + in.channels() + " channels; give one channel per image channel for their own PSFs");
		for (int c = 0; c < in.channels(); c++) {
			Volume v = p.get(p.channels() == 1 ? 0 : c, 0);
			v = matchVoxelSize(v, in.voxelSize(), notes);
			final String offCentre = Psfs.centroidWarning(v);
			if (offCentre != null && recentre) {
				final double[] off = Psfs.centroidOffset(v);
				v = Psfs.recentred(v);
				notes.add("PSF re-centred: its centre of mass was off its centre voxel by " + fmt(off[0]) + ", " + fmt(off[1]) + ", " + fmt(off[2]) + " voxels");
			} else if (offCentre != null) notes.add("Warning: " + offCentre);
			out.add(v);
			for (final String w : PsfExtent.warnings(v, in.first().shape(), microns(in.voxelSize()), null))
				if (!notes.contains(w)) notes.add(w);
		}
		return out;
	}

	/**
	 * The grid of a PSF from optics for this stack: sizes given in the options are kept; a size of 0 ("from the
	 * optics") is chosen for the stack ({@link PsfExtent#forStack}: a widefield box spans the stack's depth and
	 * holds the defocus cone over it).
	 */
	static PsfGrid gridFor(final PsfFromOptics.Options optics, final Hyperstack in) {
		if (optics.sizeXY() != 0 && optics.sizeZ() != 0) return optics.grid();
		final PsfGrid auto = PsfExtent.forStack(optics.optics(), optics.voxelXY(), optics.voxelXY(), optics.voxelZ(), in.nx(), in.ny(), in.nz());
		return new PsfGrid(optics.sizeXY() == 0 ? auto.nx() : optics.sizeXY(), optics.sizeXY() == 0 ? auto.ny() : optics.sizeXY(),
				optics.sizeZ() == 0 ? auto.nz() : optics.sizeZ(), optics.voxelXY(), optics.voxelXY(), optics.voxelZ());
	}

	/** {dx, dy, dz} in µm, or null for an uncalibrated stack or an unknown unit. */
	private static double[] microns(final VoxelSize v) {
		if (!v.isCalibrated()) return null;
		try {
			final double f = PsfGrid.micronsPer(v);
			return new double[] { v.dx() * f, v.dy() * f, v.dz() * f };
		} catch (final IllegalArgumentException e) {
			return null;
		}
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

}
