package org.parfocal.ij1;

import java.util.List;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.core.Volume;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.PatchOptions;
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
 * ignore_calibration estimate_noise match_resolution}. Loading and calibration of the references: {@link ReferenceImages};
 * the dialog: {@link CompareWithReferencesDialog}; the run: {@link ComparisonRun}; table and plot: {@link ComparisonTable}.
 */
public class CompareWithReferences implements PlugIn {

	static final String COMMAND = "Compare with Sharp References";
	static final String NONE = "none";

	/**
	 * What the dialog decides.
	 *
	 * @param referenceFolder folder whose TIFFs are references ("" for none)
	 * @param openReferences wildcard pattern of open image titles used as references ("" for none)
	 * @param input the blurred recording the result came from, or {@link #NONE}
	 * @param psf the PSF, or {@link #NONE} (χ² needs input and PSF)
	 * @param estimateNoise the χ²'s gain and read noise estimated from the input ({@code estimate_noise}; absent
	 *        from old macro lines: {@code photons} and {@code read_noise}, which stay the fallback)
	 * @param matchResolution the references blurred to the result's expected resolution before the comparison
	 *        ({@code match_resolution}, {@link org.parfocal.quality.MatchedResolution}: the PSF's FWHM / 2, else the
	 *        input's apparent FWHM / 2; absent from old macro lines: references as they are)
	 */
	public record Options(String result, String referenceFolder, String openReferences, String input, String psf, Level offset, Level background,
			double photons, double readNoise, int patchSize, int patches, int bootstrap, long seed, boolean ignoreCalibration, boolean estimateNoise,
			boolean matchResolution) {

		/** Without matched resolution. */
		public Options(final String result, final String referenceFolder, final String openReferences, final String input, final String psf,
				final Level offset, final Level background, final double photons, final double readNoise, final int patchSize, final int patches,
				final int bootstrap, final long seed, final boolean ignoreCalibration, final boolean estimateNoise) {
			this(result, referenceFolder, openReferences, input, psf, offset, background, photons, readNoise, patchSize, patches, bootstrap, seed,
					ignoreCalibration, estimateNoise, false);
		}

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
					+ " seed=" + seed + (ignoreCalibration ? " ignore_calibration" : "") + (estimateNoise ? " estimate_noise" : "")
					+ (matchResolution ? " match_resolution" : "");
		}

		Options withIgnoreCalibration(final boolean ignore) {
			return new Options(result, referenceFolder, openReferences, input, psf, offset, background, photons, readNoise, patchSize, patches, bootstrap, seed,
					ignore, estimateNoise, matchResolution);
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
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.COMPARE, () -> {
			Options o = CompareWithReferencesDialog.show();
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

	/** A reference image with the role it has in provenance. */
	record Reference(ImagePlus image, Volume volume) {}

	/**
	 * The references: the folder's TIFFs (sorted by name), then the open images matching the pattern (in
	 * window order), never the images in {@code exclude} ({@link ReferenceImages}).
	 */
	static List<Reference> references(final String folder, final String pattern, final List<String> exclude) {
		return ReferenceImages.references(folder, pattern, exclude);
	}

	/** A line naming the first image whose calibration is missing while the others have one, or null. */
	static String calibrationProblem(final Options o) {
		return ReferenceImages.calibrationProblem(o);
	}

	/** The same for a result, its references and (may be null) its input. */
	static String calibrationProblem(final ImagePlus result, final List<Reference> refs, final ImagePlus input) {
		return ReferenceImages.calibrationProblem(result, refs, input);
	}

	/** Interactively asks whether to ignore a calibration problem; in a macro throws the one-line error. */
	static boolean askIgnoreCalibration(final String command, final String problem) {
		return ReferenceImages.askIgnoreCalibration(command, problem);
	}

	/** Runs {@code work}; a core message about "Reference N" gets that reference's title added. */
	static <T> T named(final List<Reference> refs, final java.util.function.Supplier<T> work) {
		return ReferenceImages.named(refs, work);
	}

	/** Runs the check on open images (and the reference folder); shows nothing ({@link ComparisonRun}). */
	public static Output run(final Options o) {
		return ComparisonRun.run(o);
	}
}
