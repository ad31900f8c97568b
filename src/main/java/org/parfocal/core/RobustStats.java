package org.parfocal.core;

import java.util.Arrays;

import org.apache.commons.math3.stat.descriptive.rank.Median;

/**
 * The robust statistics of Parfocal in one place: medians, the median absolute deviation (MAD), the modified
 * z-score of Iglewicz &amp; Hoaglin ("How to Detect and Handle Outliers", ASQC 1993): z = 0.6745·(x − median)/MAD,
 * so that z is a standard normal score for Gaussian data, the half-sample mode, and percentiles with NumPy's
 * default definition. The median is the middle order statistic, the mean of the two middle ones for an even
 * count (Commons Math's {@link Median}).
 * <p>
 * Commons Math's {@link Median} serves the short {@code double[]} samples (bead fluxes and widths). Written by
 * hand for {@code float[]}: the stacks' samples (up to ~4 M voxels) would need a {@code double[]} copy (twice the
 * memory) for Commons Math, which has no {@code float} API and no partial selection on a given array; a
 * selection on a float copy keeps the percentile of a 64 × 256 × 256 stack at a few tens of milliseconds.
 */
public final class RobustStats {

	/** MAD × 1.4826 estimates the standard deviation of Gaussian data (1/Φ⁻¹(3/4)). */
	public static final double MAD_TO_SIGMA = 1.4826;

	private RobustStats() {}

	/** Median of the finite values (NaN if none); {@code a} is not changed. */
	public static double median(final double[] a) {
		return new Median().evaluate(Arrays.stream(a).filter(Double::isFinite).toArray());
	}

	/** Median of the first {@code n} values of a float array (NaN if n = 0); the array is not changed. */
	public static double median(final float[] a, final int n) {
		if (n == 0) return Double.NaN;
		final float[] s = Arrays.copyOf(a, n);
		final int m = n / 2;
		final float upper = select(s, m);
		if (n % 2 == 1) return upper;
		float lower = Float.NEGATIVE_INFINITY; // after select, s[0..m) holds the values ≤ s[m]: the next one down is their maximum
		for (int i = 0; i < m; i++) lower = Math.max(lower, s[i]);
		return 0.5 * ((double) lower + upper);
	}

	/** Median of the first {@code n} values of an ascending array (NaN if n = 0). */
	public static double medianOfSorted(final float[] sorted, final int n) {
		if (n == 0) return Double.NaN;
		return n % 2 == 1 ? sorted[n / 2] : 0.5 * ((double) sorted[n / 2 - 1] + sorted[n / 2]);
	}

	/**
	 * The high median of the first {@code n} values of an ascending array: sorted[n / 2], the larger middle value for
	 * an even count (Python's {@code statistics.median_high}); NaN if n = 0. Always one of the values: on
	 * integer-valued recordings {@link CameraNoise} keeps it: with the mean of the two middle values instead, the
	 * gain estimated for {@code ReblurConsistencyTest}'s camera (true gain 2.5) fell to 2.08 and its χ² rose to 1.051,
	 * outside that test's 5 %.
	 */
	public static double highMedianOfSorted(final float[] sorted, final int n) {
		return n == 0 ? Double.NaN : sorted[n / 2];
	}

	/** Median absolute deviation from {@code median}. */
	public static double mad(final double[] a, final double median) {
		final double[] d = new double[a.length];
		for (int i = 0; i < a.length; i++) d[i] = Math.abs(a[i] - median);
		return median(d);
	}

	/**
	 * Modified z-scores of the finite values (NaN elsewhere), with the MAD floored at {@code floor} × |median|. Without
	 * the floor, beads that agree to a fraction of a percent (as good beads do) would be "outliers" for differences no one
	 * cares about; with floor 0.02 and a limit of 3.5 a value must differ from the median by at least ~10 % to be one.
	 * When the MAD (and the floor) is 0, the mean absolute deviation × 1.2533 stands in (Iglewicz &amp; Hoaglin's
	 * fallback); when that is 0 too, all scores are 0.
	 */
	public static double[] modifiedZ(final double[] a, final double floor) {
		final double med = median(a);
		final double mad = Math.max(mad(a, med), floor * Math.abs(med));
		double scale = 0.6745 / mad;
		if (!(mad > 0)) {
			double sum = 0;
			int n = 0;
			for (final double v : a)
				if (Double.isFinite(v)) {
					sum += Math.abs(v - med);
					n++;
				}
			final double meanAd = n == 0 ? 0 : sum / n;
			scale = meanAd > 0 ? 1 / (1.2533 * meanAd) : 0;
		}
		final double[] z = new double[a.length];
		for (int i = 0; i < a.length; i++) z[i] = Double.isFinite(a[i]) ? (a[i] - med) * scale : Double.NaN;
		return z;
	}

	/**
	 * Half-sample mode of the first {@code n} values (Bickel &amp; Frühwirth, "On a fast, robust estimator of the mode",
	 * Comput. Stat. Data Anal. 50, 2006): repeatedly keep the half of the sorted sample with the smallest range. The
	 * background of a bead stack is its most frequent level, which the wings of many beads shift far less than the median.
	 */
	public static double halfSampleMode(final float[] a, final int n) {
		final float[] s = Arrays.copyOf(a, n);
		Arrays.sort(s);
		int lo = 0, len = n;
		while (len > 3) {
			final int half = (len + 1) / 2;
			int best = lo;
			float width = Float.POSITIVE_INFINITY;
			for (int i = lo; i + half - 1 < lo + len; i++) {
				final float w = s[i + half - 1] - s[i];
				if (w < width) {
					width = w;
					best = i;
				}
			}
			lo = best;
			len = half;
		}
		if (len == 3) {
			final float l = s[lo + 1] - s[lo], r = s[lo + 2] - s[lo + 1];
			return l < r ? 0.5 * ((double) s[lo] + s[lo + 1]) : l > r ? 0.5 * ((double) s[lo + 1] + s[lo + 2]) : s[lo + 1];
		}
		return len == 2 ? 0.5 * ((double) s[lo] + s[lo + 1]) : s[lo];
	}

	/**
	 * Percentiles {@code q} (in [0, 100]) of {@code values} (not modified), with NumPy's default definition
	 * ({@code numpy.percentile(x, q)}, method "linear"): with the values sorted as x₀ ≤ … ≤ x_{n−1} and
	 * h = (n − 1)·q/100, the result is x_⌊h⌋ + (h − ⌊h⌋)·(x_{⌊h⌋+1} − x_⌊h⌋).
	 *
	 * @throws IllegalArgumentException for no values, a non-finite value or q outside [0, 100]
	 */
	public static double[] percentiles(final float[] values, final double... q) {
		final int n = values.length;
		if (n == 0) throw new IllegalArgumentException("No values to take percentiles of");
		for (final double p : q)
			if (!(p >= 0 && p <= 100)) throw new IllegalArgumentException("Percentiles must lie in [0, 100], got " + p);
		for (int i = 0; i < n; i++)
			if (!Float.isFinite(values[i])) throw new IllegalArgumentException("Non-finite value " + values[i] + " at index " + i);
		final float[] a = values.clone();
		final double[] out = new double[q.length];
		for (int k = 0; k < q.length; k++) {
			final double h = (n - 1) * q[k] / 100.0;
			final int lo = (int) Math.floor(h);
			final double lower = select(a, lo);
			if (lo + 1 >= n || h == lo) {
				out[k] = lower;
				continue;
			}
			// After select(a, lo), a[lo+1..] holds the values ≥ a[lo]: the next order statistic is their minimum.
			float upper = Float.POSITIVE_INFINITY;
			for (int i = lo + 1; i < n; i++) upper = Math.min(upper, a[i]);
			out[k] = lower + (h - lo) * (upper - lower);
		}
		return out;
	}

	/** NumPy's "linear" percentile q (in [0, 100]) of an ascending array (see {@link #percentiles}). */
	public static double percentileOfSorted(final double[] s, final double q) {
		final double h = (s.length - 1) * q / 100;
		final int lo = (int) Math.floor(h);
		return lo + 1 < s.length ? s[lo] + (h - lo) * (s[lo + 1] - s[lo]) : s[lo];
	}

	/**
	 * Rearranges {@code a} so that a[k] holds the k-th smallest value, everything before it is ≤ and everything
	 * after it ≥ (Hoare's selection with a median-of-three pivot), and returns a[k].
	 */
	static float select(final float[] a, final int k) {
		int lo = 0, hi = a.length - 1;
		while (hi > lo) {
			final int mid = (lo + hi) >>> 1;
			// median of three as pivot
			if (a[mid] < a[lo]) swap(a, mid, lo);
			if (a[hi] < a[lo]) swap(a, hi, lo);
			if (a[hi] < a[mid]) swap(a, hi, mid);
			final float pivot = a[mid];
			int i = lo, j = hi;
			while (i <= j) {
				while (a[i] < pivot) i++;
				while (a[j] > pivot) j--;
				if (i <= j) swap(a, i++, j--);
			}
			if (k <= j) hi = j;
			else if (k >= i) lo = i;
			else return a[k];
		}
		return a[k];
	}

	private static void swap(final float[] a, final int i, final int j) {
		final float t = a[i];
		a[i] = a[j];
		a[j] = t;
	}
}
