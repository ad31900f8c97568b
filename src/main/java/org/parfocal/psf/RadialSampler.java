package org.parfocal.psf;

/**
 * Maps a radial profile I(r) tabulated at r<sub>j</sub> = j·h onto pixel-area averages. Each pixel's value is
 * the mean over {@code os × os} sub-sample centres of the Catmull–Rom (cubic Keys, a = −½) interpolant of the
 * profile, which is linear in the profile: the weights are computed once and reused for every plane. Only the
 * quadrant x, y ≥ 0 (the octant y ≤ x when the grid is square) is stored; the rest follows by symmetry.
 * <p>
 * Written by hand because the weights are specific to this radial-to-grid resampling.
 */
final class RadialSampler {

	private final int cx, cy;
	private final boolean octant;
	private final int[] start, len, off;
	private final double[] w;

	RadialSampler(final PsfGrid g, final int os, final double h, final int nr) {
		cx = (g.nx() - 1) / 2;
		cy = (g.ny() - 1) / 2;
		octant = g.nx() == g.ny() && g.dx() == g.dy();
		final int count = (cx + 1) * (cy + 1);
		start = new int[count];
		len = new int[count];
		off = new int[count + 1];
		final double[] acc = new double[nr + 4];
		final double inv = 1.0 / ((double) os * os);
		double[] store = new double[Math.max(16, count * 8)];
		int used = 0;
		for (int py = 0; py <= cy; py++)
			for (int px = 0; px <= cx; px++) {
				final int p = px + (cx + 1) * py;
				off[p] = used;
				if (octant && py > px) continue;
				int lo = Integer.MAX_VALUE, hi = -1;
				for (int sy = 0; sy < os; sy++) {
					final double y = (py + (sy + 0.5) / os - 0.5) * g.dy();
					for (int sx = 0; sx < os; sx++) {
						final double x = (px + (sx + 0.5) / os - 0.5) * g.dx();
						final double t = Math.sqrt(x * x + y * y) / h;
						final int j = (int) t;
						final double f = t - j, f2 = f * f, f3 = f2 * f;
						final double wm = 0.5 * (-f3 + 2 * f2 - f), w0 = 0.5 * (3 * f3 - 5 * f2 + 2), w1 = 0.5 * (-3 * f3 + 4 * f2 + f),
								w2 = 0.5 * (f3 - f2);
						// I is even in r: I(−h) = I(h)
						acc[j == 0 ? 1 : j - 1] += wm * inv;
						acc[j] += w0 * inv;
						acc[j + 1] += w1 * inv;
						acc[j + 2] += w2 * inv;
						lo = Math.min(lo, j == 0 ? 0 : j - 1);
						hi = Math.max(hi, j + 2);
					}
				}
				if (hi >= nr) throw new IllegalStateException("radial table too short: " + hi + " >= " + nr);
				final int n = hi - lo + 1;
				if (used + n > store.length) store = java.util.Arrays.copyOf(store, Math.max(store.length * 2, used + n));
				for (int j = lo; j <= hi; j++) {
					store[used + j - lo] = acc[j];
					acc[j] = 0;
				}
				start[p] = lo;
				len[p] = n;
				used += n;
			}
		off[count] = used;
		w = java.util.Arrays.copyOf(store, used);
	}

	/** Pixel value at quadrant offset (px, py) ≥ 0 from the centre. */
	double value(final int px, final int py, final double[] profile) {
		final int p = octant && py > px ? py + (cx + 1) * px : px + (cx + 1) * py;
		double s = 0;
		final int o = off[p], st = start[p];
		for (int i = 0, n = len[p]; i < n; i++) s += w[o + i] * profile[st + i];
		return s;
	}

	/** Writes one plane (nx × ny at {@code base}) from the profile, by symmetry from the stored quadrant. */
	void fill(final double[] profile, final float[] out, final int base, final int nx) {
		for (int py = 0; py <= cy; py++)
			for (int px = 0; px <= cx; px++) {
				final float v = (float) value(px, py, profile);
				out[base + cx + px + nx * (cy + py)] = v;
				out[base + cx - px + nx * (cy + py)] = v;
				out[base + cx + px + nx * (cy - py)] = v;
				out[base + cx - px + nx * (cy - py)] = v;
			}
	}
}
