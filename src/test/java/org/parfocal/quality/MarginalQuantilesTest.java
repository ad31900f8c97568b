package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.testing.TestVolumes;

/**
 * Quantile curves against the identity W1(μ, ν) = ∫₀¹ |F⁻¹(t) − G⁻¹(t)| dt (Vallender 1974; from memory): the
 * area between the result's and the references' curves, over the 0.5–99.5 % levels, is close to the W1 row of
 * the report (the tails outside the levels are left out, hence the tolerance).
 */
class MarginalQuantilesTest {

	@Test
	void areaBetweenTheCurvesIsTheWassersteinOneDistance() {
		final List<Volume> refs = List.of(SharpScenes.cell2D(100, 160, 160), SharpScenes.cell2D(101, 160, 160));
		final Volume blurred = SharpScenes.blur(SharpScenes.cell2D(7, 160, 160), 2, 0);
		final ReferenceComparison.Options o = ReferenceComparison.Options.defaults().withCounts(2048, 32768, 0);
		final ReferenceComparison.References prepared = ReferenceComparison.prepare(refs, blurred, o, Monitor.NONE);
		final ReferenceComparison.Report report = ReferenceComparison.compare(prepared, blurred, null, Monitor.NONE);
		final MarginalQuantiles.Curves c = MarginalQuantiles.of(prepared, blurred, 199);
		assertEquals(Marginals.NAMES, c.properties());
		for (int k = 0; k < 3; k++) {
			double area = 0;
			for (int i = 1; i < c.levels().length; i++)
				area += (c.levels()[i] - c.levels()[i - 1]) / 100 * 0.5 * (Math.abs(c.result()[k][i] - c.references()[k][i]) + Math.abs(c.result()[k][i - 1] - c.references()[k][i - 1]));
			final double w1 = report.rows().get(1 + k).distance();
			assertEquals(w1, area, 0.15 * w1, Marginals.NAMES.get(k));
			for (int i = 1; i < c.levels().length; i++) assertTrue(c.result()[k][i] >= c.result()[k][i - 1] && c.references()[k][i] >= c.references()[k][i - 1], "ascending");
		}
		// blurred: softer edges than the references at the top quantiles of the gradient magnitude
		assertTrue(c.result()[1][197] < c.references()[1][197]);
		TestVolumes.assertMessage("Quantile levels must be 2 to 1000, got 1", () -> MarginalQuantiles.of(prepared, blurred, 1));
	}
}
