package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.Plot;
import ij.measure.Calibration;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.blind.BlindDeconvolution;
import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.BlindResult;
import org.parfocal.blind.FitPlan;
import org.parfocal.blind.PsfSnapshot;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.quality.BlindQualityWatch;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.quality.StoppingRule;

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
 * <p>
 * The parts: {@link BlindDeconvolveOptions} (what the dialogs decide, the recorded line), {@link BlindDeconvolveDialog}
 * (the dialogs), {@link BlindStartPsf} (the core options: starting PSF, support box, optics) and {@link BlindOutputs}
 * (history, table, plot, provenance).
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
	static final List<String> ESTIMATES = List.of(FREE_FORM, MODEL_FIT, MODEL_FIT_REFINED, WIDEFIELD_FIT, WIDEFIELD_FIT_REFINED);
	/** Units of the support box. */
	public static final String VOXELS = "voxels", MICRONS = "microns";
	static final String PREFS = "parfocal.blind.";

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
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.BLIND_DECONVOLVE, () -> {
			BlindDeconvolveOptions o = BlindDeconvolveDialog.show();
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
			BlindOutputs.zoomSmall(out.history());
			out.psf().show();
			BlindOutputs.zoomSmall(out.psf());
			FirstView.forPerson(out.image());
			out.image().show(); // last, so that it is the current image for the next macro line
		});
	}

	/** Runs the blind deconvolution; returns the new images, table and plot (not shown). */
	public static Output run(final BlindDeconvolveOptions o) {
		final long t0 = System.nanoTime();
		final ImagePlus imp = Commands.image(o.image(), "image");
		if (imp.getNChannels() > 1 || imp.getNFrames() > 1)
			throw new IllegalArgumentException("'" + imp.getTitle() + "' has " + imp.getNChannels() + " channels and " + imp.getNFrames()
					+ " frames; blind deconvolution takes one of each: pick one with Image > Duplicate...");
		final Volume image = ImageBridge.toVolume(imp, "The image");
		final ImagePlus psfImp = FROM_OPTICS.equals(o.psf()) || GAUSSIAN.equals(o.psf()) ? null : Commands.image(o.psf(), "starting PSF");
		final List<String> notes = new ArrayList<>();
		final BlindOptions options = BlindStartPsf.blindOptions(o, image, psfImp, notes);
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
		final ImagePlus history = BlindOutputs.history(r.snapshots(), WindowManager.makeUniqueName(base + "-blind-psf-history.tif"), cal);
		final String unit = cal != null && cal.scaled() ? cal.getUnits() : "voxels";
		final ResultsTable table = BlindOutputs.table(r, unit);
		Tables.attach(history, table); // kept with the history, saved in its TIFF
		final Plot plot = BlindOutputs.plot(r.snapshots(), "PSF convergence of " + base);

		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final var prov = BlindOutputs.provenance(o, imp, psfImp, image.nz() > 1, r, watch, refs, notes);
		final PsfSnapshot last = r.snapshots().get(r.snapshots().size() - 1);
		ImageProvenance.attach(out, prov.run("output", "deblurred image"), t0);
		ImageProvenance.attach(psf, prov.run("output", "final PSF"), t0);
		ImageProvenance.attach(history, prov.run("output", "PSF history, one frame per snapshot"), t0);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s, PSF FWHM %s%s %s", o.iterations(), (System.nanoTime() - t0) / 1e9,
				fmt(last.fwhmLateral()), image.nz() > 1 ? " x " + fmt(last.fwhmAxial()) : "", unit));
		final Plot quality = watch == null ? null : DeconvolvePlots.quality(List.of(watch), out.getTitle(), "Outer iteration", "chi-square (current PSF)");
		return new Output(out, psf, history, table, plot, r, quality, watch);
	}

	/**
	 * The watch for this run: references prepared for the image (none: distance not evaluated), and the re-blur
	 * check with the offset and background the engine will use (the same estimators, {@link QualityWatch.Consistency#levels});
	 * notes about the noise model ({@code estimate_noise}) go to {@code notes}.
	 */
	static BlindQualityWatch watch(final Deconvolve.Watch w, final Volume image, final BlindOptions options, final List<CompareWithReferences.Reference> refs,
			final org.parfocal.core.Monitor monitor, final List<String> notes) {
		final ReferenceComparison.References prepared = refs.isEmpty() ? null
				: CompareWithReferences.named(refs, () -> ReferenceComparison.prepare(refs.stream().map(CompareWithReferences.Reference::volume).toList(), image,
						ReferenceComparison.Options.defaults().withIgnoreCalibration(w.ignoreCalibration())
								.withResolution(WatchFacts.expected(w, image, null, notes)), monitor));
		final double[] lv = QualityWatch.Consistency.levels(image, options.offset(), options.background());
		final double[] noise = w.noise(image, lv[0], notes);
		final BlindQualityWatch.Recording rec = new BlindQualityWatch.Recording(image, options.edges() == EdgeMode.PERIODIC, lv[0], lv[1], noise[0],
				noise[1]);
		return new BlindQualityWatch(prepared, rec, w.every(), w.stopAtSuggestion(), image.voxelSize());
	}

	private static String fmt(final double v) {
		return Double.isFinite(v) ? org.parfocal.deconv.PsfPreparation.fmt(v) : "n/a";
	}
}
