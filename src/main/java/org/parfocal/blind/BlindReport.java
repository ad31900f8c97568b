package org.parfocal.blind;

/**
 * Statistics of one finished outer iteration.
 *
 * @param iteration 1-based outer iteration just done
 * @param maxIterations outer iterations planned
 * @param logLikelihood Poisson log-likelihood Σ [y ln(Hx + b) − (Hx + b)] (constants dropped) of the iterate
 *        the last update of this outer iteration started from
 * @param objectChange Σ|x_k − x_(k−1)| / Σ x_(k−1) of the last object update
 * @param psfChange Σ|h_k − h_(k−1)| of the last PSF update (both unit sum; 0 to 2), 0 without PSF updates
 * @param estimateSum Σ x over the object domain (for non-circulant edges the extended domain)
 * @param modelSum Σ (Hx) over the image, without b, of the iterate the last update started from: after an
 *        object update with b = 0 this is Σ y (Richardson–Lucy keeps the flux)
 */
public record BlindReport(int iteration, int maxIterations, double logLikelihood, double objectChange, double psfChange, double estimateSum,
		double modelSum) {}
