package org.parfocal.quality;

import java.util.SplittableRandom;

import org.parfocal.core.Parallel;

/**
 * Sliced Wasserstein distance between point clouds in ℝ^d (Rabin, Peyré, Delon &amp; Bernot, "Wasserstein
 * barycenter and its application to texture mixing", SSVM 2011; Bonneel, Rabin, Peyré &amp; Pfister, "Sliced
 * and Radon Wasserstein barycenters of measures", J. Math. Imaging Vis. 51, 2015):
 * <pre>
 *   SW_p(μ, ν) = ( (1/L) Σ_{l=1..L} W_p^p(θ_l # μ, θ_l # ν) )^{1/p},
 * </pre>
 * the Monte-Carlo estimate over L unit directions θ_l of the average 1D transport cost of the projections
 * x ↦ ⟨θ_l, x⟩, each computed exactly by sorting ({@link Wasserstein1D}). This is the definition of POT's
 * {@code ot.sliced_wasserstein_distance}. Because every projection is 1-Lipschitz, W_p(θ#μ, θ#ν) ≤ W_p(μ, ν)
 * for each unit θ and hence SW_p ≤ W_p for every p ≥ 1.
 * <p>
 * Directions are uniform on the unit sphere (normalised Gaussian vectors) from a seeded generator, or given.
 * Work is spread over directions ({@link Parallel#forRange}); each direction is computed by the same code
 * whatever the thread count, so results are bitwise identical for 1 and N threads.
 */
public final class SlicedWasserstein {

	private SlicedWasserstein() {}

	/** {@code count} unit vectors of ℝ^{@code dim}, uniform on the sphere, from {@code seed}. */
	public static double[][] randomDirections(final int dim, final int count, final long seed) {
		if (dim < 1 || count < 1) throw new IllegalArgumentException("Need at least one direction of at least one coordinate, got " + count + " x " + dim);
		final SplittableRandom r = new SplittableRandom(seed);
		final double[][] dirs = new double[count][dim];
		for (final double[] d : dirs) {
			double norm2;
			do {
				norm2 = 0;
				for (int k = 0; k < dim; k++) {
					d[k] = gaussian(r);
					norm2 += d[k] * d[k];
				}
			} while (norm2 == 0);
			final double inv = 1 / Math.sqrt(norm2);
			for (int k = 0; k < dim; k++) d[k] *= inv;
		}
		return dirs;
	}

	/** Standard normal by the Marsaglia polar method (deterministic for a given generator state). */
	static double gaussian(final SplittableRandom r) {
		double u, v, s;
		do {
			u = 2 * r.nextDouble() - 1;
			v = 2 * r.nextDouble() - 1;
			s = u * u + v * v;
		} while (s >= 1 || s == 0);
		return u * Math.sqrt(-2 * Math.log(s) / s);
	}

	/** SW_p between the uniform empirical measures on {@code a} and {@code b}, along {@code directions}. */
	public static double distance(final PointSet a, final PointSet b, final double[][] directions, final double p) {
		return distance(a, null, b, null, directions, p);
	}

	/**
	 * SW_p between weighted empirical measures ({@code null} weights: uniform; weights are normalised).
	 * Directions are used as given (POT's convention: they should be unit vectors).
	 */
	public static double distance(final PointSet a, final double[] aWeights, final PointSet b, final double[] bWeights, final double[][] directions,
			final double p) {
		final double[] costs = projectedCosts(a, aWeights, b, bWeights, directions, p);
		double s = 0;
		for (final double c : costs) s += c;
		return Wasserstein1D.root(s / costs.length, p);
	}

	/** W_p^p of the projections along each direction, in the order of {@code directions}. */
	public static double[] projectedCosts(final PointSet a, final double[] aWeights, final PointSet b, final double[] bWeights,
			final double[][] directions, final double p) {
		Wasserstein1D.checkPower(p);
		if (a.dim() != b.dim())
			throw new IllegalArgumentException("The point sets differ in dimension: " + a.dim() + " vs " + b.dim());
		checkDirections(directions, a.dim());
		final double[][] pa = project(a, directions), pb = project(b, directions);
		final double[] out = new double[directions.length];
		Parallel.forRange(directions.length, l -> out[l] = Wasserstein1D.cost(pa[l], aWeights, pb[l], bWeights, p));
		return out;
	}

	/** ⟨θ_l, x_i⟩ for every direction l and point i, as [l][i]. */
	public static double[][] project(final PointSet x, final double[][] directions) {
		checkDirections(directions, x.dim());
		final int n = x.count(), d = x.dim();
		final double[] v = x.values();
		final double[][] out = new double[directions.length][n];
		Parallel.forRange(directions.length, l -> {
			final double[] t = directions[l], o = out[l];
			for (int i = 0; i < n; i++) {
				double s = 0;
				for (int k = 0, base = i * d; k < d; k++) s += v[base + k] * t[k];
				o[i] = s;
			}
		});
		return out;
	}

	private static void checkDirections(final double[][] directions, final int dim) {
		if (directions == null || directions.length == 0) throw new IllegalArgumentException("No projection directions given");
		for (final double[] t : directions)
			if (t.length != dim) throw new IllegalArgumentException("A projection direction has " + t.length + " coordinates, the points have " + dim);
	}

	/**
	 * The projections of one point cloud along fixed directions, sorted once, so that many distances (other
	 * clouds, bootstrap resamples) can be taken against it in O(n) per direction.
	 */
	public static final class Projected {
		final double[][] sorted;
		final int[][] perm;
		final int count;

		/** Projects and sorts {@code x} along {@code directions}. */
		public Projected(final PointSet x, final double[][] directions) {
			this(project(x, directions));
		}

		/** Sorts given projections [direction][point] (e.g. 1D samples: one "direction"). */
		Projected(final double[][] values) {
			count = values[0].length;
			sorted = new double[values.length][count];
			perm = new int[values.length][];
			Parallel.forRange(values.length, l -> perm[l] = OrderStatistics.argsort(values[l], sorted[l]));
		}

		/** 1D samples as a projection along one direction. */
		static Projected ofValues(final double[] values) {
			return new Projected(new double[][] { values });
		}

		public int directions() { return sorted.length; }

		public int count() { return count; }

		/** SW_p (or, for one direction, W_p) between the two clouds; both must use the same directions. */
		public double distance(final Projected o, final double p) {
			return distance(o, null, null, p);
		}

		/**
		 * SW_p between the clouds with point multiplicities {@code counts} (a bootstrap resample; {@code null}
		 * for all ones).
		 */
		double distance(final Projected o, final int[] counts, final int[] otherCounts, final double p) {
			return distance(o, counts, otherCounts, null, p);
		}

		/**
		 * As {@link #distance(Projected, int[], int[], double)}, the directions too weighted by multiplicities
		 * {@code directionCounts} ({@code null} for all ones): a bootstrap resample of the Monte Carlo slicing.
		 */
		double distance(final Projected o, final int[] counts, final int[] otherCounts, final int[] directionCounts, final double p) {
			if (o.sorted.length != sorted.length) throw new IllegalArgumentException("The two projections use different directions");
			if (directionCounts != null && directionCounts.length != sorted.length)
				throw new IllegalArgumentException("Direction multiplicities for " + directionCounts.length + " directions, the projections have " + sorted.length);
			final double[] c = new double[sorted.length];
			Parallel.forRange(sorted.length, l -> c[l] = counts == null && otherCounts == null ? Wasserstein1D.costSorted(sorted[l], o.sorted[l], p)
					: Wasserstein1D.costSortedCounts(sorted[l], perm[l], counts == null ? ones(count) : counts, o.sorted[l], o.perm[l],
							otherCounts == null ? ones(o.count) : otherCounts, p));
			double s = 0, w = 0;
			for (int l = 0; l < c.length; l++) {
				final int m = directionCounts == null ? 1 : directionCounts[l];
				if (m == 0) continue; // 0 · (a possibly infinite cost) stays out of the sum
				s += m * c[l];
				w += m;
			}
			return Wasserstein1D.root(s / w, p);
		}

		private static int[] ones(final int n) {
			final int[] a = new int[n];
			java.util.Arrays.fill(a, 1);
			return a;
		}
	}
}
