package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.apache.commons.math3.special.Gamma;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/** The hand-written Poisson sampler against Commons Math's Poisson probabilities (chi-square goodness of fit). */
class NoiseTest {

	@ParameterizedTest(name = "mean {0}")
	@ValueSource(doubles = { 0.3, 2.5, 9.9, 10, 37.5, 400, 12000 })
	void drawsFollowThePoissonLaw(final double mean) {
		final int n = 200_000;
		final Well19937c rng = new Well19937c(42);
		final PoissonDistribution ref = new PoissonDistribution(mean);
		final int lo = (int) Math.max(0, Math.floor(mean - 5 * Math.sqrt(mean))), hi = (int) Math.ceil(mean + 5 * Math.sqrt(mean)) + 3;
		// bins: every count in [lo, hi] for small means; wider bins for large means so each expects ≥ 50 draws
		final int width = Math.max(1, (int) Math.sqrt(mean) / 4);
		final int bins = (hi - lo) / width + 1;
		final long[] observed = new long[bins + 2];
		double sum = 0;
		for (int i = 0; i < n; i++) {
			final long k = Noise.poisson(rng, mean);
			sum += k;
			observed[k < lo ? 0 : k > lo + bins * width - 1 ? bins + 1 : 1 + (int) ((k - lo) / width)]++;
		}
		final double[] expected = new double[bins + 2];
		expected[0] = lo > 0 ? ref.cumulativeProbability(lo - 1) * n : 0;
		for (int b = 0; b < bins; b++)
			expected[b + 1] = (ref.cumulativeProbability(lo + (b + 1) * width - 1) - (lo + b * width > 0 ? ref.cumulativeProbability(lo + b * width - 1) : 0)) * n;
		expected[bins + 1] = (1 - ref.cumulativeProbability(lo + bins * width - 1)) * n;
		double chi2 = 0;
		int dof = -1, pooledObs = 0;
		double pooledExp = 0;
		for (int b = 0; b < expected.length; b++) {
			pooledObs += observed[b];
			pooledExp += expected[b];
			if (pooledExp >= 20) {
				chi2 += (pooledObs - pooledExp) * (pooledObs - pooledExp) / pooledExp;
				dof++;
				pooledObs = 0;
				pooledExp = 0;
			}
		}
		final double p = 1 - new ChiSquaredDistribution(dof).cumulativeProbability(chi2);
		assertTrue(p > 1e-4, "chi-square " + chi2 + " on " + dof + " dof, p = " + p);
		assertEquals(mean, sum / n, 5 * Math.sqrt(mean / n), "mean");
	}

	@ParameterizedTest
	@ValueSource(ints = { 16, 17, 50, 300, 5000 })
	void stirlingLogFactorialMatchesTheGammaFunction(final int k) {
		assertEquals(Gamma.logGamma(k + 1.0), Noise.logFactorial(k), 1e-10 * Math.max(1, Gamma.logGamma(k + 1.0)));
	}
}
