package org.parfocal.quality;

import java.util.Arrays;

/**
 * Exact optimal transport between two empirical measures on the real line.
 * <p>
 * For μ = Σ aᵢ δ(uᵢ) and ν = Σ bⱼ δ(vⱼ) with Σa = Σb = 1 and quantile functions F⁻¹, G⁻¹,
 * <pre>
 *   W_p(μ, ν)^p = ∫₀¹ |F⁻¹(q) − G⁻¹(q)|^p dq,
 * </pre>
 * the monotone (sorted) coupling being optimal for every convex cost |x − y|^p, p ≥ 1 (see e.g. Villani,
 * <i>Topics in Optimal Transportation</i>, 2003, Thm 2.18; Peyré &amp; Cuturi, <i>Computational Optimal
 * Transport</i>, 2019, §2.6). Both quantile functions are step functions; the integral is evaluated exactly on
 * the merged set of their breakpoints. Unequal sample counts n ≠ m therefore need no resampling: the quantile
 * function of each sample is used as it is (its "interpolation" onto the common quantile grid is exact). With
 * uniform or integer weights the breakpoints are compared in integer arithmetic (i·m against j·n), so no
 * rounding can misorder them.
 * <p>
 * For p = 1 this equals {@code scipy.stats.wasserstein_distance} (which integrates |F − G| over x instead),
 * for any p POT's {@code ot.wasserstein_1d} raised to 1/p.
 */
public final class Wasserstein1D {

	private Wasserstein1D() {}

	/** W_p between the uniform empirical measures on {@code u} and {@code v} (not modified). */
	public static double distance(final double[] u, final double[] v, final double p) {
		return root(cost(u, v, p), p);
	}

	/**
	 * W_p between weighted empirical measures; a {@code null} weight array means uniform weights. Weights must
	 * be ≥ 0, finite, with a positive sum; they are normalised to sum 1 (as SciPy and POT do).
	 */
	public static double distance(final double[] u, final double[] uWeights, final double[] v, final double[] vWeights, final double p) {
		return root(cost(u, uWeights, v, vWeights, p), p);
	}

	/** W_p^p between the uniform empirical measures on {@code u} and {@code v}. */
	public static double cost(final double[] u, final double[] v, final double p) {
		check(u, null, "first");
		check(v, null, "second");
		checkPower(p);
		final double[] us = u.clone(), vs = v.clone();
		Arrays.sort(us);
		Arrays.sort(vs);
		return costSorted(us, vs, p);
	}

	/** W_p^p between weighted empirical measures ({@code null} weights: uniform). */
	public static double cost(final double[] u, final double[] uWeights, final double[] v, final double[] vWeights, final double p) {
		if (uWeights == null && vWeights == null) return cost(u, v, p);
		check(u, uWeights, "first");
		check(v, vWeights, "second");
		checkPower(p);
		final double[] us = new double[u.length], vs = new double[v.length];
		final int[] up = OrderStatistics.argsort(u, us), vp = OrderStatistics.argsort(v, vs);
		return costSortedWeighted(us, cumulative(uWeights, up), vs, cumulative(vWeights, vp), p);
	}

	/** W_p^p of two ascending arrays with uniform weights 1/n and 1/m. */
	public static double costSorted(final double[] us, final double[] vs, final double p) {
		final int n = us.length, m = vs.length;
		// Breakpoints (i+1)/n and (j+1)/m compared as (i+1)·m and (j+1)·n: exact in long arithmetic.
		long q = 0;
		final long total = (long) n * m;
		int i = 0, j = 0;
		double s = 0;
		while (i < n && j < m) {
			final long bu = (long) (i + 1) * m, bv = (long) (j + 1) * n, next = Math.min(bu, bv);
			s += (next - q) * pow(Math.abs(us[i] - vs[j]), p);
			q = next;
			if (bu == next) i++;
			if (bv == next) j++;
		}
		return s / total;
	}

	/**
	 * W_p^p of two ascending arrays whose points carry integer multiplicities (a bootstrap resample):
	 * {@code uCount[perm[k]]} is the multiplicity of the k-th smallest value; zero counts are allowed.
	 */
	static double costSortedCounts(final double[] us, final int[] uPerm, final int[] uCount, final double[] vs, final int[] vPerm,
			final int[] vCount, final double p) {
		long nu = 0, nv = 0;
		for (final int c : uCount) nu += c;
		for (final int c : vCount) nv += c;
		final int n = us.length, m = vs.length;
		long cu = 0, cv = 0, q = 0;
		int i = 0, j = 0;
		double s = 0;
		// Skip leading points of zero weight so that each step transports between two points that carry mass.
		while (i < n && uCount[uPerm[i]] == 0) i++;
		while (j < m && vCount[vPerm[j]] == 0) j++;
		while (i < n && j < m) {
			final long bu = (cu + uCount[uPerm[i]]) * nv, bv = (cv + vCount[vPerm[j]]) * nu, next = Math.min(bu, bv);
			s += (next - q) * pow(Math.abs(us[i] - vs[j]), p);
			q = next;
			if (bu == next) {
				cu += uCount[uPerm[i]];
				do i++; while (i < n && uCount[uPerm[i]] == 0);
			}
			if (bv == next) {
				cv += vCount[vPerm[j]];
				do j++; while (j < m && vCount[vPerm[j]] == 0);
			}
		}
		return s / ((double) nu * nv);
	}

	/** W_p^p of two ascending arrays with cumulative weights ending at 1 (real-valued breakpoints). */
	static double costSortedWeighted(final double[] us, final double[] ucum, final double[] vs, final double[] vcum, final double p) {
		final int n = us.length, m = vs.length;
		double q = 0, s = 0;
		int i = 0, j = 0;
		while (i < n && j < m) {
			final double next = Math.min(ucum[i], vcum[j]);
			if (next > q) s += (next - q) * pow(Math.abs(us[i] - vs[j]), p);
			q = Math.max(q, next);
			if (ucum[i] <= next) i++;
			if (vcum[j] <= next) j++;
		}
		return s;
	}

	/** Cumulative normalised weights in sorted order; the last one is exactly 1. */
	private static double[] cumulative(final double[] w, final int[] perm) {
		final int n = perm.length;
		final double[] c = new double[n];
		if (w == null) {
			for (int i = 0; i < n; i++) c[i] = (i + 1) / (double) n;
		} else {
			double total = 0;
			for (final double x : w) total += x;
			double run = 0;
			for (int i = 0; i < n; i++) {
				run += w[perm[i]];
				c[i] = run / total;
			}
		}
		c[n - 1] = 1;
		return c;
	}

	static double pow(final double d, final double p) {
		return p == 1 ? d : p == 2 ? d * d : Math.pow(d, p);
	}

	static double root(final double cost, final double p) {
		return p == 1 ? cost : p == 2 ? Math.sqrt(cost) : Math.pow(cost, 1 / p);
	}

	static void checkPower(final double p) {
		if (!(p >= 1) || !Double.isFinite(p)) throw new IllegalArgumentException("The Wasserstein order p must be at least 1, got " + p);
	}

	private static void check(final double[] x, final double[] w, final String which) {
		if (x == null || x.length == 0) throw new IllegalArgumentException("The " + which + " sample is empty");
		for (int i = 0; i < x.length; i++)
			if (!Double.isFinite(x[i])) throw new IllegalArgumentException("The " + which + " sample has a non-finite value " + x[i] + " at index " + i);
		if (w == null) return;
		if (w.length != x.length)
			throw new IllegalArgumentException("The " + which + " sample has " + x.length + " values but " + w.length + " weights");
		double total = 0;
		for (int i = 0; i < w.length; i++) {
			if (!(w[i] >= 0) || !Double.isFinite(w[i]))
				throw new IllegalArgumentException("Weights must be finite and not negative; the " + which + " sample has " + w[i] + " at index " + i);
			total += w[i];
		}
		if (!(total > 0)) throw new IllegalArgumentException("The weights of the " + which + " sample sum to 0");
	}
}
