package org.parfocal.beads;

import org.parfocal.fft.RealFft;

/**
 * Sub-voxel translation by the Fourier shift theorem: with X(k) = Σ_n x(n)·exp(−2πi k·n/N), the sequence x(n + s)
 * has the transform X(k)·exp(2πi k·s/N) for any real s, which is exact for band-limited data such as a PSF sampled at
 * or above Nyquist. The translation is circular, so the data should fall to about zero at the box faces (the caller
 * subtracts the background first). Sizes must be odd: then every frequency has a partner of opposite sign and the
 * result is real without a Nyquist term to choose a convention for.
 */
final class FourierShift {

	private FourierShift() {}

	/** New array y with y(n) = x(n + s) (x unchanged), for an nx × ny × nz box with odd sizes. */
	static float[] shift(final float[] x, final int nx, final int ny, final int nz, final double sx, final double sy, final double sz) {
		if (nx % 2 == 0 || ny % 2 == 0 || nz % 2 == 0) throw new IllegalArgumentException("Fourier shift needs odd box sizes, got " + nx + " x " + ny + " x " + nz);
		final RealFft fft = new RealFft(nx, ny, nz);
		final float[] spec = fft.newSpectrum();
		fft.forward(x, spec);
		final int h = nx / 2 + 1;
		for (int kz = 0; kz < nz; kz++) {
			final double fz = (kz <= nz / 2 ? kz : kz - nz) * sz / nz;
			for (int ky = 0; ky < ny; ky++) {
				final double fy = (ky <= ny / 2 ? ky : ky - ny) * sy / ny;
				for (int kx = 0; kx < h; kx++) {
					final double phase = 2 * Math.PI * (kx * sx / nx + fy + fz);
					final double c = Math.cos(phase), s = Math.sin(phase);
					final int i = 2 * (kx + h * (ky + ny * kz));
					final double re = spec[i], im = spec[i + 1];
					spec[i] = (float) (re * c - im * s);
					spec[i + 1] = (float) (re * s + im * c);
				}
			}
		}
		final float[] y = new float[x.length];
		fft.inverse(spec, y);
		return y;
	}
}
