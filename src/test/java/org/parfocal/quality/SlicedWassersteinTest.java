package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.testing.TestVolumes;

class SlicedWassersteinTest {

	private static double[][] directions(final GoldenCases.Case c) {
		final int d = c.integer("d"), l = c.integer("directions");
		final double[] flat = c.field("directions");
		final double[][] dirs = new double[l][];
		for (int i = 0; i < l; i++) dirs[i] = Arrays.copyOfRange(flat, i * d, (i + 1) * d);
		return dirs;
	}

	/**
	 * Source: POT ot.sliced_wasserstein_distance(Xs, Xt, a, b, p=p, projections=P) (Debian python3-pot 0.8.2) with
	 * the directions P stored in the golden file, including unequal counts and weights.
	 */
	@Test
	void equalsPotSlicedWassersteinWithTheSameDirections() {
		double worst = 0;
		for (final GoldenCases.Case c : GoldenCases.read("sliced.txt")) {
			final int d = c.integer("d");
			final PointSet xs = GoldenCases.points(c.field("xs"), c.integer("n"), d), xt = GoldenCases.points(c.field("xt"), c.integer("m"), d);
			final double got = SlicedWasserstein.distance(xs, c.optional("a"), xt, c.optional("b"), directions(c), c.integer("p"));
			final double rel = GoldenCases.relativeError(c.scalar("pot_sliced"), got);
			worst = Math.max(worst, rel);
			assertTrue(rel <= 1e-6, c.name() + ": POT " + c.scalar("pot_sliced") + ", Parfocal " + got);
		}
		System.out.println("SW vs ot.sliced_wasserstein_distance: worst relative error " + worst);
	}

	/**
	 * Theory (projections are 1-Lipschitz, so W_p(θ#μ, θ#ν) ≤ W_p(μ, ν) for unit θ): SW_p ≤ W_p, for p = 1 and
	 * p = 2, with W_p from POT's exact solver ot.emd2 (which returns W_p^p for the cost |x − y|^p).
	 */
	@Test
	void slicedDistanceIsBoundedByExactTransport() {
		for (final GoldenCases.Case c : GoldenCases.read("sliced.txt")) {
			final int d = c.integer("d"), p = c.integer("p");
			final PointSet xs = GoldenCases.points(c.field("xs"), c.integer("n"), d), xt = GoldenCases.points(c.field("xt"), c.integer("m"), d);
			final double sw = SlicedWasserstein.distance(xs, c.optional("a"), xt, c.optional("b"), directions(c), p);
			final double w = Math.pow(c.scalar("pot_emd2"), 1.0 / p);
			assertTrue(sw > 0 && sw <= w, c.name() + ": SW_" + p + " = " + sw + " should lie in (0, W_" + p + " = " + w + "]");
			// and every single projection obeys the bound too
			for (final double cost : SlicedWasserstein.projectedCosts(xs, c.optional("a"), xt, c.optional("b"), directions(c), p))
				assertTrue(Math.pow(cost, 1.0 / p) <= w * (1 + 1e-12), c.name() + ": one projection exceeds W_p");
		}
	}

	/** Random directions are unit vectors, seeded, and isotropic on average (E[θθᵀ] = I/d, from memory). */
	@Test
	void randomDirectionsAreSeededUnitAndIsotropic() {
		final double[][] a = SlicedWasserstein.randomDirections(5, 20000, 3), b = SlicedWasserstein.randomDirections(5, 20000, 3);
		assertTrue(Arrays.deepEquals(a, b));
		final double[][] m = new double[5][5];
		for (final double[] t : a) {
			double n2 = 0;
			for (int i = 0; i < 5; i++) {
				n2 += t[i] * t[i];
				for (int j = 0; j < 5; j++) m[i][j] += t[i] * t[j] / a.length;
			}
			assertEquals(1, n2, 1e-12);
		}
		for (int i = 0; i < 5; i++)
			for (int j = 0; j < 5; j++) assertEquals(i == j ? 0.2 : 0, m[i][j], 0.01, "second moment " + i + "," + j);
	}

	/** Symmetry; cached sorted projections give the same value; 1 and 2 threads agree bitwise. */
	@Test
	void symmetricCachedAndThreadIndependent() {
		final Random r = new Random(5);
		final PointSet a = cloud(r, 700, 12, 0), b = cloud(r, 450, 12, 0.4);
		final double[][] dirs = SlicedWasserstein.randomDirections(12, 40, 9);
		final double ab = SlicedWasserstein.distance(a, b, dirs, 2), ba = SlicedWasserstein.distance(b, a, dirs, 2);
		assertEquals(ab, ba, 1e-12 * ab);
		final double cached = new SlicedWasserstein.Projected(a, dirs).distance(new SlicedWasserstein.Projected(b, dirs), 2);
		assertEquals(ab, cached, 1e-12 * ab);
		final double[] one = new double[1], two = new double[1];
		Parallelization.runWithNumThreads(1, () -> one[0] = SlicedWasserstein.distance(a, b, dirs, 2));
		Parallelization.runWithNumThreads(2, () -> two[0] = SlicedWasserstein.distance(a, b, dirs, 2));
		assertEquals(one[0], two[0], 0);
	}

	/** Bootstrap multiplicities on cached projections equal the same points duplicated explicitly. */
	@Test
	void countsOnCachedProjectionsEqualDuplicatedPoints() {
		final Random r = new Random(6);
		final PointSet a = cloud(r, 30, 4, 0), b = cloud(r, 20, 4, 1);
		final double[][] dirs = SlicedWasserstein.randomDirections(4, 7, 1);
		final int[] ca = new int[30], cb = new int[20];
		for (int i = 0; i < 30; i++) ca[r.nextInt(30)]++;
		for (int i = 0; i < 20; i++) cb[r.nextInt(20)]++;
		final double viaCounts = new SlicedWasserstein.Projected(a, dirs).distance(new SlicedWasserstein.Projected(b, dirs), ca, cb, 2);
		final double viaWeights = SlicedWasserstein.distance(a, toDouble(ca), b, toDouble(cb), dirs, 2);
		assertEquals(viaWeights, viaCounts, 1e-12);
	}

	@Test
	void badInputGivesOneLineMessages() {
		final Random r = new Random(7);
		final PointSet a = cloud(r, 5, 3, 0), b = cloud(r, 5, 4, 0);
		TestVolumes.assertMessage("differ in dimension", () -> SlicedWasserstein.distance(a, b, SlicedWasserstein.randomDirections(3, 2, 1), 2));
		TestVolumes.assertMessage("No projection directions", () -> SlicedWasserstein.distance(a, a, new double[0][], 2));
		TestVolumes.assertMessage("has 4 coordinates, the points have 3", () -> SlicedWasserstein.distance(a, a, SlicedWasserstein.randomDirections(4, 2, 1), 2));
	}

	static PointSet cloud(final Random r, final int n, final int d, final double shift) {
		final double[] v = new double[n * d];
		for (int i = 0; i < v.length; i++) v[i] = r.nextGaussian() + shift * (i % d == 0 ? 1 : 0);
		return new PointSet(d, n, v);
	}

	private static double[] toDouble(final int[] c) {
		final double[] d = new double[c.length];
		for (int i = 0; i < c.length; i++) d[i] = c[i];
		return d;
	}
}
