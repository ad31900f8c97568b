package org.parfocal.deconv;

import org.parfocal.conv.Psfs;
import org.parfocal.core.Boundary;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.fft.FastSizes;
import org.parfocal.fft.RealFft;

/**
 * One-shot Wiener / Tikhonov-regularised inverse filter: X̂ = conj(Ĥ) · Ŷ / (|Ĥ|² + μ), the minimiser of
 * ‖Hx − (y − b)‖² + μ‖x‖² for circular convolution (Tikhonov regularisation; with μ the noise-to-signal power
 * ratio it is the Wiener filter). With a unit-sum PSF |Ĥ(0)| = 1, so μ is relative to the zero-frequency gain.
 * Negative values of the result are set to zero.
 * <p>
 * Edges: periodic works on the image grid; zero pads with zeros to a 5-smooth size ≥ n + k − 1; non-circulant,
 * which has no closed form here, extends the data by mirroring (half-sample symmetric, centred in the padding)
 * so that the implied periodic object has no jumps at the stack edges.
 */
final class WienerFilter {

	private WienerFilter() {}

	static long bytesNeeded(final int[] n, final int[] k, final EdgeMode mode) {
		long p = 1, s = 2;
		for (int d = 0; d < 3; d++) {
			final long pd = mode == EdgeMode.PERIODIC ? n[d] : FastSizes.next(n[d] + k[d] - 1);
			p *= pd;
			s *= d == 0 ? pd / 2 + 1 : pd;
		}
		return 4 * (p + 2 * s);
	}

	/** The filtered image written into {@code out} (image grid); y is not modified. */
	static void apply(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background, final double mu,
			final float[] out) {
		MemoryBudget.require(bytesNeeded(n, psf.shape(), mode), "a Wiener filter of a " + n[0] + " x " + n[1] + " x " + n[2] + " image");
		final int[] k = psf.shape(), p = new int[3];
		for (int d = 0; d < 3; d++) p[d] = mode == EdgeMode.PERIODIC ? n[d] : FastSizes.next(n[d] + k[d] - 1);
		final RealFft fft = new RealFft(p[0], p[1], p[2]);
		final float[] real = new float[fft.realLength()];
		Psfs.place(psf.data(), k, real, p, p[0], new int[3], false); // kernel with its origin at index 0, wrapped
		final float[] hs = fft.newSpectrum(), ys = fft.newSpectrum();
		fft.forward(real, hs);
		// data minus background, extended over the grid
		final int[][] src = new int[3][];
		for (int d = 0; d < 3; d++) {
			src[d] = new int[p[d]];
			final int extra = p[d] - n[d], after = (extra + 1) / 2;
			for (int i = 0; i < p[d]; i++) {
				if (mode == EdgeMode.NON_CIRCULANT) {
					final int q = i < n[d] + after ? i : i - p[d];
					src[d][i] = Boundary.MIRROR.sourceIndex(q, n[d]);
				} else src[d][i] = i < n[d] ? i : -1;
			}
		}
		final float bg = (float) background;
		Parallel.forRange(p[1] * p[2], r -> {
			final int sy = src[1][r % p[1]], sz = src[2][r / p[1]], o = r * p[0];
			for (int i = 0; i < p[0]; i++) {
				final int sx = src[0][i];
				real[o + i] = sx < 0 || sy < 0 || sz < 0 ? 0f : y[sx + n[0] * (sy + n[1] * sz)] - bg;
			}
		});
		fft.forward(real, ys);
		final float m = (float) mu;
		Parallel.forRange(ys.length / 2, j -> {
			final float hr = hs[2 * j], hi = hs[2 * j + 1], yr = ys[2 * j], yi = ys[2 * j + 1];
			final float den = hr * hr + hi * hi + m;
			ys[2 * j] = (hr * yr + hi * yi) / den;
			ys[2 * j + 1] = (hr * yi - hi * yr) / den;
		});
		fft.inverse(ys, real);
		Parallel.forRange(n[1] * n[2], r -> {
			final int o = p[0] * (r % n[1] + p[1] * (r / n[1])), q = r * n[0];
			for (int i = 0; i < n[0]; i++) {
				final float v = real[o + i];
				out[q + i] = v > 0 ? v : 0f;
			}
		});
	}
}
