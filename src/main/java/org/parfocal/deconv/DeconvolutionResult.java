package org.parfocal.deconv;

import java.util.List;

import org.parfocal.core.Volume;

/**
 * Outcome of a deconvolution.
 *
 * @param estimate the deconvolved object on the image grid, with the image's calibration, in data units after
 *        offset subtraction and without the background
 * @param iterations iterations done (0 for Wiener)
 * @param converged true when a relative-change stopping rule was met before the last allowed iteration
 * @param history one report per iteration
 * @param logLikelihood Poisson log-likelihood of the returned estimate (on the extended domain for
 *        non-circulant edges); NaN for Wiener
 * @param offset camera offset subtracted
 * @param background background b used (with {@code background=fit} the fitted value, with {@code fit-smooth} the
 *        fitted background's mean over the image; the notes give its range)
 * @param notes what was done to the inputs that the user should know (PSF normalised, values clipped,
 *        levels estimated), one line each
 */
public record DeconvolutionResult(Volume estimate, int iterations, boolean converged, List<IterationReport> history, double logLikelihood,
		double offset, double background, List<String> notes) {

	public DeconvolutionResult {
		history = List.copyOf(history);
		notes = List.copyOf(notes);
	}
}
