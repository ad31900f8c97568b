package org.parfocal.quality;

/**
 * Percentiles and sort permutations on primitive arrays.
 * <p>
 * Written by hand because the JDK sorts primitives without returning the permutation, and Commons Math's
 * {@code Percentile} copies into a {@code double[]} and offers no partial selection on {@code float[]};
 * a selection on a float copy keeps the percentile of a 64 × 256 × 256 stack at a few tens of milliseconds.
 */
public final class OrderStatistics {

	private OrderStatistics() {}

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

	/**
	 * Stable ascending sort of {@code keys} (not modified): returns the permutation {@code perm} with
	 * keys[perm[0]] ≤ keys[perm[1]] ≤ …, and writes the sorted keys into {@code sorted} (same length) if it is
	 * not null. Bottom-up merge sort, O(n log n).
	 */
	public static int[] argsort(final double[] keys, final double[] sorted) {
		final int n = keys.length;
		int[] perm = new int[n], tmp = new int[n];
		for (int i = 0; i < n; i++) perm[i] = i;
		for (int width = 1; width < n; width <<= 1) {
			for (int lo = 0; lo < n; lo += 2 * width) {
				final int mid = Math.min(lo + width, n), hi = Math.min(lo + 2 * width, n);
				int i = lo, j = mid, o = lo;
				while (i < mid && j < hi) tmp[o++] = keys[perm[j]] < keys[perm[i]] ? perm[j++] : perm[i++];
				while (i < mid) tmp[o++] = perm[i++];
				while (j < hi) tmp[o++] = perm[j++];
			}
			final int[] t = perm;
			perm = tmp;
			tmp = t;
		}
		if (sorted != null)
			for (int i = 0; i < n; i++) sorted[i] = keys[perm[i]];
		return perm;
	}
}
