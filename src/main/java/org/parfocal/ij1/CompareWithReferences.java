package org.parfocal.ij1;

import java.util.List;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.command.CompareRequest;
import org.parfocal.core.Volume;
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
 * the dialog: {@link CompareWithReferencesDialog} (→ {@link CompareRequest}, the one reader of the keys); the images and the record:
 * {@link ComparisonRun}, the run itself {@link org.parfocal.command.CompareRunner}; table and plot: {@link ComparisonTable}.
 */
public class CompareWithReferences implements PlugIn {

	static final String COMMAND = "Compare with Sharp References";
	static final String NONE = CompareRequest.NONE;

	/** The table, the plot (its image carries the provenance), the core report and the χ² (null without input and PSF). */
	public record Output(String tableTitle, ResultsTable table, Plot plot, ReferenceComparison.Report report, ReblurConsistency.Result consistency) {}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.COMPARE, () -> {
			CompareRequest o = CompareWithReferencesDialog.show();
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
	static String calibrationProblem(final CompareRequest o) {
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
	public static Output run(final CompareRequest o) {
		return ComparisonRun.run(o);
	}
}
