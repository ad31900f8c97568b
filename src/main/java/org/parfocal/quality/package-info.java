/**
 * The distribution-matching check: pure, seeded, thread-count independent metrics that judge a deconvolved
 * stack against unmatched sharp references ({@link org.parfocal.quality.ReferenceComparison}: sliced Wasserstein
 * distance of patch features and 1D Wasserstein distances of intensity, gradient and Laplacian, with noise floor,
 * bootstrap intervals, baseline and gap closed) and against its own recording
 * ({@link org.parfocal.quality.ReblurConsistency}: χ² and whiteness of the re-blurred residual).
 * <p>
 * Core package: no ImageJ, no AWT, no JTransforms. Errors are one-line {@link java.lang.IllegalArgumentException}s.
 */
package org.parfocal.quality;
