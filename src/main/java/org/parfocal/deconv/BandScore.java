package org.parfocal.deconv;

import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.fft.RealFft;

/**
 * The held-out stop's band criterion ({@link HoldOutStop.Criterion#BAND}): how far an iterate of the run on one
 * part of a thinned recording is from the object, within the band the optics pass, estimated with the other part.
 * <p>
 * With r = H x_k + b_A − n_B on the image window (n_B the held-out part, independent of the part A the iterate was
 * made from, with the same mean), the score is C(k) = Σ_f W(f) |R(f)|², R the discrete Fourier transform of r on
 * the image grid and W(f) = 1/|H(f)|² where |H(f)| > {@link #THRESHOLD}, 0 elsewhere (H the PSF's transfer
 * function on that grid). Because n_B is independent of A, E C(k) is Σ_f W(f) |F[H x_k + b_A − E n_A](f)|² plus a
 * term that does not depend on k: up to a constant, an unbiased estimate of the error of the iterate itself,
 * H⁻¹ applied within the band (the argument of hold-out validation, e.g. Hastie, Tibshirani &amp; Friedman, The
 * Elements of Statistical Learning, 2nd ed., 2009, ch. 7, from memory). The held-out likelihood is the Poisson
 * form of W = 1: the error of the prediction of new data, which keeps falling after the object's error has turned.
 * The threshold and the weight were chosen on the independent scenes with {@code tools/scenes/split_criteria.py}
 * and measured again in the Java scene table (README).
 * <p>
 * The transfer function on the image grid is the transform of the PSF wrapped onto that grid (periodic summation:
 * the PSF's spectrum sampled at the image's frequencies); only its modulus is used, so the PSF's centre does not
 * matter. Saturated voxels (NaN in the held-out part) contribute a residual of 0.
 * <p>
 * <b>Memory</b>: the weight (h·ny·nz floats, h = nx/2 + 1), a residual (n) and a spectrum (2·h·ny·nz).
 */
final class BandScore {

	/** |H| below which a frequency is left out (outside the band the optics pass; measured, README). */
	static final double THRESHOLD = 0.03;

	private final int[] n;
	private final RealFft fft;
	/** W(f) per half-spectrum value, doubled where the other half of the spectrum holds its conjugate. */
	private final float[] weight;
	private final float[] residual, spectrum;

	/** @param psf the prepared PSF (unit sum), any size; {@code n} the image's shape */
	BandScore(final Volume psf, final int[] n) {
		this.n = n.clone();
		fft = new RealFft(n[0], n[1], n[2]);
		final int[] k = psf.shape();
		final float[] wrapped = new float[n[0] * n[1] * n[2]];
		final float[] pd = psf.data();
		for (int z = 0; z < k[2]; z++)
			for (int y = 0; y < k[1]; y++)
				for (int x = 0; x < k[0]; x++)
					wrapped[x % n[0] + n[0] * (y % n[1] + n[1] * (z % n[2]))] += pd[x + k[0] * (y + k[1] * z)];
		spectrum = fft.newSpectrum();
		fft.forward(wrapped, spectrum);
		final int h = n[0] / 2 + 1;
		weight = new float[h * n[1] * n[2]];
		final double t2 = THRESHOLD * THRESHOLD;
		for (int i = 0; i < weight.length; i++) {
			final double re = spectrum[2 * i], im = spectrum[2 * i + 1], m2 = re * re + im * im;
			final int kx = i % h;
			final int twice = kx == 0 || 2 * kx == n[0] ? 1 : 2;
			weight[i] = m2 > t2 ? (float) (twice / m2) : 0f;
		}
		residual = wrapped;
	}

	/** Bytes a score allocates for an image of shape n. */
	static long bytesNeeded(final int[] n) {
		final long h = n[0] / 2 + 1, plane = (long) n[1] * n[2];
		return 4L * (h * plane + (long) n[0] * plane + 2 * h * plane);
	}

	/**
	 * C = Σ_f W(f) |F[model + background − heldOut](f)|² (data units squared; lower is closer to the object).
	 *
	 * @param model H x on the image window, without background
	 * @param heldOut the held-out part (NaN voxels left out)
	 */
	double score(final float[] model, final double background, final float[] heldOut) {
		final int len = n[0] * n[1] * n[2];
		if (model.length != len || heldOut.length != len) throw new IllegalArgumentException("Arrays do not match the image");
		final float b = (float) background;
		final int rows = n[1] * n[2], nx = n[0];
		Parallel.forRange(rows, r -> {
			for (int i = r * nx, e = i + nx; i < e; i++) {
				final float v = heldOut[i];
				residual[i] = v == v ? model[i] + b - v : 0f;
			}
		});
		fft.forward(residual, spectrum);
		return Parallel.sum(weight.length, i -> {
			final double re = spectrum[2 * i], im = spectrum[2 * i + 1];
			return weight[i] * (re * re + im * im);
		});
	}
}
