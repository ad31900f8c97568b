package org.parfocal.quality;

import java.util.ArrayList;
import java.util.List;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Boundary;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.EstimateView;
import org.parfocal.deconv.IterationListener;
import org.parfocal.deconv.IterationReport;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Preprocessing;

/**
 * Watch mode of an iterative deconvolution: every {@code every} iterations (and at the last allowed one) the
 * iterate is judged against the sharp references ({@link ReferenceComparison#patchDistance}, the cheap
 * number) and against the recording ({@link ReblurConsistency}: χ² and whiteness); the points form the
 * curves a user plots, and {@link StoppingRule} turns them into a suggested stopping iteration.
 * <p>
 * With {@code keepBest}, the watch keeps a copy of the currently suggested iterate (the rule is a running
 * update, so this is exactly the final suggestion's iterate): one extra image of 4 bytes per voxel, instead of
 * a second run up to the suggested iteration. The copy is taken from the view the engine passes, so the
 * engine's own state is never touched.
 * <p>
 * One watch serves one run (one volume); it is not thread-safe, and it is called on the thread that iterates.
 */
public final class QualityWatch implements IterationListener, WatchedRun {

	/**
	 * What the re-blur check needs: the recording as given (with its offset), the operator of the PSF on the
	 * recording's grid, the noise model and the margin excluded at the edges.
	 */
	public record Consistency(Volume recording, ConvolutionOperator operator, ReblurConsistency.NoiseModel model, int margin) {

		public Consistency {
			if (recording == null || operator == null || model == null) throw new IllegalArgumentException("No recording, PSF or noise model given");
		}

		/**
		 * The check for a deconvolution of {@code recording} with {@code psf} (negative values clipped, scaled to
		 * unit sum, as the engine does). Beyond the stack edges the object is taken as mirrored ({@code periodic}:
		 * as periodic), and the edge band of half the PSF size (at most what leaves the image non-empty) is left out,
		 * because there the mirrored object is a guess.
		 *
		 * @param offset camera offset o of the data, the level the deconvolution subtracted
		 * @param background background b of the model h∗x + b, as the deconvolution used it
		 */
		public static Consistency forDeconvolution(final Volume recording, final Volume psf, final boolean periodic, final double offset,
				final double background, final double photonsPerUnit, final double readNoise) {
			final Volume h = Psfs.normalized(Psfs.clipNegative(psf, new int[1]));
			final ConvolutionOperator op = ConvolutionOperator.create(h, recording.shape(), periodic ? Boundary.PERIODIC : Boundary.MIRROR);
			int margin = periodic ? 0 : Math.max((h.nx() - 1) / 2, (h.ny() - 1) / 2);
			if (!periodic && recording.is3D()) margin = Math.max(margin, (h.nz() - 1) / 2);
			int room = Math.min(recording.nx(), recording.ny());
			if (recording.is3D()) room = Math.min(room, recording.nz());
			margin = Math.min(margin, (room - 1) / 2);
			return new Consistency(recording, op, new ReblurConsistency.NoiseModel(photonsPerUnit, readNoise, background, offset), margin);
		}

		/**
		 * The offset and background a deconvolution of {@code recording} uses for these levels: the same
		 * estimators in the same order as {@link org.parfocal.deconv.Preprocessing} (offset first; background of
		 * the offset-corrected data clipped at zero).
		 *
		 * @return {offset, background}
		 */
		public static double[] levels(final Volume recording, final Level offset, final Level background) {
			final double o = switch (offset.kind()) {
			case VALUE -> offset.value();
			case ESTIMATED -> Preprocessing.estimateOffset(recording);
			default -> 0;
			};
			final double b = switch (background.kind()) {
			case VALUE -> background.value();
			case BY_PSF -> throw new IllegalArgumentException("background=by-psf needs the PSF: resolve it with Preprocessing.forPsf first");
			case DARK_OR_MEDIAN -> {
				final float[] in = recording.data(), y = new float[in.length];
				for (int i = 0; i < in.length; i++) y[i] = (float) Math.max(0, in[i] - o);
				yield Math.max(Preprocessing.estimateDarkBackground(y, recording.nx(), recording.ny(), recording.nz()), Preprocessing.estimateBackground(y));
			}
			case DARK, FIT, FIT_SMOOTH -> {
				final float[] in = recording.data(), y = new float[in.length];
				for (int i = 0; i < in.length; i++) y[i] = (float) Math.max(0, in[i] - o);
				// FIT: the fit's start; the watch takes the fitted value from each iterate (EstimateView.background)
				yield background.kind() != Level.Kind.DARK ? org.parfocal.deconv.BackgroundFit.start(y, recording.nx(), recording.ny(), recording.nz())
						: Preprocessing.estimateDarkBackground(y, recording.nx(), recording.ny(), recording.nz());
			}
			case ESTIMATED -> {
				final float[] in = recording.data(), y = new float[in.length];
				for (int i = 0; i < in.length; i++) {
					final float v = (float) (in[i] - o);
					y[i] = v > 0 ? v : 0f;
				}
				yield Preprocessing.estimateBackground(y);
			}
			default -> 0;
			};
			return new double[] { o, b };
		}
	}

	private final ReferenceComparison.References references;
	private final Consistency consistency;
	private final int every;
	private final boolean keepBest;
	private final VoxelSize voxelSize;
	private final List<StoppingRule.Point> points = new ArrayList<>();
	private final StoppingRule.Tracker tracker = new StoppingRule.Tracker();
	private Volume best;

	/**
	 * @param references prepared for images like the recording, or null (then the distance is NaN)
	 * @param consistency the re-blur check, or null (then χ² is NaN)
	 * @param every evaluate after iterations every, 2·every, … and after the last allowed iteration (≥ 1)
	 * @param keepBest keep a copy of the suggested iterate ({@link #best})
	 * @param voxelSize calibration of the iterates (the recording's), used to put them on the references' grid
	 */
	public QualityWatch(final ReferenceComparison.References references, final Consistency consistency, final int every, final boolean keepBest,
			final VoxelSize voxelSize) {
		if (references == null && consistency == null) throw new IllegalArgumentException("Watch mode needs reference images or the PSF (or both)");
		if (every < 1 || every > 10_000) throw new IllegalArgumentException("Evaluate every 1 to 10000 iterations, got " + every);
		this.references = references;
		this.consistency = consistency;
		this.every = every;
		this.keepBest = keepBest;
		this.voxelSize = voxelSize;
	}

	@Override
	public void iterationDone(final IterationReport report, final EstimateView estimate) {
		final int it = report.iteration();
		if (it % every != 0 && it != report.maxIterations()) return;
		final Volume x = estimate.toVolume().withVoxelSize(voxelSize);
		final float[] map = estimate.backgroundMap();
		points.add(map != null ? evaluate(it, x, 0, map) : evaluate(it, x, estimate.background()));
		if (tracker.offer(points.get(points.size() - 1)) && keepBest) best = x;
	}

	/** Evaluates one iterate (not modified) without recording it. */
	public StoppingRule.Point evaluate(final int iteration, final Volume x) {
		return evaluate(iteration, x, Double.NaN);
	}

	/**
	 * As {@link #evaluate(int, Volume)}, with the background the engine used for this iterate (a fitted one
	 * changes from iteration to iteration); NaN keeps the consistency model's.
	 */
	public StoppingRule.Point evaluate(final int iteration, final Volume x, final double background) {
		return evaluate(iteration, x, background, null);
	}

	/** As {@link #evaluate(int, Volume, double)}, the background at each voxel also added from {@code backgroundMap} (or null). */
	public StoppingRule.Point evaluate(final int iteration, final Volume x, final double background, final float[] backgroundMap) {
		final double d = references == null ? Double.NaN : ReferenceComparison.patchDistance(references, x);
		double chi = Double.NaN, white = Double.NaN;
		if (consistency != null) {
			final ReblurConsistency.NoiseModel m = consistency.model();
			final ReblurConsistency.NoiseModel model = Double.isFinite(background) && background != m.background()
					? new ReblurConsistency.NoiseModel(m.photonsPerUnit(), m.readNoise(), background, m.offset()) : m;
			final ReblurConsistency.Result r = ReblurConsistency.evaluate(consistency.recording(), x, consistency.operator(), model,
					consistency.margin(), backgroundMap);
			chi = r.meanChiSquare();
			white = r.whiteness();
		}
		return new StoppingRule.Point(iteration, d, chi, white);
	}

	/** The re-blur check of {@code x} (not modified), or an exception when this watch has no PSF. */
	public ReblurConsistency.Result consistency(final Volume x) {
		if (consistency == null) throw new IllegalArgumentException("No PSF given: the re-blur check needs the input and the PSF");
		return ReblurConsistency.evaluate(consistency.recording(), x, consistency.operator(), consistency.model(), consistency.margin());
	}

	/** The evaluated points, in iteration order. */
	public List<StoppingRule.Point> points() {
		return List.copyOf(points);
	}

	public StoppingRule.Suggestion suggestion() {
		return tracker.suggestion();
	}

	/** A copy of the suggested iterate (with the recording's calibration), or null without {@code keepBest} or points. */
	public Volume best() {
		return best;
	}

	/** The noise floor of the patch distance (NaN without references), to read the distance curve by. */
	public double floor() {
		return references == null ? Double.NaN : references.floor()[0];
	}

	public int every() {
		return every;
	}
}
