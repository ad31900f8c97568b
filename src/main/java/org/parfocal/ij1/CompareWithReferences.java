package org.parfocal.ij1;

import java.awt.Color;
import java.io.File;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.regex.Pattern;

import ij.IJ;
import ij.ImagePlus;
import ij.Prefs;
import ij.gui.GenericDialog;
import ij.gui.Plot;
import ij.gui.YesNoCancelDialog;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;
import ij.plugin.frame.Recorder;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.MarginalQuantiles;
import org.parfocal.quality.PatchOptions;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;

/**
 * {@code Plugins > Parfocal > Compare with Sharp References...}: judges a result (e.g. a deconvolved stack)
 * against unmatched sharp reference images of the same kind of structure ({@link ReferenceComparison}), and,
 * given the blurred input and the PSF, against the recording itself ({@link ReblurConsistency}). Output: a
 * table (distances with bootstrap intervals, floor, baseline, gap closed, χ², whiteness) and a plot of the
 * quantile curves of intensity and gradient magnitude (result vs references), which carries the provenance.
 * <p>
 * References: every TIFF in a folder ({@code reference_folder=}) and/or every open image whose title matches a
 * pattern ({@code reference_images=}, {@code *} and {@code ?} wildcards). Macro keys (public API): {@code result
 * reference_folder reference_images input psf offset background photons read_noise patch_size patches bootstrap seed
 * ignore_calibration}.
 */
public class CompareWithReferences implements PlugIn {

	static final String COMMAND = "Compare with Sharp References";
	static final String NONE = "none";
	private static final String PREFS = "parfocal.compare.";

	/**
	 * What the dialog decides.
	 *
	 * @param referenceFolder folder whose TIFFs are references ("" for none)
	 * @param openReferences wildcard pattern of open image titles used as references ("" for none)
	 * @param input the blurred recording the result came from, or {@link #NONE}
	 * @param psf the PSF, or {@link #NONE} (χ² needs input and PSF)
	 * @param estimateNoise the χ²'s gain and read noise estimated from the input ({@code estimate_noise}; absent
	 *        from old macro lines: {@code photons} and {@code read_noise}, which stay the fallback)
	 */
	public record Options(String result, String referenceFolder, String openReferences, String input, String psf, Level offset, Level background,
			double photons, double readNoise, int patchSize, int patches, int bootstrap, long seed, boolean ignoreCalibration, boolean estimateNoise) {

		/** Without the noise estimate. */
		public Options(final String result, final String referenceFolder, final String openReferences, final String input, final String psf,
				final Level offset, final Level background, final double photons, final double readNoise, final int patchSize, final int patches,
				final int bootstrap, final long seed, final boolean ignoreCalibration) {
			this(result, referenceFolder, openReferences, input, psf, offset, background, photons, readNoise, patchSize, patches, bootstrap, seed,
					ignoreCalibration, false);
		}

		public Options {
			if (referenceFolder.isBlank() && openReferences.isBlank())
				throw new IllegalArgumentException("No reference images given: name a folder of TIFFs (reference_folder=) or a title pattern of open images (reference_images=)");
			if (!(photons > 0) || !Double.isFinite(photons)) throw new IllegalArgumentException("Photons per unit must be positive, got " + photons);
			if (!(readNoise >= 0) || !Double.isFinite(readNoise)) throw new IllegalArgumentException("Read noise must be 0 or more, got " + readNoise);
		}

		public String macroOptions() {
			return "result=" + MacroOptions.quote(result) + " reference_folder=" + MacroOptions.quote(referenceFolder) + " reference_images="
					+ MacroOptions.quote(openReferences) + " input=" + MacroOptions.quote(input) + " psf=" + MacroOptions.quote(psf) + " offset="
					+ Deconvolve.Options.level(offset) + " background=" + Deconvolve.Options.level(background) + " photons=" + MacroOptions.number(photons)
					+ " read_noise=" + MacroOptions.number(readNoise) + " patch_size=" + patchSize + " patches=" + patches + " bootstrap=" + bootstrap
					+ " seed=" + seed + (ignoreCalibration ? " ignore_calibration" : "") + (estimateNoise ? " estimate_noise" : "");
		}

		Options withIgnoreCalibration(final boolean ignore) {
			return new Options(result, referenceFolder, openReferences, input, psf, offset, background, photons, readNoise, patchSize, patches, bootstrap, seed,
					ignore, estimateNoise);
		}

		ReferenceComparison.Options comparison() {
			final ReferenceComparison.Options d = ReferenceComparison.Options.defaults();
			final PatchOptions p = d.patches();
			return d.withPatches(new PatchOptions(patchSize, p.depth(), p.scales(), p.contrastNormalized(), p.volumetric()))
					.withCounts(patches, d.marginalSamples(), bootstrap).withSeed(seed).withIgnoreCalibration(ignoreCalibration);
		}
	}

	/** The table, the plot (its image carries the provenance), the core report and the χ² (null without input and PSF). */
	public record Output(String tableTitle, ResultsTable table, Plot plot, ReferenceComparison.Report report, ReblurConsistency.Result consistency) {}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.provenance.CommandKeys.COMPARE, () -> {
			Options o = showDialog();
			if (o == null) throw Commands.cancelled();
			if (!o.ignoreCalibration()) {
				final String problem = calibrationProblem(o);
				if (problem != null) {
					if (!askIgnoreCalibration(COMMAND, problem)) throw Commands.cancelled();
					o = o.withIgnoreCalibration(true);
				}
			}
			final Output out = run(o);
			Tables.show(out.table(), out.tableTitle());
			out.plot().show();
		});
	}

	Options showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the result to judge first");
		final String[] optional = new String[titles.length + 1];
		optional[0] = NONE;
		System.arraycopy(titles, 0, optional, 1, titles.length);
		final boolean macro = Commands.isMacro();
		final GenericDialog gd = new GenericDialog(COMMAND);
		gd.addChoice("Result:", titles, Commands.currentTitle(titles));
		gd.addStringField("Reference_folder:", macro ? "" : Commands.remembered(PREFS + "folder", ""), 30);
		gd.addStringField("Reference_images:", macro ? "" : Commands.remembered(PREFS + "pattern", ""), 20);
		gd.addChoice("Input:", optional, NONE);
		gd.addChoice("PSF:", optional, NONE);
		gd.addStringField("Offset:", "auto", 8);
		gd.addStringField("Background:", "auto", 8);
		gd.addNumericField("Photons:", 1, 4, 8, "per intensity unit (1 = photon counts)");
		gd.addNumericField("Read_noise:", 0, 3, 8, "sigma, intensity units");
		gd.addNumericField("Patch_size:", 7, 0, 4, "voxels");
		gd.addNumericField("Patches:", 8192, 0, 8, "sampled per side");
		gd.addNumericField("Bootstrap:", 50, 0, 6, "resamples (0 = no intervals)");
		gd.addNumericField("Seed:", 1, 0);
		gd.addCheckbox("Ignore_calibration (compare voxel for voxel)", false);
		gd.addCheckbox("Estimate_noise from the input (camera gain and read noise, instead of Photons and Read_noise)", !macro);
		gd.addHelp(DialogHelp.compare().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String result = Commands.checkChoice("result", gd.getNextChoice(), "image title");
		final String folder = gd.getNextString().trim(), pattern = gd.getNextString().trim();
		final String input = Commands.checkChoice("input", gd.getNextChoice(), "input (an open image or none)");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "PSF (an open image or none)");
		final Level offset = Deconvolve.level("offset", gd.getNextString().trim()), background = Deconvolve.level("background", gd.getNextString().trim());
		final double photons = Commands.number(gd, "photons"), readNoise = Commands.number(gd, "read_noise");
		final double size = Commands.number(gd, "patch_size"), patches = Commands.number(gd, "patches"), boot = Commands.number(gd, "bootstrap");
		final double seed = Commands.number(gd, "seed");
		final boolean ignore = gd.getNextBoolean(), estimate = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		for (final double v : new double[] { size, patches, boot, seed })
			if (v != Math.rint(v)) throw new IllegalArgumentException("Patch size, patches, bootstrap and seed must be whole numbers, got " + v);
		if (!macro) {
			Prefs.set(PREFS + "folder", folder);
			Prefs.set(PREFS + "pattern", pattern);
		}
		return new Options(result, folder, pattern, input, psf, offset, background, photons, readNoise, (int) size, (int) patches, (int) boot, (long) seed,
				ignore, estimate);
	}

	/** A reference image with the role it has in provenance. */
	record Reference(ImagePlus image, Volume volume) {}

	/**
	 * The references: the folder's TIFFs (sorted by name), then the open images matching the pattern (in
	 * window order), never the images in {@code exclude}.
	 */
	static List<Reference> references(final String folder, final String pattern, final List<String> exclude) {
		final List<Reference> out = new ArrayList<>();
		if (!folder.isBlank()) {
			final File dir = new File(folder);
			if (!dir.isDirectory()) throw new IllegalArgumentException("The reference folder '" + folder + "' does not exist");
			final File[] files = dir.listFiles((d, name) -> name.toLowerCase(Locale.ROOT).matches(".*\\.tiff?"));
			if (files == null || files.length == 0) throw new IllegalArgumentException("No TIFF files (.tif, .tiff) in the reference folder '" + folder + "'");
			Arrays.sort(files);
			for (final File f : files) {
				org.parfocal.cli.TiffCheck.requireComplete(f.toPath()); // empty, truncated or not a TIFF: one line
				final ImagePlus imp = IJ.openImage(f.getPath());
				if (imp == null) throw new IllegalArgumentException("Could not read the reference '" + f.getName() + "' in '" + folder + "'");
				out.add(new Reference(imp, ImageBridge.toVolume(imp, "The reference")));
			}
		}
		if (!pattern.isBlank()) {
			final Pattern p = glob(pattern);
			int found = 0;
			for (final String t : Commands.imageTitles())
				if (p.matcher(t).matches() && !exclude.contains(t)) {
					final ImagePlus imp = Commands.image(t, "reference");
					out.add(new Reference(imp, ImageBridge.toVolume(imp, "The reference")));
					found++;
				}
			if (found == 0) throw new IllegalArgumentException("No open image matches the reference pattern '" + pattern + "' (besides the result, input and PSF)");
		}
		return out;
	}

	/** A wildcard pattern ({@code *} any text, {@code ?} one character) as a regular expression. */
	static Pattern glob(final String pattern) {
		final StringBuilder sb = new StringBuilder();
		for (final char c : pattern.toCharArray()) {
			if (c == '*') sb.append(".*");
			else if (c == '?') sb.append('.');
			else sb.append(Pattern.quote(String.valueOf(c)));
		}
		return Pattern.compile(sb.toString());
	}

	/** A line naming the first image whose calibration is missing while the others have one, or null. */
	static String calibrationProblem(final Options o) {
		final ImagePlus in = NONE.equals(o.input()) ? null : Commands.image(o.input(), "input");
		return calibrationProblem(Commands.image(o.result(), "result"), references(o.referenceFolder(), o.openReferences(), List.of(o.result(), o.input(), o.psf())), in);
	}

	/** The same for a result, its references and (may be null) its input. */
	static String calibrationProblem(final ImagePlus result, final List<Reference> refs, final ImagePlus input) {
		final VoxelSize rv = ImageBridge.voxelSize(result.getCalibration());
		for (final Reference r : refs) {
			final boolean cal = r.volume().voxelSize().isCalibrated();
			if (cal != rv.isCalibrated())
				return rv.isCalibrated() ? "The reference '" + r.image().getTitle() + "' has no calibration but '" + result.getTitle() + "' has (" + rv + ")"
						: "'" + result.getTitle() + "' has no calibration but the reference '" + r.image().getTitle() + "' has (" + r.volume().voxelSize() + ")";
		}
		if (input != null && rv.isCalibrated() && !ImageBridge.voxelSize(input.getCalibration()).isCalibrated())
			return "The input '" + input.getTitle() + "' has no calibration but '" + result.getTitle() + "' has (" + rv + ")";
		return null;
	}

	/**
	 * Interactively asks whether to ignore a calibration problem (and records {@code ignore_calibration} if so);
	 * in a macro throws the one-line error. Returns false when the user cancels.
	 */
	static boolean askIgnoreCalibration(final String command, final String problem) {
		if (Commands.isMacro()) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		final YesNoCancelDialog ask = new YesNoCancelDialog(IJ.getInstance(), command, problem + ".\nCompare voxel for voxel, ignoring all calibrations?",
				"Ignore calibrations", "Cancel");
		if (!ask.yesPressed()) return false;
		Recorder.recordOption("ignore_calibration");
		return true;
	}

	/** Runs the check on open images (and the reference folder); shows nothing. */
	public static Output run(final Options o) {
		final long start = System.nanoTime();
		final ImagePlus resImp = Commands.image(o.result(), "result");
		final Volume result = ImageBridge.toVolume(resImp, "The result");
		final List<Reference> refs = references(o.referenceFolder(), o.openReferences(), List.of(o.result(), o.input(), o.psf()));
		if (!o.ignoreCalibration()) {
			final String problem = calibrationProblem(o);
			if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		}
		final ImagePlus inImp = NONE.equals(o.input()) ? null : Commands.image(o.input(), "input");
		final ImagePlus psfImp = NONE.equals(o.psf()) ? null : Commands.image(o.psf(), "PSF");
		final Volume input = inImp == null ? null : ImageBridge.toVolume(inImp, "The input");
		if (input != null && !input.sameShape(result))
			throw new IllegalArgumentException("The input (" + input + ") and the result (" + result + ") differ in size: give the recording the result was computed from");
		if (psfImp != null && input == null) throw new IllegalArgumentException("A PSF was given without the input: the re-blur check needs both");
		final Volume psf = psfImp == null ? null : ImageBridge.toVolume(psfImp, "The PSF");
		final List<Volume> refVolumes = new ArrayList<>();
		for (final Reference r : refs) refVolumes.add(r.volume());
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final ReferenceComparison.Options co = o.comparison();
		final Object[] core = named(refs, () -> Commands.withImageJThreads(() -> {
			final ReferenceComparison.References prepared = ReferenceComparison.prepare(refVolumes, result, co, monitor);
			final ReferenceComparison.Report report = ReferenceComparison.compare(prepared, result, input, monitor);
			ReblurConsistency.Result chi = null;
			if (psf != null) {
				final double[] lv = QualityWatch.Consistency.levels(input, o.offset(), o.background());
				final List<String> noiseNotes = new ArrayList<>();
				final double[] noise = new Deconvolve.Watch(1, "", "", o.photons(), o.readNoise(), false, false, o.estimateNoise()).noise(input, lv[0], noiseNotes);
				for (final String note : noiseNotes) IJ.log(COMMAND + ": " + note.replaceFirst("^watch ", "chi-square "));
				chi = new QualityWatch(null, QualityWatch.Consistency.forDeconvolution(input, psf, false, lv[0], lv[1], noise[0], noise[1]), 1, false,
						result.voxelSize()).consistency(result);
			}
			return new Object[] { report, chi, MarginalQuantiles.of(prepared, result, 99) };
		}));
		final ReferenceComparison.Report report = (ReferenceComparison.Report) core[0];
		final ReblurConsistency.Result chi = (ReblurConsistency.Result) core[1];
		final MarginalQuantiles.Curves curves = (MarginalQuantiles.Curves) core[2];
		for (final String note : report.notes()) IJ.log(COMMAND + ": " + note);
		final String base = ConvolveWithPsf.stripExtension(resImp.getTitle());
		final ResultsTable table = table(report, chi);
		final Plot plot = plot(curves, base, refs.size());
		final ImagePlus plotImp = plot.getImagePlus();
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("result", resImp));
		for (final Reference r : refs) prov.input(ImageProvenance.input("reference", r.image()));
		if (inImp != null) prov.input(ImageProvenance.input("input", inImp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		final ReferenceComparison.Row p = report.row(ReferenceComparison.PATCHES);
		prov.run("patch_distance", p.distance()).run("floor", p.floor()).run("references", refs.size()).run("volumetric_patches", report.volumetricPatches());
		if (!Double.isNaN(p.baseline())) prov.run("baseline", p.baseline()).run("gap_closed", p.gapClosed());
		if (chi != null) prov.run("chi_square", chi.meanChiSquare()).run("whiteness", chi.whiteness());
		prov.run("table", report.toText().strip().replace('\n', ';'));
		if (!report.notes().isEmpty()) prov.run("notes", String.join("; ", report.notes()));
		ImageProvenance.attach(plotImp, prov, start);
		monitor.done(String.format(Locale.ROOT, "patch distance %.4g (floor %.4g)", p.distance(), p.floor()));
		return new Output("Reference comparison of " + base, table, plot, report, chi);
	}

	/** Runs {@code work}; a core message about "Reference N" gets that reference's title added. */
	static <T> T named(final List<Reference> refs, final java.util.function.Supplier<T> work) {
		try {
			return work.get();
		} catch (final IllegalArgumentException e) {
			final java.util.regex.Matcher m = Pattern.compile("Reference (\\d+)").matcher(String.valueOf(e.getMessage()));
			if (!m.find()) throw e;
			final int i = Integer.parseInt(m.group(1)) - 1;
			if (i < 0 || i >= refs.size()) throw e;
			final String msg = e.getMessage();
			throw new IllegalArgumentException(msg.substring(0, m.end()) + " ('" + refs.get(i).image().getTitle() + "')" + msg.substring(m.end()), e);
		}
	}

	/** One row per property; χ² and whiteness as two more rows with their value in the {@code value} column. */
	static ResultsTable table(final ReferenceComparison.Report report, final ReblurConsistency.Result chi) {
		final ResultsTable t = new ResultsTable();
		for (final ReferenceComparison.Row r : report.rows()) {
			t.incrementCounter();
			t.addValue("property", r.property());
			t.addValue("value", r.distance());
			t.addValue(LOW, r.low());
			t.addValue(HIGH, r.high());
			t.addValue(FLOOR, r.floor());
			t.addValue(BASELINE, r.baseline());
			t.addValue(GAP, r.gapClosed());
			t.addValue(WHY, whyNoGap(r.baseline(), r.floor(), r.gapClosed()));
		}
		if (chi != null) {
			addScalar(t, "re-blur chi-square", chi.meanChiSquare());
			addScalar(t, "re-blur whiteness", chi.whiteness());
		}
		t.setDecimalPlaces(t.getColumnIndex("value"), 5);
		return t;
	}

	private static void addScalar(final ResultsTable t, final String name, final double v) {
		t.incrementCounter();
		t.addValue("property", name);
		t.addValue("value", v);
		for (final String c : new String[] { LOW, HIGH, FLOOR, BASELINE, GAP }) t.addValue(c, Double.NaN);
		t.addValue(WHY, "");
	}

	/** Worded column headings of the table (explained in the dialog's Help). */
	static final String LOW = "95% low", HIGH = "95% high", FLOOR = "noise floor", BASELINE = "blurred input", GAP = "gap closed", WHY = "why no gap";

	/** Why "gap closed" is blank, or "" when it has a value. */
	static String whyNoGap(final double baseline, final double floor, final double gap) {
		if (Double.isFinite(gap)) return "";
		if (Double.isNaN(baseline)) return "no input given";
		if (!(baseline > floor)) return "input already within the noise floor";
		return "undefined";
	}

	/** Quantile curves of intensity and gradient magnitude: references (wide, light) under the result (dark). */
	static Plot plot(final MarginalQuantiles.Curves c, final String title, final int refCount) {
		final Plot plot = new Plot("Marginals of " + title + " vs references", "Quantile level (%)", "Normalized value");
		final Color[] colors = { new Color(0, 90, 170), new Color(200, 80, 0) };
		final Color[] light = { new Color(140, 185, 230), new Color(240, 180, 130) };
		for (int k = 0; k < 2; k++) {
			// the references first, as a wide light band of the same hue, then the result as a dark line on top:
			// both stay visible where they agree
			plot.setColor(light[k]);
			plot.setLineWidth(5);
			plot.addPoints(c.levels(), c.references()[k], Plot.LINE);
			plot.setColor(colors[k]);
			plot.setLineWidth(2);
			plot.addPoints(c.levels(), c.result()[k], Plot.LINE);
		}
		plot.setLineWidth(1);
		plot.setColor(Color.BLACK);
		plot.addLegend("intensity, " + refCount + " reference(s) (wide, light)\tintensity, result\tgradient magnitude, references (wide, light)\tgradient magnitude, result",
				"top-left");
		plot.setLimitsToFit(false);
		return plot;
	}
}
