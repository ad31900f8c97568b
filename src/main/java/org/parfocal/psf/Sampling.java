package org.parfocal.psf;

/**
 * How a model turns a continuous PSF into voxels, like a camera: each voxel's value is the mean of the PSF
 * over the voxel's pixel area, approximated with {@code lateral × lateral} sub-samples at the centres of a
 * regular sub-grid (midpoint rule). {@code lateral = 0} chooses the count from the optics (sub-sample spacing at
 * most 0.05·λ/NA, between 3 and 15 per voxel).
 * <p>
 * Axially a stack is a series of exposures at fixed stage positions, so by default ({@code axial = 1}) the PSF
 * is point-sampled at each plane; {@code axial > 1} averages {@code axial} sub-planes across the z step (for
 * acquisitions that sweep the focus during the exposure).
 */
public record Sampling(int lateral, int axial) {

	/** Sub-sample count chosen from the optics, point-sampled in z. */
	public static final Sampling AUTO = new Sampling(0, 1);

	/** Point samples at voxel centres (no integration): the unsampled model on the grid. */
	public static final Sampling POINT = new Sampling(1, 1);

	public Sampling {
		if (lateral < 0 || lateral > 31) throw new IllegalArgumentException("Lateral oversampling must be between 0 (automatic) and 31, got " + lateral);
		if (axial < 1 || axial > 31) throw new IllegalArgumentException("Axial oversampling must be between 1 and 31, got " + axial);
	}

	/** The lateral sub-sample count for a voxel of size {@code d} (µm) and a PSF scale λ/NA (µm). */
	int lateralFor(final double d, final double lambdaOverNa) {
		if (lateral > 0) return lateral;
		return (int) Math.max(3, Math.min(15, Math.ceil(d / (0.05 * lambdaOverNa))));
	}
}
