package org.parfocal.beads;

import java.util.Arrays;

/**
 * Median, median absolute deviation and the modified z-score of Iglewicz &amp; Hoaglin ("How to Detect and Handle
 * Outliers", ASQC 1993): z = 0.6745·(x − median)/MAD, so that z is a standard normal score for Gaussian data. Written
 * by hand because the only need is a median of a copy (Commons Math's Percentile interpolates and allocates more).
 */
final class RobustStats {

	/** MAD × 1.4826 estimates the standard deviation of Gaussian data (1/Φ⁻¹(3/4)). */
	static final double MAD_TO_SIGMA = 1.4826;

	private RobustStats() {}

	/** Median of the finite values (NaN if none); {@code a} is not changed. */
	static double median(final double[] a) {
		final double[] s = Arrays.stream(a).filter(Double::isFinite).sorted().toArray();
		if (s.length == 0) return Double.NaN;
		final int m = s.length / 2;
		return s.length % 2 == 1 ? s[m] : 0.5 * (s[m - 1] + s[m]);
	}

	/** Median of the finite values of a float array (NaN if none); the array is not changed. */
	static double median(final float[] a, final int n) {
		final float[] s = Arrays.copyOf(a, n);
		Arrays.sort(s);
		final int m = n / 2;
		return n == 0 ? Double.NaN : n % 2 == 1 ? s[m] : 0.5 * ((double) s[m - 1] + s[m]);
	}

	/**
	 * Half-sample mode of the first {@code n} values (Bickel &amp; Frühwirth, "On a fast, robust estimator of the mode",
	 * Comput. Stat. Data Anal. 50, 2006): repeatedly keep the half of the sorted sample with the smallest range. The
	 * background of a bead stack is its most frequent level, which the wings of many beads shift far less than the median.
	 */
	static double halfSampleMode(final float[] a, final int n) {
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

	/** Median absolute deviation from {@code median}. */
	static double mad(final double[] a, final double median) {
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
	static double[] modifiedZ(final double[] a, final double floor) {
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
}
