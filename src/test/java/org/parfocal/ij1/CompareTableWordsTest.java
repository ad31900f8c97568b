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
}
