package org.parfocal.quality;

import java.util.Locale;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.CameraNoise;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;

/**
 * Whether an estimate x explains the recording y it was computed from: re-blur it and compare with the data in
 * units of the expected noise. Under the Poisson–Gaussian model y = Poisson(s·(h∗x + b))/s + N(0, σ²) + o
 * (s photons per intensity unit, b background, σ read noise, o camera offset; {@code Acquisition} simulates it)
 * the standardised residual
 * <pre>
 *   r = (y − o − (h∗x + b)) / √(max(h∗x + b, 0)/s + σ²)
 * </pre>
 * has mean 0 and variance 1 at every voxel when x is the truth (for s = 1 and o = 0 this is
 * (y − (h∗x + b)) / √(h∗x + b + σ²)). Hence the mean χ² = mean r² is ≈ 1 for a consistent estimate, ≫ 1 when
 * x is still too blurred or biased (under-fitting) and &lt; 1 when x has fitted the noise. Residuals of a good
 * estimate are also white: their lag-1 autocorrelation along each axis is ≈ 0, while structure left in the
 * residual (under-fitting) makes it positive and over-sharpening often makes it negative.
 * <p>
 * The variance is floored at {@link #MIN_VARIANCE_PHOTONS}/s² (a fraction of one photon) so that voxels with a
 * zero predicted mean stay finite.
 */
public final class ReblurConsistency {

	/** Smallest variance used, in photons² (times 1/s² in intensity units). */
	public static final double MIN_VARIANCE_PHOTONS = 0.01;

	private ReblurConsistency() {}

	/**
	 * @param photonsPerUnit s, photons per intensity unit (1 when the data are photon counts)
	 * @param readNoise σ, standard deviation of the additive Gaussian noise, in intensity units
	 * @param background b, constant background added to h∗x (it carries shot noise)
	 * @param offset o, camera offset (no noise)
	 */
	public record NoiseModel(double photonsPerUnit, double readNoise, double background, double offset) {
		public NoiseModel {
			if (!(photonsPerUnit > 0) || !Double.isFinite(photonsPerUnit)) throw new IllegalArgumentException("Photons per unit must be positive, got " + photonsPerUnit);
			if (!(readNoise >= 0) || !Double.isFinite(readNoise)) throw new IllegalArgumentException("Read noise must be 0 or more, got " + readNoise);
			if (!Double.isFinite(background)) throw new IllegalArgumentException("Background must be a finite number, got " + background);
			if (!Double.isFinite(offset)) throw new IllegalArgumentException("Offset must be a finite number, got " + offset);
		}

		/**
		 * The model of a camera whose noise was estimated from the recording ({@link CameraNoise}, Foi et al.
		 * 2008): photons per unit 1/g and, as the read noise, the whole variance at zero signal, c + g·o (σ² plus
		 * the 1/12 of rounding to integers, which the recording also carries), so var = g·(h∗x + b) + c + g·o.
		 */
		public static NoiseModel fromCamera(final CameraNoise camera, final double background, final double offset) {
			return new NoiseModel(camera.photonsPerUnit(), Math.sqrt(Math.max(0, camera.intercept() + camera.gain() * offset)), background, offset);
		}

		/** Photon counts with background b and nothing else. */
		public static NoiseModel photonCounts(final double background) {
			return new NoiseModel(1, 0, background, 0);
		}
	}

	/**
	 * @param meanChiSquare mean of r² over the evaluated voxels
	 * @param lag1 lag-1 autocorrelation of r along x, y, z (z NaN for 2D)
	 * @param voxels number of voxels evaluated
	 */
	public record Result(double meanChiSquare, double[] lag1, long voxels) {
		/** Mean lag-1 autocorrelation over the axes the image has. */
		public double whiteness() {
			return Double.isNaN(lag1[2]) ? (lag1[0] + lag1[1]) / 2 : (lag1[0] + lag1[1] + lag1[2]) / 3;
		}

		@Override
		public String toString() {
			return String.format(Locale.ROOT, "mean chi2 %.4f, lag-1 autocorrelation x %.4f y %.4f z %.4f (%d voxels)", meanChiSquare, lag1[0], lag1[1], lag1[2], voxels);
		}
	}

	/**
	 * Evaluates estimate {@code x} against recording {@code y} (neither modified).
	 *
	 * @param h the convolution operator used by the deconvolution (its PSF and boundary), for images of y's shape
	 * @param margin voxels excluded at each edge (x, y; and z for 3D), e.g. where the boundary model is unsure
	 */
	public static Result evaluate(final Volume y, final Volume x, final ConvolutionOperator h, final NoiseModel model, final int margin) {
		return evaluate(y, x, h, model, margin, null);
	}

	/**
	 * As {@link #evaluate(Volume, Volume, ConvolutionOperator, NoiseModel, int)} with a background that varies
	 * over the image: {@code backgroundMap} (y's shape, x fastest) is added to the model's constant background
	 * (null: none), as for a slowly varying background fitted with the object.
	 */
	public static Result evaluate(final Volume y, final Volume x, final ConvolutionOperator h, final NoiseModel model, final int margin,
			final float[] backgroundMap) {
		if (backgroundMap != null && backgroundMap.length != y.data().length)
			throw new IllegalArgumentException("The background map has " + backgroundMap.length + " values, the recording " + y.data().length);
		if (!y.sameShape(x))
			throw new IllegalArgumentException("The estimate (" + shape(x) + ") and the recording (" + shape(y) + ") differ in size");
		final int[] n = h.imageShape();
		if (n[0] != y.nx() || n[1] != y.ny() || n[2] != y.nz())
			throw new IllegalArgumentException("The PSF operator was made for " + n[0] + " x " + n[1] + " x " + n[2] + " images, the recording is " + shape(y));
		if (margin < 0) throw new IllegalArgumentException("Margin must be 0 or more, got " + margin);
		final int mz = y.is3D() ? margin : 0;
		if (2 * margin >= y.nx() || 2 * margin >= y.ny() || 2 * mz >= y.nz())
			throw new IllegalArgumentException("A margin of " + margin + " voxels leaves nothing of a " + shape(y) + " image");
		for (final Volume v : new Volume[] { y, x }) {
			final int bad = v.firstNonFinite();
			if (bad >= 0) throw new IllegalArgumentException((v == y ? "The recording" : "The estimate") + " has a non-finite value (" + v.data()[bad] + ") at " + v.position(bad));
		}
		final float[] m = h.apply(x).data(), yd = y.data();
		final double s = model.photonsPerUnit(), s2 = model.readNoise() * model.readNoise(), b = model.background(), o = model.offset();
		final double minVar = MIN_VARIANCE_PHOTONS / (s * s);
		final float[] r = new float[yd.length];
		Parallel.forRange(yd.length, i -> {
			final double mean = m[i] + b + (backgroundMap == null ? 0 : backgroundMap[i]);
			final double var = Math.max(Math.max(mean, 0) / s + s2, minVar);
			r[i] = (float) ((yd[i] - o - mean) / Math.sqrt(var));
		});
		final int nx = y.nx(), ny = y.ny(), nz = y.nz();
		final int x0 = margin, x1 = nx - margin, y0 = margin, y1 = ny - margin, z0 = mz, z1 = nz - mz;
		final long count = (long) (x1 - x0) * (y1 - y0) * (z1 - z0);
		// Sums over the inner region, one row per term so that Parallel.sum's fixed blocks make them thread-count invariant.
		final int rows = (y1 - y0) * (z1 - z0);
		final java.util.function.IntFunction<Integer> rowStart = k -> x0 + nx * ((y0 + k % (y1 - y0)) + ny * (z0 + k / (y1 - y0)));
		final double sum = Parallel.sum(rows, k -> {
			final int st = rowStart.apply(k);
			double a = 0;
			for (int i = st; i < st + x1 - x0; i++) a += r[i];
			return a;
		});
		final double mean = sum / count;
		final double sumSq = Parallel.sum(rows, k -> {
			final int st = rowStart.apply(k);
			double a = 0;
			for (int i = st; i < st + x1 - x0; i++) a += (double) r[i] * r[i];
			return a;
		});
		final double var = sumSq / count - mean * mean;
		final int[] stride = { 1, nx, nx * ny };
		final int[] ext = { x1 - x0, y1 - y0, z1 - z0 };
		final double[] lag = new double[3];
		for (int d = 0; d < 3; d++) {
			if (d == 2 && nz == 1 || ext[d] < 2) {
				lag[d] = Double.NaN;
				continue;
			}
			final int sd = stride[d], dd = d;
			final double cov = Parallel.sum(rows, k -> {
				final int yy = y0 + k % (y1 - y0), zz = z0 + k / (y1 - y0);
				if (dd == 1 && yy == y1 - 1 || dd == 2 && zz == z1 - 1) return 0;
				final int st = rowStart.apply(k), end = st + x1 - x0 - (dd == 0 ? 1 : 0);
				double a = 0;
				for (int i = st; i < end; i++) a += (r[i] - mean) * (r[i + sd] - mean);
				return a;
			});
			final long pairs = count / ext[d] * (ext[d] - 1);
			lag[d] = cov / pairs / var;
		}
		return new Result(sumSq / count, lag, count);
	}

	private static String shape(final Volume v) {
		return v.nx() + " x " + v.ny() + (v.is3D() ? " x " + v.nz() : "");
	}
}
