package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.parfocal.testing.TestVolumes;

/** The stopping rule on hand-made curves (expected answers worked out by hand from the rule's definition). */
class StoppingRuleTest {

	private static StoppingRule.Point p(final int it, final double d, final double chi) {
		return new StoppingRule.Point(it, d, chi, Double.NaN);
	}

	@Test
	void minimumDistanceWinsWhateverTheChiSquareAndTiesGoEarly() {
		final List<StoppingRule.Point> pts = List.of(p(5, 0.30, 3), p(10, 0.20, 1.2), p(15, 0.12, 0.9), p(20, 0.12, 0.85), p(25, 0.18, 0.8));
		final StoppingRule.Suggestion s = StoppingRule.suggest(pts);
		assertEquals(15, s.iteration());
		assertEquals(0.12, s.point().distance());
		assertTrue(s.reason().contains("minimum patch distance 0.1200 over 5"), s.reason());
	}

	@Test
	void withoutReferencesTheLastIterateWithChiSquareAtLeastOne() {
		assertEquals(15, StoppingRule.suggest(List.of(p(5, Double.NaN, 4), p(10, Double.NaN, 1.5), p(15, Double.NaN, 1.0), p(20, Double.NaN, 0.97))).iteration());
		final StoppingRule.Suggestion early = StoppingRule.suggest(List.of(p(5, Double.NaN, 0.9), p(10, Double.NaN, 0.8)));
		assertEquals(5, early.iteration());
		assertTrue(early.reason().contains("evaluate earlier"), early.reason());
	}

	/**
	 * A curve without an interior minimum gives no answer: the edge iterate is returned but flagged, and the reason
	 * says so (the three cases of the issue: distance still falling at the end, distance rising from the start,
	 * χ² never reaching 1). Before this flag the last iterate was reported as "minimum patch distance".
	 */
	@Test
	void edgesOfTheEvaluatedRangeAreNotPresentedAsAChoice() {
		assertTrue(StoppingRule.suggest(List.of(p(5, 0.30, 3), p(10, 0.12, 1), p(15, 0.2, 0.9))).interior());
		final StoppingRule.Suggestion falling = StoppingRule.suggest(List.of(p(5, 0.30, 3), p(10, 0.20, 1.2), p(15, 0.12, 0.9)));
		assertEquals(15, falling.iteration());
		assertTrue(!falling.interior() && falling.reason().contains("no interior minimum") && falling.reason().contains("still falling"), falling.reason());
		final StoppingRule.Suggestion rising = StoppingRule.suggest(List.of(p(5, 0.10, 3), p(10, 0.20, 1.2), p(15, 0.32, 0.9)));
		assertEquals(5, rising.iteration());
		assertTrue(!rising.interior() && rising.reason().contains("rose from the first"), rising.reason());
		final StoppingRule.Suggestion neverOne = StoppingRule.suggest(List.of(p(5, Double.NaN, 4), p(10, Double.NaN, 2.5), p(15, Double.NaN, 2.0)));
		assertEquals(15, neverOne.iteration());
		assertTrue(!neverOne.interior() && neverOne.reason().contains("still 2.00") && neverOne.reason().contains("noise model"), neverOne.reason());
		assertTrue(StoppingRule.suggest(List.of(p(5, Double.NaN, 4), p(10, Double.NaN, 1.5), p(15, Double.NaN, 0.9))).interior());
		assertTrue(!StoppingRule.suggest(List.of(p(5, Double.NaN, 0.9), p(10, Double.NaN, 0.8))).interior());
		assertTrue(!StoppingRule.suggest(List.of()).interior());
	}

	@Test
	void runningUpdateSaysWhenANewPointBecomesTheSuggestion() {
		final StoppingRule.Tracker t = new StoppingRule.Tracker();
		assertTrue(t.offer(p(1, 0.5, 2)));
		assertTrue(t.offer(p(2, 0.4, 1)));
		assertTrue(!t.offer(p(3, 0.4, 1)), "a tie keeps the earlier iterate");
		assertTrue(!t.offer(p(4, 0.45, 1)));
		assertEquals(2, t.suggestion().iteration());
		assertEquals(0, new StoppingRule.Tracker().suggestion().iteration());
	}

	@Test
	void pointsOutOfOrderOrMixedAreRefused() {
		final StoppingRule.Tracker t = new StoppingRule.Tracker();
		t.offer(p(5, 0.5, 2));
		TestVolumes.assertMessage("Iterations must increase: 5 after 5", () -> t.offer(p(5, 0.4, 2)));
		TestVolumes.assertMessage("has no distance", () -> t.offer(p(6, Double.NaN, 2)));
	}
}
