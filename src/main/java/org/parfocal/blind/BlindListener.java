package org.parfocal.blind;

import org.parfocal.deconv.EstimateView;

/**
 * Watches a blind deconvolution: called after every outer iteration, on the thread that runs it, with
 * read-only views of the current object (image window) and PSF (support box). The views read live buffers:
 * valid only during the call; copy what must outlive it. Progress and cancellation go through
 * {@link org.parfocal.core.Monitor}.
 */
@FunctionalInterface
public interface BlindListener {

	BlindListener NONE = (report, object, psf) -> {};

	void iterationDone(BlindReport report, EstimateView object, EstimateView psf);
}
