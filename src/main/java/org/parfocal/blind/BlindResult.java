package org.parfocal.blind;

import java.util.List;

import org.parfocal.core.Volume;

/**
 * Outcome of a blind deconvolution.
 *
 * @param estimate the deblurred object on the image grid, calibrated like the image, in data units after
 *        offset subtraction and without the background
 * @param psf the final PSF estimate on the support box, unit sum, calibrated like the image
 * @param snapshots the PSF every {@link BlindOptions#snapshotInterval()} outer iterations, starting with the
 *        starting PSF (iteration 0) and ending with the final one
 * @param history one report per outer iteration
 * @param offset camera offset subtracted
 * @param background background b used
 * @param notes what was done to the inputs, one line each
 * @param fit the model fit, or null (free-form run)
 * @param refinement the free-form steps after a model fit with why each was kept or undone (empty otherwise)
 */
public record BlindResult(Volume estimate, Volume psf, List<PsfSnapshot> snapshots, List<BlindReport> history, double offset, double background,
		List<String> notes, ModelFit.Fit fit, List<RefineStep> refinement) {

	public BlindResult {
		snapshots = List.copyOf(snapshots);
		history = List.copyOf(history);
		notes = List.copyOf(notes);
		refinement = refinement == null ? List.of() : List.copyOf(refinement);
	}

	public BlindResult(final Volume estimate, final Volume psf, final List<PsfSnapshot> snapshots, final List<BlindReport> history, final double offset,
			final double background, final List<String> notes) {
		this(estimate, psf, snapshots, history, offset, background, notes, null, List.of());
	}
}
