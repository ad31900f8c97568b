package org.parfocal.deconv;

import java.util.Arrays;
import java.util.Locale;

import org.parfocal.core.CameraNoise;
import org.parfocal.core.Monitor;
import org.parfocal.core.PoissonThinning;
import org.parfocal.core.Volume;

/**
 * The held-out stop ({@link Stopping#HELD_OUT}): a stopping point for Richardson–Lucy found from the recording
 * alone, by cross-validation on a Poisson-thinned split (Coakley, "A cross-validation procedure for stopping the
 * EM algorithm and deconvolution of neutron depth profiling spectra", IEEE Trans. Nucl. Sci. 38, 1991, from
 * memory).
 * <p>
 * The prepared data (after offset, in photons by the camera gain) are split by binomial thinning with p = ½
 * ({@link PoissonThinning}, fixed seed) into two independent halves A and B, each a recording of the same scene
 * with half the light. The chosen method runs on A (background b/2, the same regularisation, the cap of
 * iterations); after every iteration the iterate x_k is scored by the Poisson log-likelihood of B,
 * Σ [y_B ln(Hx_k + b/2) − (Hx_k + b/2)] (one more convolution per iteration), which noise fitting cannot raise:
 * it rises while the iterate gains structure both halves share and falls once it fits A's own noise. With
 * {@link #FOLDS} = 2 (not the default) the method also runs on B, scored by A, in lockstep, and the two scores are summed (two-fold
 * cross-validation). The runs stop {@link #PATIENCE} iterations past the best score (or at the cap). The full data then get
 * round({@link #FULL_FACTOR} · k*) iterations of the same method, k* the peak (at least 1, at most the cap).
 * Measured on the independent scenes (README, accelerated RL): the full data's best iterate came later than k* on
 * sparse scenes and earlier on dense ones; factor 1 lost least (mean 0.79 dB, worst 2.03 dB against the best
 * iterate) against 1.25 (0.93 / 2.71) and 1.5 (1.38 / 4.82). Two folds moved k* by at most 3 iterations and no
 * suggestion by more than 0.2 dB, at twice the cost, so one fold is the default.
 * An unequal split ({@link #SPLIT_BITS}: the run's part 1 − 2^−bits of the light) moved the peak later, helping
 * sparse scenes and hurting dense ones (README), so the ½ split stays.
 * <p>
 * Read noise: when the gain and read noise σ are estimated from the recording ({@link CameraNoise}; recordings
 * of integer camera values), σ²/g is added to the data before the split and to the model (the shifted-Poisson
 * approximation of Poisson–Gaussian noise, common practice), so that the halves' noise is closer to independent
 * Poisson noise (read noise itself does not split into independent halves; not measured apart). Other data are taken as photon counts (gain 1), with a note.
 * <p>
 * A peak at the cap (still rising) or at the start (falling from the first iterate) is not an interior peak:
 * {@link Result#interior()} is false and the reason says so; the run then returns the cap's (or the first)
 * iterate, which commands must not present as a choice.
 */
public final class HoldOutStop {

	/** Seed of the split (fixed: the stop is deterministic). */
	public static final long SEED = 0x5eed_14bL;
	/** Iterations past the best held-out score after which the run on half A stops. */
	public static final int PATIENCE = 8;
	/** Folds of the cross-validation: 1, the method runs on A scored by B; 2, also on B scored by A, the scores summed. */
	public static final int FOLDS = 1;
	/** Iterations of the full data per iteration of the half at the held-out peak (measured, README). */
	public static final double FULL_FACTOR = 1.0;
	/** Split of the light: the run's part holds 1 − 2^−bits, the held-out part 2^−bits (1: halves). */
	public static final int SPLIT_BITS = 1;

	private HoldOutStop() {}

	/**
	 * What the split run found.
	 *
	 * @param peak iteration k* of the run on half A with the best held-out score (0: the start)
	 * @param evaluated iterations run on half A
	 * @param cap the cap of iterations
	 * @param heldOut held-out log-likelihood of iterate 0 … evaluated (data units)
	 * @param fullIterations iterations to run on the full data
	 * @param interior false when the peak is at the start or at the cap
	 * @param photonsPerUnit photons per data unit used for the split
	 * @param shift σ²/g added to data and model (data units), 0 without a read-noise estimate
	 * @param reason one line for the Log and the provenance
	 */
	public record Result(int peak, int evaluated, int cap, double[] heldOut, int fullIterations, boolean interior, double photonsPerUnit, double shift,
			String reason) {}

	/**
	 * The held-out stop of a run of {@code options} on {@code image}, without the full-data run (data and PSF
	 * prepared as {@link Deconvolution#run} prepares them, saturated voxels left out).
	 */
	public static Result suggest(final Volume image, final Volume psf, final DeconvolutionOptions options, final Monitor monitor) {
		return suggest(image, psf, options, monitor, FOLDS);
	}

	/** As {@link #suggest(Volume, Volume, DeconvolutionOptions, Monitor)} with 1 or 2 folds (for the scene table's comparison). */
	public static Result suggest(final Volume image, final Volume psf, final DeconvolutionOptions options, final Monitor monitor, final int folds) {
		return suggest(image, psf, options, monitor, folds, SPLIT_BITS);
	}

	/** As above with a split of 1 − 2^−bits / 2^−bits (bits 1: halves; other splits need one fold; for the scene table). */
	public static Result suggest(final Volume image, final Volume psf, final DeconvolutionOptions options, final Monitor monitor, final int folds, final int bits) {
		if (!options.method().isIterative()) throw new IllegalArgumentException("The held-out stop needs an iterative method");
		final int[] n = image.shape();
		final Preprocessing.Psf p = Preprocessing.psf(psf, n);
		final Preprocessing.Data d = Preprocessing.data(image, options.offset(), options.background());
		final Saturation sat = Saturation.detect(image);
		if (sat != null) {
			final float[] in = image.data(), yv = d.y();
			for (int i = 0; i < in.length; i++) if (in[i] == sat.value()) yv[i] = Float.NaN;
		}
		return find(image, p.psf(), n, options, d.y(), d.offset(), d.background(), null, monitor, folds, bits);
	}

	/**
	 * Runs the split and the run on half A.
	 *
	 * @param image the recording as given (for the noise model; not modified)
	 * @param psf the prepared PSF (unit sum)
	 * @param y the prepared data (after offset; NaN voxels are left out), not modified
	 * @param background b of the model, data units
	 */
	static Result find(final Volume image, final Volume psf, final int[] n, final DeconvolutionOptions options, final float[] y, final double offset,
			final double background, final float[] initial, final Monitor monitor) {
		return find(image, psf, n, options, y, offset, background, initial, monitor, FOLDS, SPLIT_BITS);
	}

	/** As above with 1 fold (A scored by B) or 2 (also B scored by A). */
	static Result find(final Volume image, final Volume psf, final int[] n, final DeconvolutionOptions options, final float[] y, final double offset,
			final double background, final float[] initial, final Monitor monitor, final int folds, final int bits) {
		if (folds != 1 && folds != 2) throw new IllegalArgumentException("1 or 2 folds, got " + folds);
		if (folds == 2 && bits != 1) throw new IllegalArgumentException("Two folds need the ½ split");
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		double s = 1, shift = 0;
		String noise = "data taken as photon counts (values not integers: no camera noise model)";
		if (integers(image)) {
			try {
				final CameraNoise cn = CameraNoise.estimate(image, offset);
				s = cn.photonsPerUnit();
				if (cn.readNoise() > 0) shift = cn.readNoise() * cn.readNoise() / cn.gain();
				noise = String.format(Locale.ROOT, "split with %.4g photons per unit%s", s,
						shift > 0 ? String.format(Locale.ROOT, ", read noise as %.3g units of Poisson counts", shift) : "");
			} catch (final IllegalArgumentException e) {
				noise = "data taken as photon counts (noise model not estimated: " + e.getMessage() + ")";
			}
		}
		final float[] shifted = new float[y.length];
		for (int i = 0; i < y.length; i++) shifted[i] = (float) (y[i] + shift);
		final float[][] halves = PoissonThinning.split(shifted, s, SEED, bits);
		// the training part holds p of the light; the held-out part, scaled by p / (1 − p), is scored under the
		// training iterate's model: the same argmax as its own likelihood under (1 − p)/p · (Hx + b p)
		final double p = 1 - Math.pow(2, -bits);
		if (bits > 1) {
			final float scale = (float) (p / (1 - p));
			for (int i = 0; i < halves[1].length; i++) halves[1][i] *= scale;
		}
		final float[] half0 = initial == null ? null : initial.clone();
		if (half0 != null) for (int i = 0; i < half0.length; i++) half0[i] *= p;
		final double bh = (background + shift) * p;
		final int cap = options.iterations();
		final double[] curve = new double[cap + 1];
		int best = 0, done = 0;
		{
			// with two folds, A scored by B and B scored by A in lockstep, the two scores summed
			final RichardsonLucySolver[] run = new RichardsonLucySolver[folds];
			for (int f = 0; f < folds; f++) {
				run[f] = new RichardsonLucySolver(psf, n, options.edges(), halves[f], bh, options.method(), options.regularization(), half0);
				curve[0] += run[f].logLikelihoodOf(halves[1 - f], bh);
			}
			for (int it = 1; it <= cap && it - best <= PATIENCE; it++) {
				mon.checkCancelled();
				mon.progress(it - 1, cap, "Held-out stop: iteration " + it + " on half the photons");
				for (int f = 0; f < folds; f++) {
					run[f].iterate(mon::checkCancelled);
					curve[it] += run[f].logLikelihoodOf(halves[1 - f], bh);
				}
				done = it;
				if (curve[it] > curve[best]) best = it;
			}
		}
		final double[] h = Arrays.copyOf(curve, done + 1);
		final int full = Math.max(1, Math.min(cap, (int) Math.round(FULL_FACTOR * best)));
		final boolean interior = best > 0 && best < done;
		final String where;
		if (best == 0) where = "the held-out likelihood fell from the first iteration on (no interior peak): " + full + " iteration(s) run, the edge of the range, not a choice";
		else if (!interior) where = "the held-out likelihood was still rising at the cap of " + cap + " iterations (no interior peak): the cap's iterate is returned, not a choice";
		else where = String.format(Locale.ROOT, "held-out likelihood peaked at iteration %d of %d on half the photons; %d iteration(s) on the full data", best, done, full);
		return new Result(best, done, cap, h, full, interior, s, shift, "Held-out stop (Coakley 1991): " + where + "; " + noise);
	}

	/** True when every value is a whole number (camera counts). */
	static boolean integers(final Volume image) {
		for (final float v : image.data()) if (v != Math.rint(v)) return false;
		return true;
	}

	/**
	 * Bytes the held-out stop adds to a run: the two halves and the shifted copy, and the second fold's solver (the
	 * two half runs end before the full run's solver is made).
	 */
	static long bytesNeeded(final int[] n, final int[] k, final DeconvolutionOptions o) {
		return 12L * n[0] * n[1] * n[2] + (FOLDS - 1) * RichardsonLucySolver.bytesNeeded(n, k, o.edges(), o.method());
	}
}
