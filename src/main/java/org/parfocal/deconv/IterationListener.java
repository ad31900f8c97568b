package org.parfocal.deconv;

/**
 * Watches an iterative deconvolution: called once per iteration, on the thread that runs it, after the
 * iterate has been updated. Progress and cancellation go through {@link org.parfocal.core.Monitor}; this hook
 * is for statistics (a convergence plot) and for commands that inspect every iterate (e.g. a distribution
 * check). It must not keep the view beyond the call.
 */
@FunctionalInterface
public interface IterationListener {

	IterationListener NONE = (report, estimate) -> {};

	void iterationDone(IterationReport report, EstimateView estimate);
}
