package org.parfocal.quality;

import java.util.List;

import org.parfocal.core.RobustStats;
import org.parfocal.core.Volume;

/**
 * Quantile curves of the interpretable properties ({@link Marginals}: intensity, gradient magnitude,
 * Laplacian) of a result and of the prepared references, on the common normalised grid, for a plot that shows
 * which way a result differs (e.g. gradient quantiles below the references' = still too soft). The 1D
 * Wasserstein-1 distance of a row of {@link ReferenceComparison.Report} is the area between the two quantile
 * curves of that property (Vallender, Theory Probab. Appl. 18, 1974).
 */
public final class MarginalQuantiles {

	private MarginalQuantiles() {}

	/**
	 * @param levels the quantile levels in percent, ascending
	 * @param result [property][level] of the result
	 * @param references [property][level] of the pooled references
	 */
	public record Curves(double[] levels, double[][] result, double[][] references) {

		public List<String> properties() {
			return Marginals.NAMES;
		}
	}

	/**
	 * Quantiles at {@code levels} evenly spaced levels from 0.5 % to 99.5 % of the samples the check uses
	 * (same seeds as {@link ReferenceComparison#compare}); NumPy's "linear" quantile definition.
	 */
	public static Curves of(final ReferenceComparison.References refs, final Volume result, final int levels) {
		if (levels < 2 || levels > 1000) throw new IllegalArgumentException("Quantile levels must be 2 to 1000, got " + levels);
		final ReferenceComparison.Options o = refs.options;
		final Volume v = ReferenceComparison.onGrid(result, refs.grid, o, "The result");
		final double[][] samples = Marginals.sample(List.of(v), refs.spacing, o.marginalSamples(), ReferenceComparison.mix(o.seed(), 5));
		final double[] q = new double[levels];
		for (int i = 0; i < levels; i++) q[i] = 0.5 + 99.0 * i / (levels - 1);
		final int n = samples.length;
		final double[][] res = new double[n][levels], ref = new double[n][levels];
		for (int k = 0; k < n; k++) {
			final double[] s = samples[k].clone();
			java.util.Arrays.sort(s);
			final double[] r = refs.marginals[k].sorted[0];
			for (int i = 0; i < levels; i++) {
				res[k][i] = RobustStats.percentileOfSorted(s, q[i]);
				ref[k][i] = RobustStats.percentileOfSorted(r, q[i]);
			}
		}
		return new Curves(q, res, ref);
	}
}
