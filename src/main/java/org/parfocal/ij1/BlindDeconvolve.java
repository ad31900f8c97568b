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
import org.parfocal.command.BlindRequest;
import org.parfocal.command.BlindRunner;
import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.BlindResult;
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
 * This class only translates: dialogs or macro options → {@link BlindRequest} (the one reader of the keys and the
 * recorded line; {@link BlindDeconvolveDialog} shows the dialogs), images ↔ volumes, the references of watch mode,
 * and the outputs with their record ({@link BlindOutputs}: history, table, plot, provenance); {@link BlindRunner}
 * runs it (starting PSF, support box, band-limit optics, {@link BlindDeconvolution}).
 */
public class BlindDeconvolve implements PlugIn {

	static final String COMMAND = "Blind Deconvolve";
	/** Starting-PSF choices besides the open images ({@link BlindRequest}'s). */
	public static final String FROM_OPTICS = BlindRequest.FROM_OPTICS, GAUSSIAN = BlindRequest.GAUSSIAN;
	/** Values of {@code estimate=} ({@link BlindRequest#ESTIMATES}). */
	public static final String FREE_FORM = BlindRequest.FREE_FORM, MODEL_FIT = BlindRequest.MODEL_FIT, MODEL_FIT_REFINED = BlindRequest.MODEL_FIT_REFINED,
			WIDEFIELD_FIT = BlindRequest.WIDEFIELD_FIT, WIDEFIELD_FIT_REFINED = BlindRequest.WIDEFIELD_FIT_REFINED;
	static final List<String> ESTIMATES = BlindRequest.ESTIMATES;
	/** Units of the support box. */
	public static final String VOXELS = BlindRequest.VOXELS, MICRONS = BlindRequest.MICRONS;
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
			BlindRequest o = BlindDeconvolveDialog.show();
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

	/** Runs the blind deconvolution ({@link BlindRunner}); returns the new images, table and plot (not shown). */
	public static Output run(final BlindRequest o) {
		final long t0 = System.nanoTime();
		final ImagePlus imp = Commands.image(o.image(), "image");
		if (imp.getNChannels() > 1 || imp.getNFrames() > 1)
			throw new IllegalArgumentException("'" + imp.getTitle() + "' has " + imp.getNChannels() + " channels and " + imp.getNFrames()
					+ " frames; blind deconvolution takes one of each: pick one with Image > Duplicate...");
		final Volume image = ImageBridge.toVolume(imp, "The image");
		final ImagePlus psfImp = FROM_OPTICS.equals(o.psf()) || GAUSSIAN.equals(o.psf()) ? null : Commands.image(o.psf(), "starting PSF");
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final Deconvolve.Watch w = o.watch() == null ? null : Deconvolve.Watch.of(o.watch());
		final List<List<CompareWithReferences.Reference>> refs = new ArrayList<>(List.of(List.of()));
		final BlindRunner.WatchMaker maker = w == null ? null : (options, notes) -> {
			refs.set(0, CompareWithReferences.references(w.referenceFolder(), w.openReferences(), List.of(o.image(), o.psf())));
			if (!w.ignoreCalibration()) {
				final String problem = CompareWithReferences.calibrationProblem(imp, refs.get(0), null);
				if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
			}
			return watch(w, image, options, refs.get(0), monitor, notes);
		};
		final BlindRunner.Outcome run = Commands.withImageJThreads(() -> BlindRunner.run(o, image, psfImp == null ? null : ImageBridge.toCore(psfImp),
				psfImp == null ? null : psfImp.getTitle(), maker, monitor));
		final BlindResult r = run.result();

		final String base = ConvolveWithPsf.stripExtension(imp.getTitle());
		final Calibration cal = imp.getCalibration();
		final ImagePlus out = ImageBridge.toImagePlus(Hyperstack.of(run.object()), WindowManager.makeUniqueName(base + "-blind.tif"), cal);
		final ImagePlus psf = ImageBridge.toImagePlus(Hyperstack.of(run.psf()), WindowManager.makeUniqueName(base + "-blind-psf.tif"), cal);
		final ImagePlus history = BlindOutputs.history(r.snapshots(), WindowManager.makeUniqueName(base + "-blind-psf-history.tif"), cal);
		final String unit = cal != null && cal.scaled() ? cal.getUnits() : "voxels";
		final ResultsTable table = BlindOutputs.table(r, unit);
		Tables.attach(history, table); // kept with the history, saved in its TIFF
		final Plot plot = BlindOutputs.plot(r.snapshots(), "PSF convergence of " + base);

		for (final String note : run.notes()) IJ.log(COMMAND + ": " + note);
		final var prov = BlindOutputs.provenance(o, imp, psfImp, run, w, refs.get(0));
		final PsfSnapshot last = r.snapshots().get(r.snapshots().size() - 1);
		ImageProvenance.attach(out, prov.run("output", "deblurred image"), t0);
		ImageProvenance.attach(psf, prov.run("output", "final PSF"), t0);
		ImageProvenance.attach(history, prov.run("output", "PSF history, one frame per snapshot"), t0);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s, PSF FWHM %s%s %s", o.iterations(), (System.nanoTime() - t0) / 1e9,
				fmt(last.fwhmLateral()), image.nz() > 1 ? " x " + fmt(last.fwhmAxial()) : "", unit));
		final Plot quality = run.watch() == null ? null : DeconvolvePlots.quality(List.of(run.watch()), out.getTitle(), "Outer iteration", "chi-square (current PSF)");
		return new Output(out, psf, history, table, plot, r, quality, run.watch());
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
