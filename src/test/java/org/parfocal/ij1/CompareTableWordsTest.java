package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;

/**
 * "Gap closed" = (input − result) / (input − floor) (our definition, README) is blank with a reason when it cannot
 * be computed: no input, or an input already within the noise floor (a zero or negative denominator).
 */
class CompareTableWordsTest {

	@Test
	void aBlankGapClosedSaysWhy() {
		assertEquals("no input given", ComparisonTable.whyNoGap(Double.NaN, 0.1, Double.NaN));
		assertEquals("input already within the noise floor", ComparisonTable.whyNoGap(0.08, 0.1, Double.NaN));
		assertEquals("input already within the noise floor", ComparisonTable.whyNoGap(0.1, 0.1, Double.NaN));
		assertEquals("", ComparisonTable.whyNoGap(0.5, 0.1, 0.75));
	}

	/** A sparse image's quantile curves are near 0 up to ~80 %: the plot starts a little below the rise, and says so. */
	@Test
	void theQuantilePlotStartsWhereTheCurvesRise() {
		final double[] levels = new double[100];
		final double[][] res = new double[2][100], ref = new double[2][100];
		for (int i = 0; i < 100; i++) {
			levels[i] = 0.5 + 99.0 * i / 99;
			for (int k = 0; k < 2; k++) {
				res[k][i] = levels[i] < 82 ? 0.001 : (levels[i] - 82) / 18;
				ref[k][i] = levels[i] < 85 ? 0 : (levels[i] - 85) / 15;
			}
		}
		final org.parfocal.quality.MarginalQuantiles.Curves sparse = new org.parfocal.quality.MarginalQuantiles.Curves(levels, res, ref);
		assertEquals(75, ComparisonTable.firstRise(sparse), 0);
		final ij.gui.Plot plot = ComparisonTable.plot(sparse, "r", 1);
		plot.getImagePlus(); // drawn, so the limits are final
		assertEquals(75, plot.getLimits()[0], 0);
		// curves that rise early keep the whole range
		for (int i = 0; i < 100; i++) for (int k = 0; k < 2; k++) res[k][i] = ref[k][i] = levels[i] / 100;
		assertEquals(0, ComparisonTable.firstRise(new org.parfocal.quality.MarginalQuantiles.Curves(levels, res, ref)), 0);
	}
}
