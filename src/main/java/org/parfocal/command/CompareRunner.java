package org.parfocal.command;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.quality.MarginalQuantiles;
import org.parfocal.quality.MatchedResolution;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;

/**
 * {@code Compare with Sharp References...}'s run without a front end: the expected resolution with
 * {@code match_resolution}, the distribution check against the references ({@link ReferenceComparison}), the
 * re-blur χ² and whiteness given the input and the PSF ({@link ReblurConsistency}), and the marginal quantile
 * curves. The ImageJ command loads the references, makes the table, the plot and the record from the
 * {@link Outcome}. Threads come from the caller's context. No {@code ij.*}, no AWT.
 */
public final class CompareRunner {

	private CompareRunner() {}

	/**
	 * What a run made.
	 *
	 * @param report the distances, floors, baselines and gaps closed
	 * @param consistency the χ² and whiteness, or null without input and PSF
	 * @param curves the quantile curves of result and references
	 * @param expected the resolution the references were blurred to, or null
	 * @param noiseNotes notes on the χ²'s noise model (for the Log)
	 * @param notes notes for the user and the record's warnings (the expected resolution's, then the references')
	 */
	public record Outcome(ReferenceComparison.Report report, ReblurConsistency.Result consistency, MarginalQuantiles.Curves curves,
			MatchedResolution expected, List<String> noiseNotes, List<String> notes) {}

	/**
	 * Compares {@code result} with {@code references} as {@code request} asks. The request's image names are the
	 * front end's: the volumes are what they name ({@code input} and {@code psf} may be null).
	 *
	 * @throws IllegalArgumentException one line, for input the run cannot take
	 */
	public static Outcome run(final CompareRequest request, final Volume result, final List<Volume> references, final Volume input, final Volume psf,
			final Monitor monitor) {
		if (input != null && !input.sameShape(result))
			throw new IllegalArgumentException("The input (" + input + ") and the result (" + result + ") differ in size: give the recording the result was computed from");
		if (psf != null && input == null) throw new IllegalArgumentException("A PSF was given without the input: the re-blur check needs both");
		final List<String> notes = new ArrayList<>();
		final MatchedResolution expected = expected(request, result, input, psf, notes);
		final ReferenceComparison.Options co = request.comparison().withResolution(expected);
		final ReferenceComparison.References prepared = ReferenceComparison.prepare(references, result, co, monitor);
		final ReferenceComparison.Report report = ReferenceComparison.compare(prepared, result, input, monitor);
		final List<String> noiseNotes = new ArrayList<>();
		ReblurConsistency.Result chi = null;
		if (psf != null) {
			final double[] lv = QualityWatch.Consistency.levels(input, request.offset(), request.background());
			final double[] noise = ChiSquareNoise.of(request.estimateNoise(), request.photons(), request.readNoise(), input, lv[0], noiseNotes);
			chi = new QualityWatch(null, QualityWatch.Consistency.forDeconvolution(input, psf, false, lv[0], lv[1], noise[0], noise[1]), 1, false,
					result.voxelSize()).consistency(result);
		}
		final MarginalQuantiles.Curves curves = MarginalQuantiles.of(prepared, result, 99);
		notes.addAll(report.notes());
		return new Outcome(report, chi, curves, expected, noiseNotes.stream().map(n -> n.replaceFirst("^watch ", "chi-square ")).toList(), notes);
	}

	/**
	 * With {@code match_resolution}: the expected resolution from the PSF, else from the input; without either, a
	 * note and null (references as they are). In voxels when calibrations are ignored.
	 */
	static MatchedResolution expected(final CompareRequest o, final Volume result, final Volume input, final Volume psf, final List<String> notes) {
		if (!o.matchResolution()) return null;
		final boolean calibrated = result.voxelSize().isCalibrated() && !o.ignoreCalibration();
		if (psf != null) return MatchedResolution.expectedFromPsf(psf, calibrated ? result.voxelSize() : VoxelSize.UNCALIBRATED);
		if (input != null) return MatchedResolution.expectedFromInput(input, calibrated);
		notes.add("match_resolution needs the PSF or the blurred input: the references were compared at their own resolution");
		return null;
	}

	/** The record's {@code expected_resolution}: lateral (and axial) FWHM, in µm or voxels. */
	public static String expectedText(final MatchedResolution r, final boolean microns) {
		final String unit = microns ? " µm" : " voxels";
		return String.format(Locale.ROOT, "%.4g%s lateral%s (FWHM)", r.lateral(), unit, Double.isNaN(r.axial()) ? "" : String.format(Locale.ROOT, ", %.4g%s axial", r.axial(), unit));
	}
}
