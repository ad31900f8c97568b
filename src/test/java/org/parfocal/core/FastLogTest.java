package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;

import org.junit.jupiter.api.Test;

class FastLogTest {

	/** Oracle: java.lang.Math.log in double, over normal floats from 1e-37 to 1e38 and around 1. */
	@Test
	void agreesWithMathLog() {
		final Random r = new Random(5);
		for (int i = 0; i < 200_000; i++) {
			final float x = (float) Math.exp((r.nextDouble() - 0.5) * 170);
			assertEquals(Math.log(x), FastLog.ln(x), 1e-12 + 1e-7 * Math.abs(Math.log(x)), "ln " + x);
		}
		for (final float x : new float[] { 1f, Math.nextUp(1f), Math.nextDown(1f), 1.4142135f, 1.4142137f, 0.70710677f, 2f, 0.5f, Float.MIN_NORMAL,
				Float.MAX_VALUE })
			assertEquals(Math.log(x), FastLog.ln(x), 1e-12 + 2e-16 * Math.abs(Math.log(x)) * 1e8, "ln " + x);
	}
}
