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
 */
public record BlindResult(Volume estimate, Volume psf, List<PsfSnapshot> snapshots, List<BlindReport> history, double offset, double background,
		List<String> notes) {

	public BlindResult {
		snapshots = List.copyOf(snapshots);
		history = List.copyOf(history);
		notes = List.copyOf(notes);
	}
}
