package org.parfocal.fft;

/**
 * Real DFT of even length n whose half n/2 = 3^a·5^b·2^k suits {@link SplitFft}: the n reals are read as n/2
 * complex values z(j) = x(2j) + i·x(2j + 1), transformed by {@link SplitFft}, and the half spectrum
 * X(k), k = 0 … n/2, follows from X(k) = E(k) − i·W^k·O(k) with E(k) = (Z(k) + conj Z(n/2 − k))/2,
 * O(k) = (Z(k) − conj Z(n/2 − k))/2 and W = exp(−2πi/n) (the standard packing of a real transform into a
 * complex one of half the length, e.g. Press et al., Numerical Recipes, 3rd ed., §12.3). The inverse undoes
 * these steps: E = (X(k) + conj X(n/2 − k))/2, O = i·W^−k·(X(k) − conj X(n/2 − k))/2, Z = E + O.
 * <p>
 * Why by hand: see {@link SplitFft}; JTransforms' real transform of such lengths takes its mixed-radix path,
 * which was a third of the time of a deconvolution iteration at 320 = 2·5·32 (JFR samples); this path took
 * 0.51–0.93 of its time there over several runs (4.7–5.0 vs 5.1–9.6 ns per value, forward + inverse).
 * <p>
 * Rows are in the in-place layout of {@link RealFft}: n reals, or n/2 + 1 complex values (n + 2 floats), at
 * an offset of an array. One instance per thread.
 */
final class SplitRealFft {

	final int n, m;
	private final SplitFft half;
	/** W^k = exp(−2πi k/n), (re, im), k in [0, n/2]. */
	private final float[] w;
	private final float[] line;

	/** A plan for real length n, or null if n/2 does not suit {@link SplitFft}. */
	static SplitRealFft forLength(final int n) {
		if ((n & 1) != 0) return null;
		final SplitFft half = SplitFft.forLength(n / 2);
		return half == null ? null : new SplitRealFft(n, half);
	}

	private SplitRealFft(final int n, final SplitFft half) {
		this.n = n;
		this.m = n / 2;
		this.half = half;
		this.w = new float[2 * (m + 1)];
		for (int k = 0; k <= m; k++) {
			final double a = -2 * Math.PI * k / n;
			w[2 * k] = (float) Math.cos(a);
			w[2 * k + 1] = (float) Math.sin(a);
		}
		this.line = new float[2 * m];
	}

	/** The n reals at {@code o} of {@code a} become the n/2 + 1 complex values of their spectrum there. */
	void forward(final float[] a, final int o) {
		final int[] pos = half.position;
		final float[] z = line;
		for (int j = 0; j < m; j++) {
			final int p = 2 * pos[j];
			z[p] = a[o + 2 * j];
			z[p + 1] = a[o + 2 * j + 1];
		}
		half.forward(z);
		// k and m − k together, from z (Z in natural order) into a
		for (int k = 0; k <= m / 2; k++) {
			final int kk = m - k;
			final float zr = z[2 * (k % m)], zi = z[2 * (k % m) + 1];
			final float cr = z[2 * (kk % m)], ci = -z[2 * (kk % m) + 1]; // conj Z(m − k)
			final float er = 0.5f * (zr + cr), ei = 0.5f * (zi + ci), or = 0.5f * (zr - cr), oi = 0.5f * (zi - ci);
			// X(k) = E − i·W^k·O
			final float wr = w[2 * k], wi = w[2 * k + 1];
			final float pr = wr * or - wi * oi, pi = wr * oi + wi * or;
			final float xr = er + pi, xi = ei - pr;
			// X(m − k) = conj E − i·W^(m−k)·(−conj O) = conj E − i·(conj W^k)·conj O ... written from its own pair
			final float er2 = er, ei2 = -ei, or2 = -or, oi2 = oi; // E(m − k) = conj E(k), O(m − k) = −conj O(k)
			final float w2r = w[2 * kk], w2i = w[2 * kk + 1];
			final float qr = w2r * or2 - w2i * oi2, qi = w2r * oi2 + w2i * or2;
			a[o + 2 * kk] = er2 + qi;
			a[o + 2 * kk + 1] = ei2 - qr;
			a[o + 2 * k] = xr;
			a[o + 2 * k + 1] = xi;
		}
	}

	/** The n/2 + 1 complex values at {@code o} become the n reals of their inverse transform, divided by n. */
	void inverse(final float[] a, final int o) {
		final int[] pos = half.position;
		final float[] z = line;
		for (int k = 0; k <= m / 2; k++) {
			final int kk = m - k;
			final float xr = a[o + 2 * k], xi = a[o + 2 * k + 1], cr = a[o + 2 * kk], ci = -a[o + 2 * kk + 1]; // X(k), conj X(m − k)
			final float er = 0.5f * (xr + cr), ei = 0.5f * (xi + ci);
			final float dr = 0.5f * (xr - cr), di = 0.5f * (xi - ci);
			// O = i·conj(W^k)·D
			final float wr = w[2 * k], wi = -w[2 * k + 1];
			final float tr = wr * dr - wi * di, ti = wr * di + wi * dr;
			final float or = -ti, oi = tr;
			if (k < m) {
				final int p = 2 * pos[k];
				z[p] = er + or;
				z[p + 1] = ei + oi;
			}
			if (kk != k && kk < m) {
				// E(m − k) = conj E(k); D(m − k) = (X(m − k) − conj X(k))/2 = −conj D(k)
				final float e2r = er, e2i = -ei, d2r = -dr, d2i = di;
				final float w2r = w[2 * kk], w2i = -w[2 * kk + 1];
				final float t2r = w2r * d2r - w2i * d2i, t2i = w2r * d2i + w2i * d2r;
				final int p = 2 * pos[kk];
				z[p] = e2r - t2i;
				z[p + 1] = e2i + t2r;
			}
		}
		half.inverse(z, true);
		System.arraycopy(z, 0, a, o, n);
	}
}
