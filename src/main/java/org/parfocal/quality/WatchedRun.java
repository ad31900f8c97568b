package org.parfocal.quality;

import java.util.List;

import org.parfocal.core.Volume;

/**
 * What a watch collected over one run, whatever the method (non-blind {@link QualityWatch}, blind
 * {@link BlindQualityWatch}): the evaluated points, the suggestion, the kept iterate and the noise floor. Commands
 * plot and record any of them the same way.
 */
public interface WatchedRun {

	/** The evaluated points, in iteration order. */
	List<StoppingRule.Point> points();

	StoppingRule.Suggestion suggestion();

	/** A copy of the suggested iterate, or null when none was kept. */
	Volume best();

	/** The noise floor of the patch distance (NaN without references). */
	double floor();
}
