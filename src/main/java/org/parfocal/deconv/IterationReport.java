package org.parfocal.deconv;

/**
 * Statistics of one finished iteration.
 *
 * @param iteration 1-based number of the iteration just done
 * @param maxIterations iterations allowed
 * @param logLikelihood Poisson log-likelihood Σ_i [y_i ln(Hx + b)_i − (Hx + b)_i] over the image (constant
 *        terms ln y_i! dropped) of the iterate this iteration started from (for the accelerated method: of the
 *        extrapolated point), computed from the H x the update needs anyway
 * @param relativeChange Σ|x_k − x_(k−1)| / Σ x_(k−1) over the object domain
 * @param estimateSum Σ x_k over the object domain (for non-circulant edges the extended domain)
 * @param modelSum Σ (H x)_i over the image window of the iterate this iteration started from, without b
 */
public record IterationReport(int iteration, int maxIterations, double logLikelihood, double relativeChange, double estimateSum,
		double modelSum) {}
