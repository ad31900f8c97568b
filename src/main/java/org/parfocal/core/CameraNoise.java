package org.parfocal.core;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

/**
 * Camera noise model estimated from a recording: gain g (recorded units per photon) and read noise σ of the
 * Poisson–Gaussian model y = g·Poisson(λ) + N(0, σ²) + o, whose variance is affine in the mean,
 * var(y) = g·(E y − o) + σ² (the photon-transfer relation, common practice; fitted from a single image as
 * Foi, Trimeche, Katkovnik &amp; Egiazarian, "Practical Poissonian–Gaussian noise modeling and fitting for
 * single-image raw-data", IEEE Trans. Image Process. 17(10), 2008, do: local means and local noise variances,
 * grouped by level, a weighted affine fit).
 * <p>
 * Our steps: the noise of each voxel is seen through a fourth difference along each axis,
 * (y₋₂ − 4y₋₁ + 6y₀ − 4y₁ + y₂)/√70 (unit noise gain, blind to cubic signal, so the smooth blurred signal of a
 * microscope barely leaks in); its local level is measured twice, independently of each other and of that noise, off the detail's lines:
 * for binning, the mean of the outer ring of the 5×5×3 box; for the fit, 3·(mean of the 12 edge neighbours) −
 * 2·(mean of the 8 corners) of the 3×3×3 box, exact for quadratic signal (curved structure would otherwise
 * raise the level of dim voxels beside bright ones). Binning by one and reporting the other's mean per bin avoids the regression dilution that binning by a noisy level causes (bins of the
 * read-noise floor would otherwise spread in level at constant variance and flatten the slope). Voxels are put into
 * bins of equal width in level (between its 0.1 % and 99.9 % quantiles; bins of fewer than 200 voxels unused); per bin and axis a robust variance (the variance within ±3 MAD-σ, corrected for
 * the truncation), the smallest over the axes (signal only adds); then var = g·level + c fitted by weighted
 * least squares (weights n/var², the variance of a variance), bins more than 3 standard errors above the fit
 * (structure) dropped and refitted. The read noise follows from the intercept when the offset o is known:
 * σ² = c + g·o − 1/12 (the last term: rounding to integers). That extrapolation to the offset is sensitive to the
 * slope (an error δg moves σ² by δg·o), so the read noise is the rougher of the two figures.
 *
 * @param gain recorded units per photon (photons per unit = 1/gain)
 * @param readNoise read noise σ in recorded units, NaN when no offset was given
 * @param intercept c of var = g·mean + c
 * @param bins bins used in the final fit
 */
public record CameraNoise(double gain, double readNoise, double intercept, int bins) {

	/** Levels are grouped into this many bins of equal count. */
	static final int BINS = 60;
	/** Bins with fewer voxels than this are not used. */
	static final int MIN_PER_BIN = 200;
	/** At most this many voxels are examined (an evenly strided subset of planes of larger stacks). */
	static final long MAX_VOXELS = 1L << 22;
	private static final double TRUNCATION = 0.973344; // variance of a standard normal truncated to ±3
	private static final double NORM = Math.sqrt(70);

	/** Photons per recorded unit, 1/gain (what {@code QualityWatch} takes). */
	public double photonsPerUnit() {
		return 1 / gain;
	}

	/** One line for the Log. */
	public String describe() {
		return String.format(Locale.ROOT, "gain %.4g units per photon (%.4g photons per unit), read noise %s", gain, 1 / gain,
				Double.isNaN(readNoise) ? "unknown (no offset)" : String.format(Locale.ROOT, "%.4g units", readNoise));
	}

	/**
	 * Estimates the noise model of a raw recording (camera values, before any offset subtraction).
	 *
	 * @param offset the camera offset o, or NaN if unknown (then the read noise is NaN)
	 * @throws IllegalArgumentException when the recording is too small or too flat to fit
	 */
	public static CameraNoise estimate(final Volume raw, final double offset) {
		final int nx = raw.nx(), ny = raw.ny(), nz = raw.nz();
		final boolean[] axes = { nx >= 7, ny >= 7, nz >= 7 };
		if (!axes[0] && !axes[1] && !axes[2]) throw new IllegalArgumentException("The image is too small to estimate its noise (at least 7 voxels along one axis)");
		final int planeStep = (int) Math.max(1, Math.ceil((double) nx * ny * nz / MAX_VOXELS));
		final float[] y = raw.data();
		final long plane = (long) nx * ny;
		final int bz = nz >= 3 ? 1 : 0;
		// levels and details of interior voxels (two voxels from every edge along a used axis)
		int count = 0;
		for (int z = 2 * bz; z < nz - 2 * bz; z += planeStep) count += Math.max(0, nx - 4) * Math.max(0, ny - 4);
		if (count < 20 * MIN_PER_BIN) throw new IllegalArgumentException("The image is too small to estimate its noise (" + count + " usable voxels)");
		final float[] level = new float[count], other = new float[count];
		final float[][] detail = new float[3][count];
		int k = 0;
		for (int z = 2 * bz; z < nz - 2 * bz; z += planeStep)
			for (int yy = 2; yy < ny - 2; yy++)
				for (int x = 2; x < nx - 2; x++, k++) {
					final long i = z * plane + (long) yy * nx + x;
					// binning level: the 5×5(×3) box's outer ring; reported level: from the 3×3(×3) box, both off the
					// detail's lines, so the three are independent
					double sr = 0, se = 0, sc = 0;
					int mr = 0, me = 0, mc = 0;
					for (int dz = -bz; dz <= bz; dz++)
						for (int dy = -2; dy <= 2; dy++)
							for (int dx = -2; dx <= 2; dx++) {
								final int zeros = (dx == 0 ? 1 : 0) + (dy == 0 ? 1 : 0) + (dz == 0 ? 1 : 0);
								if (zeros >= 2) continue; // the detail's lines
								final float v = y[(int) (i + dz * plane + dy * nx + dx)];
								if (Math.abs(dx) == 2 || Math.abs(dy) == 2) { sr += v; mr++; }
								else if (zeros == 1 && bz == 1) { se += v; me++; }
								else { sc += v; mc++; }
							}
					level[k] = (float) (sr / mr);
					// 3D: 3·(12 edge neighbours) − 2·(8 corners) is the centre value of any quadratic signal (each axis
					// has squared offset 1 in 8 of 12 edges and in all corners); 2D: the 4 corners
					other[k] = (float) (bz == 1 ? 3 * se / me - 2 * sc / mc : sc / mc);
					detail[0][k] = fourth(y, i, 1);
					detail[1][k] = fourth(y, i, nx);
					detail[2][k] = nz >= 7 && z >= 2 && z < nz - 2 ? fourth(y, i, plane) : Float.NaN;
				}
		// bins of equal width in level between the 0.1 % and 99.9 % quantiles of the levels
		final Integer[] order = new Integer[count];
		for (int i = 0; i < count; i++) order[i] = i;
		Arrays.sort(order, (a, b) -> Float.compare(level[a], level[b]));
		final double lo = level[order[(int) (0.001 * (count - 1))]], hi = level[order[(int) (0.999 * (count - 1))]];
		final double width = (hi - lo) / BINS;
		final List<double[]> pts = new ArrayList<>(); // {mean level, variance, n}
		int start = 0;
		while (start < count && level[order[start]] < lo) start++;
		for (int bin = 0; bin < BINS && width > 0; bin++) {
			final double top = bin == BINS - 1 ? hi : lo + (bin + 1) * width;
			int end = start;
			while (end < count && level[order[end]] <= top) end++;
			if (end - start >= MIN_PER_BIN) {
				double lm = 0;
				for (int j = start; j < end; j++) lm += other[order[j]];
				lm /= end - start;
				double best = Double.POSITIVE_INFINITY;
				for (int a = 0; a < 3; a++) {
					if (!axes[a] || (a == 2 && nz < 7)) continue;
					final float[] d = new float[end - start];
					for (int j = start; j < end; j++) d[j - start] = detail[a][order[j]];
					best = Math.min(best, robustVariance(d));
				}
				if (Double.isFinite(best)) pts.add(new double[] { lm, best, end - start });
			}
			start = end;
		}
		if (pts.size() < 3) throw new IllegalArgumentException("The noise does not grow with the signal here: cannot estimate the camera gain (too flat or too dark an image?)");
		double[] fit = fit(pts, null);
		for (int round = 0; round < 6; round++) {
			final double[] f = fit;
			final List<double[]> keep = new ArrayList<>();
			for (final double[] p : pts) {
				final double model = Math.max(f[0] * p[0] + f[1], 1e-12);
				final double se = model * Math.sqrt(2 / p[2]);
				if (Math.abs(p[1] - model) <= 3 * se) keep.add(p);
			}
			if (keep.size() < 3 || keep.size() == pts.size()) break;
			pts.retainAll(keep);
			fit = fit(pts, f);
		}
		final double g = fit[0];
		if (!(g > 0)) throw new IllegalArgumentException("The noise does not grow with the signal here: cannot estimate the camera gain (too flat or too dark an image?)");
		final double read = Double.isNaN(offset) ? Double.NaN : Math.sqrt(Math.max(0, fit[1] + g * offset - 1.0 / 12));
		return new CameraNoise(g, read, fit[1], pts.size());
	}

	private static float fourth(final float[] y, final long i, final long s) {
		return (float) ((y[(int) (i - 2 * s)] - 4.0 * y[(int) (i - s)] + 6.0 * y[(int) i] - 4.0 * y[(int) (i + s)] + y[(int) (i + 2 * s)]) / NORM);
	}

	/** Variance of the values within ±3 MAD-σ of the high median ({@link RobustStats#highMedianOfSorted}), corrected to a normal's variance. */
	static double robustVariance(final float[] d) {
		final float[] s = d.clone();
		Arrays.sort(s);
		final double med = RobustStats.highMedianOfSorted(s, s.length);
		final float[] dev = new float[s.length];
		for (int i = 0; i < s.length; i++) dev[i] = (float) Math.abs(s[i] - med);
		Arrays.sort(dev);
		final double sigma = RobustStats.MAD_TO_SIGMA * RobustStats.highMedianOfSorted(dev, dev.length);
		final double cut = sigma > 0 ? 3 * sigma : Double.POSITIVE_INFINITY;
		double sum = 0, sum2 = 0;
		int n = 0;
		for (final float v : s)
			if (Math.abs(v - med) <= cut) { sum += v; sum2 += (double) v * v; n++; }
		final double mean = sum / n;
		return (sum2 / n - mean * mean) * n / Math.max(1, n - 1) / (sigma > 0 ? TRUNCATION : 1);
	}

	/** Weighted least squares of var = g·level + c, weights n/var² (from the previous fit, else the data). */
	private static double[] fit(final List<double[]> pts, final double[] prev) {
		double sw = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
		for (final double[] p : pts) {
			final double v = prev == null ? p[1] : Math.max(prev[0] * p[0] + prev[1], 1e-12);
			final double w = p[2] / (v * v);
			sw += w; sx += w * p[0]; sy += w * p[1]; sxx += w * p[0] * p[0]; sxy += w * p[0] * p[1];
		}
		final double det = sw * sxx - sx * sx;
		final double g = (sw * sxy - sx * sy) / det;
		return new double[] { g, (sy - g * sx) / sw };
	}
}
