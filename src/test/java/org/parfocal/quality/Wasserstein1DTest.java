package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.parfocal.testing.TestVolumes;

class Wasserstein1DTest {

	/** Source: scipy.stats.wasserstein_distance (Debian python3-scipy 1.10.1), golden file by gen_wasserstein.py. */
	@Test
	void equalsScipyWassersteinDistanceIncludingUnequalSizesAndWeights() {
		double worst = 0;
		int checked = 0;
		for (final GoldenCases.Case c : GoldenCases.read("w1d.txt")) {
			final double got = Wasserstein1D.distance(c.field("u"), c.optional("uw"), c.field("v"), c.optional("vw"), 1);
			final double rel = GoldenCases.relativeError(c.scalar("scipy_w1"), got);
			worst = Math.max(worst, rel);
			assertTrue(rel <= 1e-6, c.name() + ": scipy " + c.scalar("scipy_w1") + ", Parfocal " + got);
			checked++;
		}
		assertEquals(7, checked);
		System.out.println("W1 vs scipy.stats.wasserstein_distance: worst relative error " + worst);
	}

	/** Source: POT ot.wasserstein_1d(u, v, a, b, p=2) (Debian python3-pot 0.8.2) = W2², golden file. */
	@Test
	void squaredW2EqualsPotWasserstein1d() {
		for (final GoldenCases.Case c : GoldenCases.read("w1d.txt")) {
			final double got = Wasserstein1D.cost(c.field("u"), c.optional("uw"), c.field("v"), c.optional("vw"), 2);
			assertTrue(GoldenCases.relativeError(c.scalar("pot_w2sq"), got) <= 1e-6, c.name() + ": POT " + c.scalar("pot_w2sq") + ", Parfocal " + got);
		}
	}

	/**
	 * Closed form (from memory; standard result): W2(N(μ1, σ1²), N(μ2, σ2²)) = √((μ1 − μ2)² + (σ1 − σ2)²) in 1D.
	 * Empirical measures of n = 200000 seeded draws each; the sampling error of W2 is O(n^−½) (here ≈ 0.005), so
	 * the tolerance is 0.02 absolute.
	 */
	@Test
	void w2BetweenGaussiansMatchesClosedForm() {
		final Random r = new Random(11);
		final double[][] params = { { 0, 1, 0.5, 2 }, { -1, 0.5, 2, 0.5 }, { 3, 1, 3, 1.5 } };
		for (final double[] p : params) {
			final double[] a = gaussian(r, 200_000, p[0], p[1]), b = gaussian(r, 200_000, p[2], p[3]);
			final double expected = Math.hypot(p[0] - p[2], p[1] - p[3]);
			assertEquals(expected, Wasserstein1D.distance(a, b, 2), 0.02, "W2 of N(" + p[0] + "," + p[1] + ") vs N(" + p[2] + "," + p[3] + ")");
		}
	}

	/**
	 * Closed form (from memory; standard result): W1(N(0, 1), N(μ, 1)) = |μ| (a translation). n = 200000 and
	 * 150000 seeded draws (unequal counts on purpose); tolerance 0.02 absolute.
	 */
	@Test
	void w1BetweenShiftedGaussiansIsTheShift() {
		final Random r = new Random(12);
		for (final double mu : new double[] { -2.5, -0.3, 0, 0.7, 4 }) {
			final double[] a = gaussian(r, 200_000, 0, 1), b = gaussian(r, 150_000, mu, 1);
			assertEquals(Math.abs(mu), Wasserstein1D.distance(a, b, 1), 0.02, "W1 of N(0,1) vs N(" + mu + ",1)");
		}
	}

	/** Metric axioms (from memory): symmetry, identity, and translation by c gives W_p = |c| exactly. */
	@Test
	void symmetricZeroOnItselfAndExactForTranslations() {
		final Random r = new Random(13);
		final double[] a = gaussian(r, 501, 0, 1), b = gaussian(r, 77, 1, 3), w = new double[77];
		for (int i = 0; i < w.length; i++) w[i] = r.nextDouble();
		for (final double p : new double[] { 1, 2, 3.5 }) {
			assertEquals(Wasserstein1D.distance(a, b, p), Wasserstein1D.distance(b, a, p), 1e-12);
			assertEquals(Wasserstein1D.distance(a, null, b, w, p), Wasserstein1D.distance(b, w, a, null, p), 1e-12);
			assertEquals(0, Wasserstein1D.distance(a, a, p), 0);
			final double[] shifted = a.clone();
			for (int i = 0; i < shifted.length; i++) shifted[i] += 0.75;
			assertEquals(0.75, Wasserstein1D.distance(a, shifted, p), 1e-12);
		}
	}

	/** Integer weights equal duplicated points (definition of the weighted empirical measure). */
	@Test
	void integerWeightsEqualDuplicatedPoints() {
		final double[] u = { 3, -1, 2, 2.5 }, uw = { 2, 1, 3, 1 };
		final double[] dup = { 3, 3, -1, 2, 2, 2, 2.5 };
		final double[] v = { 0, 1, 4 };
		for (final double p : new double[] { 1, 2 })
			assertEquals(Wasserstein1D.distance(dup, v, p), Wasserstein1D.distance(u, uw, v, null, p), 1e-14);
	}

	@Test
	void badInputGivesOneLineMessages() {
		TestVolumes.assertMessage("first sample is empty", () -> Wasserstein1D.distance(new double[0], new double[] { 1 }, 1));
		TestVolumes.assertMessage("non-finite", () -> Wasserstein1D.distance(new double[] { Double.NaN }, new double[] { 1 }, 1));
		TestVolumes.assertMessage("at least 1", () -> Wasserstein1D.distance(new double[] { 0 }, new double[] { 1 }, 0.5));
		TestVolumes.assertMessage("sum to 0", () -> Wasserstein1D.distance(new double[] { 0, 1 }, new double[] { 0, 0 }, new double[] { 1 }, null, 1));
		TestVolumes.assertMessage("2 values but 1 weights", () -> Wasserstein1D.distance(new double[] { 0, 1 }, new double[] { 1 }, new double[] { 1 }, null, 1));
	}

	static double[] gaussian(final Random r, final int n, final double mean, final double sd) {
		final double[] a = new double[n];
		for (int i = 0; i < n; i++) a[i] = mean + sd * r.nextGaussian();
		return a;
	}
}
