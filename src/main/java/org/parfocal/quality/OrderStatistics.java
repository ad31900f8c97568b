package org.parfocal.quality;

/**
 * Sort permutations on primitive arrays (percentiles and medians: {@link org.parfocal.core.RobustStats}).
 * <p>
 * Written by hand because the JDK sorts primitives without returning the permutation.
 */
public final class OrderStatistics {

	private OrderStatistics() {}

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
