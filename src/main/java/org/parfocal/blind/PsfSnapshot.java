package org.parfocal.blind;

import org.parfocal.core.Volume;

/**
 * The PSF estimate after {@code iteration} outer iterations (0: the starting PSF), with what a user needs
 * to judge convergence.
 *
 * @param psf the estimate on the support box, unit sum, calibrated like the image
 * @param fwhmLateral FWHM along x through the brightest voxel ({@link org.parfocal.psf.Fwhm}), in the image's
 *        length unit (voxels if uncalibrated); NaN if it does not fall to half within the box
 * @param fwhmAxial FWHM along z likewise (NaN for 2D)
 * @param distanceToStart relative L2 distance ‖h − h₀‖₂ / ‖h₀‖₂ to the starting PSF
 * @param sum Σ h (1 within float rounding)
 */
public record PsfSnapshot(int iteration, Volume psf, double fwhmLateral, double fwhmAxial, double distanceToStart, double sum) {}
