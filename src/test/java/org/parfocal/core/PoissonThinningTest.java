package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

/**
 * The split of a photon-count recording into two parts by binomial thinning. Outside facts: thinning a
 * Poisson(λ) count with probability p gives independent Poisson(pλ) and Poisson((1 − p)λ) counts (any probability
 * textbook, e.g. Grimmett &amp; Stirzaker, "Probability and Random Processes", from memory), so each part's
 * variance equals its mean and the parts are uncorrelated; the Poisson samples come from Commons Math.
 */
class PoissonThinningTest {

	private static float[] poisson(final double mean, final int n, final int seed) {
		final PoissonDistribution d = new PoissonDistribution(new Well19937c(seed), mean, PoissonDistribution.DEFAULT_EPSILON,
				PoissonDistribution.DEFAULT_MAX_ITERATIONS);
		final float[] y = new float[n];
		for (int i = 0; i < n; i++) y[i] = d.sample();
		return y;
	}

	@Test
	void onePhotonBitIsTheHalfSplit() {
		final float[] y = poisson(37.5, 4000, 3);
		final float[][] a = PoissonThinning.split(y, 1, 99L), b = PoissonThinning.split(y, 1, 99L, 1);
		assertArrayEquals(a[0], b[0]);
		assertArrayEquals(a[1], b[1]);
	}

	@Test
	void partsAreIndependentPoissonRecordingsWithTheirShareOfTheLight() {
		final double lambda = 40;
		final int n = 200_000;
		final float[] y = poisson(lambda, n, 7);
		for (final int bits : new int[] { 1, 2, 3 }) {
			final double p = 1 - Math.pow(2, -bits);
			final float[][] parts = PoissonThinning.split(y, 1, 11L + bits, bits);
			for (int i = 0; i < n; i++) assertEquals(y[i], parts[0][i] + parts[1][i], 0, "photons are kept");
			final double[] q = { p, 1 - p };
			for (int k = 0; k < 2; k++) {
				double s = 0, ss = 0;
				for (final float v : parts[k]) { s += v; ss += (double) v * v; }
				final double mean = s / n, var = ss / n - mean * mean;
				// mean within 5 standard errors of q·λ; variance of a Poisson count equals its mean (within 5 %)
				assertEquals(q[k] * lambda, mean, 5 * Math.sqrt(q[k] * lambda / n), "part " + k + " with " + bits + " bit(s)");
				assertEquals(mean, var, 0.05 * mean, "part " + k + " variance with " + bits + " bit(s)");
			}
			double c = 0;
			final double m0 = q[0] * lambda, m1 = q[1] * lambda;
			for (int i = 0; i < n; i++) c += (parts[0][i] - m0) * (parts[1][i] - m1);
			final double r = c / n / Math.sqrt(m0 * m1);
			assertTrue(Math.abs(r) < 5 / Math.sqrt(n), "parts uncorrelated: r = " + r);
		}
	}

	@Test
	void unitsAndMaskedVoxels() {
		final float[] y = new float[1000];
		final SplittableRandom r = new SplittableRandom(5);
		for (int i = 0; i < y.length; i++) y[i] = (float) (r.nextInt(200) * 2.5); // 0.4 photons per unit
		y[17] = Float.NaN;
		final float[][] parts = PoissonThinning.split(y, 0.4, 1L, 2);
		assertTrue(Float.isNaN(parts[0][17]) && Float.isNaN(parts[1][17]));
		for (int i = 0; i < y.length; i++) if (i != 17) assertEquals(y[i], parts[0][i] + parts[1][i], 1e-3f);
		assertThrows(IllegalArgumentException.class, () -> PoissonThinning.split(y, 1, 1L, 0));
		assertThrows(IllegalArgumentException.class, () -> PoissonThinning.split(y, 0, 1L, 2));
	}
}
