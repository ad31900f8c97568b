package org.parfocal.quality;

import java.util.ArrayList;
import java.util.List;

import org.parfocal.blind.BlindListener;
import org.parfocal.blind.BlindReport;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.EstimateView;

/**
 * Watch mode of a blind deconvolution ({@link org.parfocal.blind.BlindDeconvolution}): every {@code every} outer
 * iterations (and at the last one) the current object is judged against the sharp references
 * ({@link ReferenceComparison#patchDistance}) and, re-blurred with the <em>current</em> PSF estimate, against
 * the recording ({@link ReblurConsistency}); {@link StoppingRule} turns the points into a suggested iteration,
 * exactly as {@link QualityWatch} does for a fixed PSF.
 * <p>
 * Unlike {@link QualityWatch}, the re-blur operator cannot be built once: the PSF changes every iteration, so
 * each evaluation builds the operator of the PSF of that iteration
 * ({@link QualityWatch.Consistency#forDeconvolution}, the same edges, margin and noise model), one PSF transform
 * and one convolution more per evaluation. The χ² therefore asks "do this object and this PSF together explain
 * the data?", the question blind deconvolution answers.
 * <p>
 * With {@code keepBest} the watch keeps copies of the currently suggested object and of the PSF of the same
 * iteration (the rule is a running update, so these are the final suggestion's), instead of a second run.
 * The copies are taken from the views the engine passes; its state is never touched.
 * <p>
 * One watch serves one run; not thread-safe; called on the thread that iterates.
 */
public final class BlindQualityWatch implements BlindListener, WatchedRun {

	/**
	 * The re-blur check without its PSF: the recording as given, the edge handling and the noise model.
	 *
	 * @param offset camera offset the deconvolution subtracts ({@link QualityWatch.Consistency#levels})
	 * @param background background b of the model h∗x + b, as the deconvolution uses it
	 */
	public record Recording(Volume image, boolean periodic, double offset, double background, double photonsPerUnit, double readNoise) {
		public Recording {
			if (image == null) throw new IllegalArgumentException("No recording given");
			new ReblurConsistency.NoiseModel(photonsPerUnit, readNoise, background, offset); // validates, with its one-line messages
		}
	}

	private final ReferenceComparison.References references;
	private final Recording recording;
	private final int every;
	private final boolean keepBest;
	private final VoxelSize voxelSize;
	private final List<StoppingRule.Point> points = new ArrayList<>();
	private final StoppingRule.Tracker tracker = new StoppingRule.Tracker();
	private Volume best, bestPsf;

	/**
	 * @param references prepared for images like the recording, or null (then the distance is NaN)
	 * @param recording the re-blur check, or null (then χ² is NaN)
	 * @param every evaluate after outer iterations every, 2·every, … and after the last one (≥ 1)
	 * @param keepBest keep copies of the suggested object and its PSF ({@link #best}, {@link #bestPsf})
	 * @param voxelSize calibration of the iterates (the recording's)
	 */
	public BlindQualityWatch(final ReferenceComparison.References references, final Recording recording, final int every, final boolean keepBest,
			final VoxelSize voxelSize) {
		if (references == null && recording == null) throw new IllegalArgumentException("Watch mode needs reference images or the recording (or both)");
		if (every < 1 || every > 10_000) throw new IllegalArgumentException("Evaluate every 1 to 10000 iterations, got " + every);
		this.references = references;
		this.recording = recording;
		this.every = every;
		this.keepBest = keepBest;
		this.voxelSize = voxelSize;
	}

	@Override
	public void iterationDone(final BlindReport report, final EstimateView object, final EstimateView psf) {
		final int it = report.iteration();
		if (it % every != 0 && it != report.maxIterations()) return;
		final Volume x = object.toVolume().withVoxelSize(voxelSize);
		final Volume h = recording == null && !keepBest ? null : psf.toVolume().withVoxelSize(voxelSize);
		points.add(evaluate(it, x, h));
		if (tracker.offer(points.get(points.size() - 1)) && keepBest) {
			best = x;
			bestPsf = h;
		}
	}

	/** Evaluates object {@code x} re-blurred with {@code psf} (neither modified; psf may be null without a recording) without recording it. */
	public StoppingRule.Point evaluate(final int iteration, final Volume x, final Volume psf) {
		final double d = references == null ? Double.NaN : ReferenceComparison.patchDistance(references, x);
		double chi = Double.NaN, white = Double.NaN;
		if (recording != null) {
			final QualityWatch.Consistency c = QualityWatch.Consistency.forDeconvolution(recording.image(), psf, recording.periodic(), recording.offset(),
					recording.background(), recording.photonsPerUnit(), recording.readNoise());
			final ReblurConsistency.Result r = ReblurConsistency.evaluate(c.recording(), x, c.operator(), c.model(), c.margin());
			chi = r.meanChiSquare();
			white = r.whiteness();
		}
		return new StoppingRule.Point(iteration, d, chi, white);
	}

	/** The evaluated points, in iteration order. */
	public List<StoppingRule.Point> points() {
		return List.copyOf(points);
	}

	public StoppingRule.Suggestion suggestion() {
		return tracker.suggestion();
	}

	/** A copy of the suggested object (with the recording's calibration), or null without {@code keepBest} or points. */
	public Volume best() {
		return best;
	}

	/** A copy of the PSF estimate of the suggested iteration, or null without {@code keepBest} or points. */
	public Volume bestPsf() {
		return bestPsf;
	}

	/** The noise floor of the patch distance (NaN without references). */
	public double floor() {
		return references == null ? Double.NaN : references.floor()[0];
	}

	public int every() {
		return every;
	}
}
