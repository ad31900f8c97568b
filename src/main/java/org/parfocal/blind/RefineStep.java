package org.parfocal.blind;

/**
 * One free-form PSF step of the refinement after a model fit, and why it was kept or undone.
 *
 * @param iteration refinement iteration (1-based)
 * @param heldOutBefore log-likelihood of the held-out voxels with the object of this iteration and the PSF before the step
 * @param heldOutAfter the same with the PSF after the step
 * @param distanceToModel ‖h − h_model‖/‖h_model‖ of the step before the trust region's pull-back
 * @param accepted whether the step was kept
 * @param reason one line: why
 */
public record RefineStep(int iteration, double heldOutBefore, double heldOutAfter, double distanceToModel, boolean accepted, String reason) {}
