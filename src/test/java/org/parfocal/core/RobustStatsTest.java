package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

/**
 * Medians against the worked examples of Python's {@code statistics} module documentation
 * (median([1, 3, 5]) = 3, median([1, 3, 5, 7]) = 4.0, median_high([1, 3, 5, 7]) = 5), the MAD of a hand-checked
 * sample, and the three median paths (double, float, sorted) against each other on shuffled data.
 */
class RobustStatsTest {

	@Test
	void mediansEqualPythonsWorkedExamples() {
		assertEquals(3, RobustStats.median(new double[] { 5, 1, 3 }), 0);
		assertEquals(4, RobustStats.median(new double[] { 7, 1, 5, 3 }), 0);
		assertEquals(4, RobustStats.median(new double[] { 7, Double.NaN, 1, 5, Double.POSITIVE_INFINITY, 3 }), 0, "non-finite values left out");
		assertTrue(Double.isNaN(RobustStats.median(new double[] { Double.NaN })));
		assertEquals(3, RobustStats.median(new float[] { 5, 1, 3, 99 }, 3), 0, "first n values only");
		assertEquals(4, RobustStats.median(new float[] { 7, 1, 5, 3 }, 4), 0);
		assertEquals(4, RobustStats.medianOfSorted(new float[] { 1, 3, 5, 7 }, 4), 0);
		assertEquals(5, RobustStats.highMedianOfSorted(new float[] { 1, 3, 5, 7 }, 4), 0);
		assertEquals(3, RobustStats.highMedianOfSorted(new float[] { 1, 3, 5 }, 3), 0);
		// |x − 3| of {1, 2, 3, 4, 100} = {2, 1, 0, 1, 97}: median 1
		assertEquals(1, RobustStats.mad(new double[] { 1, 2, 3, 4, 100 }, 3), 0);
	}

	@Test
	void theMedianPathsAgree() {
		final java.util.Random r = new java.util.Random(16);
		for (int t = 0; t < 200; t++) {
			final int n = 1 + r.nextInt(60);
			final float[] f = new float[n];
			final double[] d = new double[n];
			for (int i = 0; i < n; i++) d[i] = f[i] = r.nextInt(7) - 3 + (r.nextBoolean() ? 0.5f : 0); // ties, as in integer recordings
			final float[] s = f.clone();
			java.util.Arrays.sort(s);
			final double m = RobustStats.medianOfSorted(s, n);
			assertEquals(m, RobustStats.median(f, n), 0, "select vs sort, n " + n);
			assertEquals(m, RobustStats.median(d), 0, "Commons Math vs sort, n " + n);
		}
	}
}
