package org.parfocal.ij1;

import java.awt.Color;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.gui.Plot;
import ij.measure.Calibration;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.blind.BlindDeconvolution;
import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.BlindResult;
import org.parfocal.blind.FitPlan;
import org.parfocal.blind.RefineStep;
import org.parfocal.blind.PsfSnapshot;
import org.parfocal.blind.PsfStart;
import org.parfocal.blind.SupportBox;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.BlindQualityWatch;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.quality.StoppingRule;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * {@code Plugins > Parfocal > Blind Deconvolve...}: estimates the object and the PSF of one 2D or 3D image
 * together ({@link BlindDeconvolution}: alternating Richardson–Lucy updates, total variation, PSF constraints).
 * The starting PSF is an open image, a PSF computed from the optics in a second dialog ({@code from_optics}), or
 * a Gaussian of the given widths. The band-limit constraint needs the optics: with a start that is not
 * {@code from_optics}, a short second dialog asks for NA, immersion index and emission wavelength (the same keys
 * as {@code PSF from Optics...}).
 * <p>
 * Outputs, all new calibrated 32-bit images with provenance: the deblurred image, the final PSF, and the PSF
 * history (a hyperstack with one frame per snapshot, its slice labels naming the iteration); plus a table of the
 * snapshots (iteration, lateral and axial FWHM, distance to the start, sum) and a plot of the FWHMs relative to
 * the start's and of the distance to the start, so a user sees whether the PSF settled. Esc cancels: nothing is
 * created and the input is untouched.
 * <p>
 * Macro keys (public API): {@code image psf fwhm_xy fwhm_z iterations object_updates psf_updates object_tv
 * psf_tv band_limit symmetric centring support_xy support_z support_units snapshot_interval edges offset
 * background}; with {@code psf=from_optics} also the keys of {@code PSF from Optics...} (without
 * {@code show_profiles}); with {@code band_limit} and another start also {@code na immersion_index emission}.
 * {@code offset} and {@code background} take a number or {@code auto}; {@code support_xy}/{@code support_z} 0
 * means automatic.
 * <p>
 * <b>Watch mode</b> ({@code watch}, off by default): the second dialog and keys of {@code Deconvolve...}'s watch
 * mode ({@code every reference_folder reference_images photons read_noise stop_at_suggestion ignore_calibration}). Every
 * {@code every} outer iterations a {@link BlindQualityWatch} computes the current object's patch distance to the
 * sharp references and its re-blur χ² with the PSF estimate of the same iteration; a plot shows both against
 * the iteration and {@link StoppingRule} suggests one. With {@code stop_at_suggestion} the deblurred image and
 * the final PSF are the object and the PSF of the suggested iteration (copies kept during the run); the PSF
 * history, table and convergence plot still cover the whole run. The rule, suggestion and curve go into the
 * provenance.
 */
public class BlindDeconvolve implements PlugIn {

	static final String COMMAND = "Blind Deconvolve";
	/** Starting-PSF choices besides the open images. */
	public static final String FROM_OPTICS = Deconvolve.FROM_OPTICS, GAUSSIAN = "gaussian";
	/**
	 * Values of {@code estimate=}: free-form updates (the behaviour of macros recorded before the key), a model fit,
	 * a model fit then a trust-region refinement; the two widefield words fit a Gaussian start as a widefield shape
	 * (Born &amp; Wolf of the start's widths, which holds the out-of-focus cone a Gaussian lacks; the plain fit words
	 * keep fitting a Gaussian, as recorded lines did).
	 */
	public static final String FREE_FORM = "free-form", MODEL_FIT = "model-fit", MODEL_FIT_REFINED = "model-fit-refined",
			WIDEFIELD_FIT = "widefield-fit", WIDEFIELD_FIT_REFINED = "widefield-fit-refined";
	private static final java.util.List<String> ESTIMATES = java.util.List.of(FREE_FORM, MODEL_FIT, MODEL_FIT_REFINED, WIDEFIELD_FIT, WIDEFIELD_FIT_REFINED);
	/** Units of the support box. */
	public static final String VOXELS = "voxels", MICRONS = "microns";
	private static final String PREFS = "parfocal.blind.";

	/** NA, immersion index and emission wavelength (µm) for the band limit when the start is not from the optics. */
	public record BandOptics(double na, double immersionIndex, double emission) {

		/** Widefield optics with these values (sample index = immersion index, at the coverslip). */
		public Optics optics() {
			return Optics.builder().na(na).immersionIndex(immersionIndex).emissionWavelength(emission).build();
		}

		public String macroOptions() {
			return "na=" + MacroOptions.number(na) + " immersion_index=" + MacroOptions.number(immersionIndex) + " emission="
					+ MacroOptions.number(emission);
		}
	}

	/**
	 * What the dialogs decide. {@code optics} is set when {@code psf} is {@link #FROM_OPTICS}; {@code band} when the
	 * band limit is on and the start is not from the optics. Support sizes 0 mean automatic. Numbers are checked by
	 * {@link BlindOptions} when the command runs.
	 */
	public record Options(String image, String psf, double fwhmXY, double fwhmZ, int iterations, int objectUpdates, int psfUpdates, double objectTv,
			double psfTv, boolean bandLimit, boolean symmetric, boolean centring, double supportXY, double supportZ, String supportUnits,
			int snapshotInterval, EdgeMode edges, Level offset, Level background, PsfFromOptics.Options optics, BandOptics band, Deconvolve.Watch watch,
			String estimate, double trustRadius) {

		/** Free-form estimation (the PSF updated voxel by voxel from the start, as before the model fit existed). */
		public Options(final String image, final String psf, final double fwhmXY, final double fwhmZ, final int iterations, final int objectUpdates,
				final int psfUpdates, final double objectTv, final double psfTv, final boolean bandLimit, final boolean symmetric, final boolean centring,
				final double supportXY, final double supportZ, final String supportUnits, final int snapshotInterval, final EdgeMode edges, final Level offset,
				final Level background, final PsfFromOptics.Options optics, final BandOptics band, final Deconvolve.Watch watch) {
			this(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY, supportZ,
					supportUnits, snapshotInterval, edges, offset, background, optics, band, watch, FREE_FORM, FitPlan.DEFAULT_TRUST_RADIUS);
		}

		/** The same with this estimate (free-form, model-fit, model-fit-refined) and trust radius. */
		public Options withEstimate(final String e, final double radius) {
			return new Options(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY,
					supportZ, supportUnits, snapshotInterval, edges, offset, background, optics, band, watch, e, radius);
		}

		/**
		 * The model-fit plan, or null for free-form. A Gaussian start fits the Gaussian family, as recorded lines
		 * of this command always did; {@code estimate=widefield-fit(-refined)} selects the widefield shape.
		 */
		public FitPlan plan() {
			if (FREE_FORM.equals(estimate)) return null;
			final boolean refined = MODEL_FIT_REFINED.equals(estimate) || WIDEFIELD_FIT_REFINED.equals(estimate);
			final boolean widefield = WIDEFIELD_FIT.equals(estimate) || WIDEFIELD_FIT_REFINED.equals(estimate);
			return (refined ? FitPlan.refined() : FitPlan.model()).withTrustRadius(trustRadius)
					.withGaussianStart(widefield ? FitPlan.GaussianStart.WIDEFIELD : FitPlan.GaussianStart.GAUSSIAN);
		}

		/** Without watch mode. */
		public Options(final String image, final String psf, final double fwhmXY, final double fwhmZ, final int iterations, final int objectUpdates,
				final int psfUpdates, final double objectTv, final double psfTv, final boolean bandLimit, final boolean symmetric, final boolean centring,
				final double supportXY, final double supportZ, final String supportUnits, final int snapshotInterval, final EdgeMode edges, final Level offset,
				final Level background, final PsfFromOptics.Options optics, final BandOptics band) {
			this(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY, supportZ,
					supportUnits, snapshotInterval, edges, offset, background, optics, band, null);
		}

		/** The same with these watch settings (null: off). */
		public Options withWatch(final Deconvolve.Watch w) {
			return new Options(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY,
					supportZ, supportUnits, snapshotInterval, edges, offset, background, optics, band, w, estimate, trustRadius);
		}

		public Options {
			if (estimate == null) estimate = FREE_FORM;
			if (!ESTIMATES.contains(estimate))
				throw new IllegalArgumentException("'" + estimate + "' is not a valid PSF estimate (" + String.join(", ", ESTIMATES) + ") (estimate=)");
			if (!(trustRadius > 0 && trustRadius <= 1))
				throw new IllegalArgumentException("The trust radius must be above 0 and at most 1, got " + trustRadius + " (trust_radius=)");
			if (!FREE_FORM.equals(estimate) && !FROM_OPTICS.equals(psf) && !GAUSSIAN.equals(psf))
				throw new IllegalArgumentException("A model fit starts from " + FROM_OPTICS + " or " + GAUSSIAN + ", not from an open PSF: choose one, or estimate=" + FREE_FORM);
			if (image == null || image.isEmpty()) throw new IllegalArgumentException("No image given");
			if (psf == null || psf.isEmpty()) throw new IllegalArgumentException("No starting PSF given");
			if (!VOXELS.equals(supportUnits) && !MICRONS.equals(supportUnits))
				throw new IllegalArgumentException("'" + supportUnits + "' is not a valid support unit (" + VOXELS + " or " + MICRONS + ") (support_units=)");
			if (!(supportXY >= 0) || !(supportZ >= 0) || !Double.isFinite(supportXY) || !Double.isFinite(supportZ))
				throw new IllegalArgumentException("Support sizes must be 0 (automatic) or positive, got " + supportXY + " and " + supportZ);
			if (edges == null) edges = EdgeMode.NON_CIRCULANT;
			if (offset == null) offset = Level.NONE;
			if (background == null) background = Level.NONE;
			if (FROM_OPTICS.equals(psf) != (optics != null)) throw new IllegalArgumentException("The optics are given exactly when psf=" + FROM_OPTICS);
			if (band != null && (!bandLimit || optics != null))
				throw new IllegalArgumentException("Band-limit optics are given only with band_limit and a start that is not " + FROM_OPTICS);
		}

		public String macroOptions() {
			final String s = "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " fwhm_xy=" + MacroOptions.number(fwhmXY)
					+ " fwhm_z=" + MacroOptions.number(fwhmZ) + " iterations=" + iterations + " object_updates=" + objectUpdates + " psf_updates="
					+ psfUpdates + " object_tv=" + MacroOptions.number(objectTv) + " psf_tv=" + MacroOptions.number(psfTv)
					+ (bandLimit ? " band_limit" : "") + (symmetric ? " symmetric" : "") + (centring ? " centring" : "") + " support_xy="
					+ MacroOptions.number(supportXY) + " support_z=" + MacroOptions.number(supportZ) + " support_units=" + supportUnits
					+ " snapshot_interval=" + snapshotInterval + " edges=" + edges.key() + " offset=" + level(offset) + " background="
					+ level(background) + " estimate=" + estimate + " trust_radius=" + MacroOptions.number(trustRadius) + (watch != null ? " watch" : "");
			return s + (optics != null ? " " + optics.macroOptions() : "") + (band != null ? " " + band.macroOptions() : "")
					+ (watch != null ? " " + watch.macroOptions() : "");
		}

		private static String level(final Level l) {
			return switch (l.kind()) {
			case ESTIMATED -> "auto";
			case DARK -> "dark";
			case NONE -> "0";
			default -> MacroOptions.number(l.value());
			};
		}
	}

	/**
	 * What the command made (not shown): the deblurred image, the final PSF, the PSF history, the snapshot table and
	 * plot; in watch mode also the quality plot and the watch (otherwise null).
	 */
	public record Output(ImagePlus image, ImagePlus psf, ImagePlus history, ResultsTable table, Plot plot, BlindResult result, Plot quality,
			BlindQualityWatch watch) {

		public Output(final ImagePlus image, final ImagePlus psf, final ImagePlus history, final ResultsTable table, final Plot plot, final BlindResult result) {
			this(image, psf, history, table, plot, result, null, null);
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.provenance.CommandKeys.BLIND_DECONVOLVE, () -> {
			Options o = showDialog();
			if (o == null) throw Commands.cancelled();
			if (o.watch() != null && !o.watch().ignoreCalibration()) {
				final String problem = CompareWithReferences.calibrationProblem(Commands.image(o.image(), "image"),
						CompareWithReferences.references(o.watch().referenceFolder(), o.watch().openReferences(), List.of(o.image(), o.psf())), null);
				if (problem != null) {
					if (!CompareWithReferences.askIgnoreCalibration(COMMAND, problem)) throw Commands.cancelled();
					o = o.withWatch(o.watch().withIgnoreCalibration());
				}
			}
			final Output out = run(o);
			Tables.show(out.table(), ConvolveWithPsf.stripExtension(out.history().getTitle()) + " (table)");
			out.plot().show();
			if (out.quality() != null) out.quality().show();
			out.history().show();
			zoomSmall(out.history());
			out.psf().show();
			zoomSmall(out.psf());
			out.image().show(); // last, so that it is the current image for the next macro line
		});
	}

	Options showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the image to deconvolve first");
		final String[] starts = new String[titles.length + 2];
		System.arraycopy(titles, 0, starts, 0, titles.length);
		starts[titles.length] = FROM_OPTICS;
		starts[titles.length + 1] = GAUSSIAN;
		Commands.acceptOldValue("edges", EdgeMode.OLD_NON_CIRCULANT_KEY, EdgeMode.NON_CIRCULANT.key());
		final GenericDialog gd = new GenericDialog(COMMAND);
		gd.addChoice("Image:", titles, Commands.currentNonPsfTitle(titles));
		gd.addChoice("PSF:", starts, guessStart(titles));
		gd.addNumericField("FWHM_xy:", Commands.remembered(PREFS + "fwhm_xy", 0.25), 3, 6, "µm, lateral width of a gaussian start");
		gd.addNumericField("FWHM_z:", Commands.remembered(PREFS + "fwhm_z", 0.7), 3, 6, "µm, axial width of a gaussian start");
		gd.addMessage("Schedule");
		gd.addNumericField("Iterations:", Commands.remembered(PREFS + "iterations", BlindOptions.DEFAULT_ITERATIONS), 0, 6, "outer iterations");
		gd.addNumericField("Object_updates:", Commands.remembered(PREFS + "object_updates", 1), 0, 6, "per iteration");
		gd.addNumericField("PSF_updates:", Commands.remembered(PREFS + "psf_updates", 1), 0, 6, "per iteration (0: PSF kept)");
		gd.addNumericField("Object_TV:", Commands.remembered(PREFS + "object_tv", BlindOptions.DEFAULT_OBJECT_TV), 4, 8, "total-variation weight");
		gd.addNumericField("PSF_TV:", Commands.remembered(PREFS + "psf_tv", 0), 4, 8, "total-variation weight");
		gd.addMessage("PSF constraints");
		gd.addCheckbox("Band_limit (optical cutoff 2 NA / wavelength; widefield)", Commands.remembered(PREFS + "band_limit", true));
		gd.addCheckbox("Symmetric (cylindrical about the optical axis)", Commands.remembered(PREFS + "symmetric", false));
		gd.addCheckbox("Centring (keep the centre of mass of the start)", Commands.remembered(PREFS + "centring", true));
		gd.addNumericField("Support_xy:", Commands.remembered(PREFS + "support_xy", 0), 2, 6, "PSF box width; 0 = automatic");
		gd.addNumericField("Support_z:", Commands.remembered(PREFS + "support_z", 0), 2, 6, "PSF box depth; 0 = automatic");
		gd.addChoice("Support_units:", new String[] { VOXELS, MICRONS }, Commands.remembered(PREFS + "support_units", VOXELS));
		gd.addMessage("Output and data");
		gd.addNumericField("Snapshot_interval:", Commands.remembered(PREFS + "snapshot_interval", BlindOptions.DEFAULT_SNAPSHOT_INTERVAL), 0, 6,
				"iterations between PSF snapshots");
		gd.addChoice("Edges:", EdgeMode.keys(), Commands.remembered(PREFS + "edges", EdgeMode.NON_CIRCULANT.key()));
		gd.addStringField("Offset:", Commands.remembered(PREFS + "offset", "auto"), 8);
		gd.addStringField("Background:", Commands.remembered(PREFS + "background", "auto"), 8);
		gd.addMessage("How the PSF is estimated");
		gd.addChoice("Estimate:", ESTIMATES.toArray(new String[0]), Commands.remembered(PREFS + "estimate", FREE_FORM));
		gd.addNumericField("Trust_radius:", Commands.remembered(PREFS + "trust_radius", FitPlan.DEFAULT_TRUST_RADIUS), 3, 6, "largest distance of a refined PSF to the fitted model");
		gd.addCheckbox("Watch quality every few iterations (next dialog)", false);
		gd.addHelp(DialogHelp.blind().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "starting PSF (an open image, " + FROM_OPTICS + " or " + GAUSSIAN + ")");
		final double fwhmXY = Commands.number(gd, "fwhm_xy"), fwhmZ = Commands.number(gd, "fwhm_z");
		final double iterations = Commands.number(gd, "iterations"), k = Commands.number(gd, "object_updates"), m = Commands.number(gd, "psf_updates");
		final double objectTv = Commands.number(gd, "object_tv"), psfTv = Commands.number(gd, "psf_tv");
		final boolean band = gd.getNextBoolean(), symmetric = gd.getNextBoolean(), centring = gd.getNextBoolean();
		final double sxy = Commands.number(gd, "support_xy"), sz = Commands.number(gd, "support_z");
		final String units = Commands.checkChoice("support_units", gd.getNextChoice(), "support unit (" + VOXELS + " or " + MICRONS + ")");
		final double snapshot = Commands.number(gd, "snapshot_interval");
		final EdgeMode edges = EdgeMode.parse(Commands.checkChoice("edges", gd.getNextChoice(), "edge mode"));
		final String offset = gd.getNextString().trim(), background = gd.getNextString().trim();
		final String estimate = Commands.checkChoice("estimate", gd.getNextChoice(), "PSF estimate (" + String.join(", ", ESTIMATES) + ")");
		final double trust = Commands.number(gd, "trust_radius");
		final boolean watch = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		final Level off = Deconvolve.level("offset", offset), bg = Deconvolve.level("background", background);
		PsfFromOptics.Options optics = null;
		BandOptics bandOptics = null;
		if (FROM_OPTICS.equals(psf)) {
			optics = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (optics == null) return null;
		} else if (band) {
			bandOptics = showBandDialog(bandDefaults(image, psf));
			if (bandOptics == null) return null;
		}
		Deconvolve.Watch w = null;
		if (watch) {
			w = Deconvolve.showWatchDialog(); // the same dialog, keys and defaults as Deconvolve's watch mode
			if (w == null) return null;
		}
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "fwhm_xy", fwhmXY);
			Prefs.set(PREFS + "fwhm_z", fwhmZ);
			Prefs.set(PREFS + "iterations", iterations);
			Prefs.set(PREFS + "object_updates", k);
			Prefs.set(PREFS + "psf_updates", m);
			Prefs.set(PREFS + "object_tv", objectTv);
			Prefs.set(PREFS + "psf_tv", psfTv);
			Prefs.set(PREFS + "estimate", estimate);
			Prefs.set(PREFS + "trust_radius", trust);
			Prefs.set(PREFS + "band_limit", band);
			Prefs.set(PREFS + "symmetric", symmetric);
			Prefs.set(PREFS + "centring", centring);
			Prefs.set(PREFS + "support_xy", sxy);
			Prefs.set(PREFS + "support_z", sz);
			Prefs.set(PREFS + "support_units", units);
			Prefs.set(PREFS + "snapshot_interval", snapshot);
			Prefs.set(PREFS + "edges", edges.key());
			Prefs.set(PREFS + "offset", offset);
			Prefs.set(PREFS + "background", background);
			if (!FROM_OPTICS.equals(psf) && !GAUSSIAN.equals(psf)) Prefs.set(PREFS + "start", "image");
			else Prefs.set(PREFS + "start", psf);
		}
		return new Options(image, psf, fwhmXY, fwhmZ, whole("Iterations", iterations), whole("Object updates per iteration", k),
				whole("PSF updates per iteration", m), objectTv, psfTv, band, symmetric, centring, sxy, sz, units, whole("The snapshot interval", snapshot),
				edges, off, bg, optics, bandOptics, w, estimate, trust);
	}

	/**
	 * Interactive defaults of the band-limit optics: those of the starting PSF's record, else of the image's (or
	 * of their inputs' records, {@link OpticsDefaults}); empty in a macro.
	 */
	static java.util.Map<String, String> bandDefaults(final String image, final String psf) {
		final java.util.Map<String, String> fromPsf = GAUSSIAN.equals(psf) ? java.util.Map.of() : OpticsDefaults.of(WindowManager.getImage(psf));
		return fromPsf.isEmpty() ? OpticsDefaults.of(WindowManager.getImage(image)) : fromPsf;
	}

	/** The optics the band limit needs, asked for when the start is not computed from them; null if cancelled. */
	private static BandOptics showBandDialog(final java.util.Map<String, String> rec) {
		final GenericDialog gd = new GenericDialog(COMMAND + ": optics for the band limit");
		gd.addMessage("The band-limit constraint needs the widefield optics:");
		gd.addNumericField("NA:", OpticsDefaults.number(rec, "na", Commands.remembered(PREFS + "na", 1.4)), 3);
		gd.addNumericField("Immersion_index:", OpticsDefaults.number(rec, "immersion_index", Commands.remembered(PREFS + "immersion_index", 1.518)), 4);
		gd.addNumericField("Emission:", OpticsDefaults.number(rec, "emission", Commands.remembered(PREFS + "emission", 0.52)), 3, 6, "µm");
		gd.addHelp(DialogHelp.band().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final double na = Commands.number(gd, "na"), ni = Commands.number(gd, "immersion_index"), em = Commands.number(gd, "emission");
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "na", na);
			Prefs.set(PREFS + "immersion_index", ni);
			Prefs.set(PREFS + "emission", em);
		}
		final BandOptics b = new BandOptics(na, ni, em);
		b.optics(); // validates now, with the optics' one-line messages
		return b;
	}

	private static int whole(final String what, final double v) {
		if (v != Math.rint(v) || Math.abs(v) > Integer.MAX_VALUE) throw new IllegalArgumentException(what + " must be a whole number, got " + v);
		return (int) v;
	}

	/** Runs the blind deconvolution; returns the new images, table and plot (not shown). */
	public static Output run(final Options o) {
		final long t0 = System.nanoTime();
		final ImagePlus imp = Commands.image(o.image(), "image");
		if (imp.getNChannels() > 1 || imp.getNFrames() > 1)
			throw new IllegalArgumentException("'" + imp.getTitle() + "' has " + imp.getNChannels() + " channels and " + imp.getNFrames()
					+ " frames; blind deconvolution takes one of each: pick one with Image > Duplicate...");
		final Volume image = ImageBridge.toVolume(imp, "The image");
		final ImagePlus psfImp = FROM_OPTICS.equals(o.psf()) || GAUSSIAN.equals(o.psf()) ? null : Commands.image(o.psf(), "starting PSF");
		final List<String> notes = new ArrayList<>();
		final BlindOptions options = blindOptions(o, image, psfImp, notes);
		options.checkFor(image);
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final Deconvolve.Watch w = o.watch();
		final List<CompareWithReferences.Reference> refs = w == null ? List.of()
				: CompareWithReferences.references(w.referenceFolder(), w.openReferences(), List.of(o.image(), o.psf()));
		if (w != null && !w.ignoreCalibration()) {
			final String problem = CompareWithReferences.calibrationProblem(imp, refs, null);
			if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		}
		final BlindQualityWatch watch = w == null ? null : Commands.withImageJThreads(() -> watch(w, image, options, refs, monitor, notes));
		final FitPlan plan = o.plan();
		final BlindResult r = Commands.withImageJThreads(() -> BlindDeconvolution.run(image, options, plan, monitor, watch));
		for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		final boolean best = watch != null && w.stopAtSuggestion() && watch.best() != null;
		final Volume estimate = best ? watch.best() : r.estimate(), finalPsf = best ? watch.bestPsf() : r.psf();

		final String base = ConvolveWithPsf.stripExtension(imp.getTitle());
		final Calibration cal = imp.getCalibration();
		final ImagePlus out = ImageBridge.toImagePlus(Hyperstack.of(estimate), WindowManager.makeUniqueName(base + "-blind.tif"), cal);
		final ImagePlus psf = ImageBridge.toImagePlus(Hyperstack.of(finalPsf), WindowManager.makeUniqueName(base + "-blind-psf.tif"), cal);
		final ImagePlus history = history(r.snapshots(), WindowManager.makeUniqueName(base + "-blind-psf-history.tif"), cal);
		final String unit = cal != null && cal.scaled() ? cal.getUnits() : "voxels";
		final ResultsTable table = table(r, unit);
		Tables.attach(history, table); // kept with the history, saved in its TIFF
		final Plot plot = plot(r.snapshots(), "PSF convergence of " + base);

		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		final PsfSnapshot last = r.snapshots().get(r.snapshots().size() - 1);
		prov.run("iterations", o.iterations()).run("psf_box", r.psf().nx() + "x" + r.psf().ny() + "x" + r.psf().nz())
				.run("snapshots", r.snapshots().size()).run("fwhm_lateral", last.fwhmLateral());
		if (image.nz() > 1) prov.run("fwhm_axial", last.fwhmAxial());
		prov.run("distance_to_start", last.distanceToStart()).run("offset", r.offset()).run("background", r.background());
		if (r.fit() != null) {
			prov.run("model_fit", r.fit().summary()).run("model_fit_candidates", r.fit().evaluations());
			if (!r.refinement().isEmpty())
				prov.run("refinement_steps_kept", r.refinement().stream().filter(RefineStep::accepted).count() + " of " + r.refinement().size());
		}
		if (watch != null) Deconvolve.watchProvenance(prov, w, List.of(watch), refs);
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		ImageProvenance.attach(out, prov.run("output", "deblurred image"), t0);
		ImageProvenance.attach(psf, prov.run("output", "final PSF"), t0);
		ImageProvenance.attach(history, prov.run("output", "PSF history, one frame per snapshot"), t0);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s, PSF FWHM %s%s %s", o.iterations(), (System.nanoTime() - t0) / 1e9,
				fmt(last.fwhmLateral()), image.nz() > 1 ? " x " + fmt(last.fwhmAxial()) : "", unit));
		final Plot quality = watch == null ? null : Deconvolve.qualityPlot(List.of(watch), out.getTitle(), "Outer iteration", "chi-square (current PSF)");
		return new Output(out, psf, history, table, plot, r, quality, watch);
	}

	/**
	 * The watch for this run: references prepared for the image (none: distance not evaluated), and the re-blur
	 * check with the offset and background the engine will use (the same estimators, {@link QualityWatch.Consistency#levels}).
	 */
	static BlindQualityWatch watch(final Deconvolve.Watch w, final Volume image, final BlindOptions options, final List<CompareWithReferences.Reference> refs,
			final org.parfocal.core.Monitor monitor) {
		return watch(w, image, options, refs, monitor, new ArrayList<>());
	}

	/** As above; notes about the noise model ({@code estimate_noise}) go to {@code notes}. */
	static BlindQualityWatch watch(final Deconvolve.Watch w, final Volume image, final BlindOptions options, final List<CompareWithReferences.Reference> refs,
			final org.parfocal.core.Monitor monitor, final List<String> notes) {
		final ReferenceComparison.References prepared = refs.isEmpty() ? null
				: CompareWithReferences.named(refs, () -> ReferenceComparison.prepare(refs.stream().map(CompareWithReferences.Reference::volume).toList(), image,
						ReferenceComparison.Options.defaults().withIgnoreCalibration(w.ignoreCalibration()), monitor));
		final double[] lv = QualityWatch.Consistency.levels(image, options.offset(), options.background());
		final double[] noise = w.noise(image, lv[0], notes);
		final BlindQualityWatch.Recording rec = new BlindQualityWatch.Recording(image, options.edges() == EdgeMode.PERIODIC, lv[0], lv[1], noise[0],
				noise[1]);
		return new BlindQualityWatch(prepared, rec, w.every(), w.stopAtSuggestion(), image.voxelSize());
	}

	private static String fmt(final double v) {
		return Double.isFinite(v) ? Deconvolve.fmt(v) : "n/a";
	}

	/** The core options: the starting PSF, the support box in voxels, the optics. */
	static BlindOptions blindOptions(final Options o, final Volume image, final ImagePlus psfImp, final List<String> notes) {
		final boolean is3D = image.nz() > 1;
		SupportBox support = supportBox(o, image);
		final PsfStart start;
		Optics optics = null;
		if (FROM_OPTICS.equals(o.psf())) {
			optics = o.optics().optics();
			final Volume computed = fromOptics(o.optics(), image, notes);
			if (support == null && (computed.nx() > image.nx() || computed.ny() > image.ny() || computed.nz() > image.nz())) {
				support = new SupportBox(fit(computed.nx(), image.nx()), fit(computed.ny(), image.ny()), fit(computed.nz(), image.nz()));
				notes.add("The PSF from the optics (" + computed.nx() + " x " + computed.ny() + " x " + computed.nz() + ") was cropped to the image: support box "
						+ support);
			}
			start = PsfStart.given(computed);
		} else if (GAUSSIAN.equals(o.psf())) {
			start = PsfStart.gaussian(o.fwhmXY(), o.fwhmZ());
		} else {
			start = PsfStart.given(Deconvolve.psfsFor(Hyperstack.of(image), psfImp, null, notes).get(0));
		}
		if (o.band() != null) optics = o.band().optics();
		if (!is3D && support != null && support.nz() != 1) support = new SupportBox(support.nx(), support.ny(), 1);
		return new BlindOptions(o.iterations(), o.objectUpdates(), o.psfUpdates(), o.objectTv(), o.psfTv(), start, support, o.bandLimit(), o.symmetric(),
				o.centring(), optics, o.snapshotInterval(), o.edges(), o.offset(), o.background());
	}

	/** Largest odd size ≤ the image's that is ≤ n. */
	private static int fit(final int n, final int image) {
		final int cap = image % 2 == 1 ? image : image - 1;
		return Math.max(1, Math.min(n, cap));
	}

	/** The user's support box in voxels, or null (automatic) when the sizes are 0. */
	static SupportBox supportBox(final Options o, final Volume image) {
		final boolean is3D = image.nz() > 1;
		final double sxy = o.supportXY(), sz = is3D ? o.supportZ() : 0;
		if (sxy == 0 && sz == 0) return null;
		if (sxy == 0 || (is3D && sz == 0))
			throw new IllegalArgumentException("Give both support sizes (support_xy and support_z), or 0 for both (automatic)");
		if (VOXELS.equals(o.supportUnits())) {
			return new SupportBox(whole("The support size support_xy", sxy), whole("The support size support_xy", sxy), is3D ? whole("The support size support_z", sz) : 1);
		}
		final VoxelSize v = image.voxelSize();
		if (!v.isCalibrated())
			throw new IllegalArgumentException("A support box in microns needs the voxel size: calibrate the image, or give the box in voxels");
		final double f = PsfGrid.micronsPer(v);
		return new SupportBox(odd(sxy / (v.dx() * f)), odd(sxy / (v.dy() * f)), is3D ? odd(sz / (v.dz() * f)) : 1);
	}

	/** The odd number of voxels whose extent is nearest to {@code voxels}: 2·round((voxels − 1) / 2) + 1, at least 1. */
	private static int odd(final double voxels) {
		return (int) Math.max(1, 2 * Math.round((voxels - 1) / 2) + 1);
	}

	/** The starting PSF from the optics dialog, on its grid; its central plane for a 2D image. */
	private static Volume fromOptics(final PsfFromOptics.Options optics, final Volume image, final List<String> notes) {
		final VoxelSize v = image.voxelSize();
		if (v.isCalibrated()) {
			final double f = PsfGrid.micronsPer(v);
			final double dx = v.dx() * f, dz = v.dz() * f;
			if (Math.abs(optics.voxelXY() - dx) > 1e-3 * dx || (image.nz() > 1 && Math.abs(optics.voxelZ() - dz) > 1e-3 * dz))
				throw new IllegalArgumentException("The PSF from the optics would be sampled at " + Deconvolve.fmt(optics.voxelXY()) + " x "
						+ Deconvolve.fmt(optics.voxelZ()) + " µm but the image's voxels are " + Deconvolve.fmt(dx) + " x " + Deconvolve.fmt(dz)
						+ " µm: set voxel_xy and voxel_z to the image's");
		}
		final PsfGrid grid = optics.grid();
		final Volume p = Commands.withImageJThreads(() -> PsfModels.get(optics.model()).compute(optics.optics(), grid)).withVoxelSize(v);
		if (image.nz() > 1 || p.nz() == 1) return p;
		notes.add("The image is 2D: the central plane of the PSF from the optics is the start");
		final Volume plane = Volume.zeros(p.nx(), p.ny(), 1, v);
		System.arraycopy(p.data(), ((p.nz() - 1) / 2) * p.nx() * p.ny(), plane.data(), 0, p.nx() * p.ny());
		return Psfs.normalized(plane);
	}

	/** The snapshots as a hyperstack, one frame each; slice labels name the iteration. */
	static ImagePlus history(final List<PsfSnapshot> snaps, final String title, final Calibration cal) {
		final List<Volume> vols = new ArrayList<>();
		for (final PsfSnapshot s : snaps) vols.add(s.psf());
		final ImagePlus imp = ImageBridge.toImagePlus(new Hyperstack(1, vols.size(), vols), title, cal);
		imp.setOpenAsHyperStack(true);
		final ImageStack st = imp.getStack();
		final int nz = vols.get(0).nz();
		for (int t = 0; t < snaps.size(); t++)
			for (int z = 0; z < nz; z++)
				st.setSliceLabel(label(snaps.get(t).iteration(), z, nz), imp.getStackIndex(1, z + 1, t + 1));
		// open on the last snapshot's brightest plane, displayed from 0 to that plane's peak, so the PSF shows
		final Volume last = vols.get(vols.size() - 1);
		final int[] pk = org.parfocal.psf.Fwhm.peak(last);
		imp.setPosition(1, pk[2] + 1, vols.size());
		imp.setDisplayRange(0, Math.max(Float.MIN_NORMAL, last.get(pk[0], pk[1], pk[2])));
		return imp;
	}

	/** Enlarges a small image's window (PSFs are a few tens of voxels wide) to about 300 pixels. */
	static void zoomSmall(final ImagePlus imp) {
		if (imp.getWindow() == null || imp.getWidth() >= 150) return;
		final int percent = 100 * Math.max(2, Math.min(16, 300 / imp.getWidth()));
		IJ.run(imp, "Set... ", "zoom=" + percent);
	}

	static String label(final int iteration, final int z, final int nz) {
		return (iteration == 0 ? "start (iteration 0)" : "iteration " + iteration) + (nz > 1 ? ", z " + (z + 1) : "");
	}

	/** One row per snapshot. */
	static ResultsTable table(final List<PsfSnapshot> snaps, final String unit) {
		return table(snaps, null, List.of(), unit);
	}

	/**
	 * One row per snapshot; after a model fit also the stage (start, model fit, refinement) and, for the
	 * refinement's snapshots, why its PSF step was kept or undone.
	 */
	static ResultsTable table(final BlindResult r, final String unit) {
		return table(r.snapshots(), r.fit(), r.refinement(), unit);
	}

	private static ResultsTable table(final List<PsfSnapshot> snaps, final org.parfocal.blind.ModelFit.Fit fit, final List<RefineStep> steps,
			final String unit) {
		final ResultsTable rt = new ResultsTable();
		rt.setPrecision(5);
		for (int i = 0; i < snaps.size(); i++) {
			final PsfSnapshot s = snaps.get(i);
			rt.incrementCounter();
			rt.addValue("Iteration", s.iteration());
			if (fit != null) rt.addValue("Stage", i == 0 ? "start" : i == 1 ? "model fit" : "refinement");
			rt.addValue("FWHM lateral (" + unit + ")", s.fwhmLateral());
			rt.addValue("FWHM axial (" + unit + ")", s.fwhmAxial());
			rt.addValue("Distance to start", s.distanceToStart());
			rt.addValue("Sum", s.sum());
			if (fit != null) rt.addValue("PSF step", i == 1 ? fit.summary() : i >= 2 && i - 2 < steps.size() ? steps.get(i - 2).reason() : "");
		}
		return rt;
	}

	/**
	 * Lateral and axial FWHM divided by the start's, and the relative distance ‖h − h₀‖ / ‖h₀‖, per snapshot: flat
	 * curves at the end mean the PSF settled.
	 */
	static Plot plot(final List<PsfSnapshot> snaps, final String title) {
		final int n = snaps.size();
		final double[] it = new double[n], lat = new double[n], ax = new double[n], dist = new double[n];
		final PsfSnapshot s0 = snaps.get(0);
		boolean axial = false;
		for (int i = 0; i < n; i++) {
			final PsfSnapshot s = snaps.get(i);
			it[i] = s.iteration();
			lat[i] = s.fwhmLateral() / s0.fwhmLateral();
			ax[i] = s.fwhmAxial() / s0.fwhmAxial();
			axial |= Double.isFinite(ax[i]);
			dist[i] = s.distanceToStart();
		}
		final Plot plot = new Plot(title, "Outer iteration", "Relative to the starting PSF");
		plot.setLineWidth(2);
		plot.setColor(new Color(20, 110, 160));
		plot.addPoints(it, lat, Plot.CONNECTED_CIRCLES);
		if (axial) {
			plot.setColor(new Color(210, 120, 20));
			plot.addPoints(it, ax, Plot.CONNECTED_CIRCLES);
		}
		plot.setColor(new Color(90, 90, 90));
		plot.addPoints(it, dist, Plot.CONNECTED_CIRCLES);
		plot.setColor(Color.black);
		// headroom above the curves, so the legend in the top-right corner covers no data
		double ymax = 1;
		for (int i = 0; i < n; i++) for (final double v : new double[] { lat[i], ax[i], dist[i] }) if (Double.isFinite(v)) ymax = Math.max(ymax, v);
		plot.setLimits(it[0], Math.max(it[n - 1], it[0] + 1), 0, ymax * (axial ? 1.45 : 1.35));
		plot.addLegend(axial ? "lateral FWHM / start\naxial FWHM / start\ndistance to start" : "lateral FWHM / start\ndistance to start", "top-right");
		return plot;
	}

	private static String guessStart(final String[] titles) {
		final String last = Commands.remembered(PREFS + "start", GAUSSIAN);
		if (FROM_OPTICS.equals(last) || GAUSSIAN.equals(last)) return last;
		for (final String t : titles) if (t.toLowerCase(Locale.ROOT).contains("psf")) return t;
		return GAUSSIAN;
	}
}
