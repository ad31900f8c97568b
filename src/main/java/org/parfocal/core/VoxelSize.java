package org.parfocal.core;

/**
 * Physical size of one voxel: {@code dx, dy, dz} in {@code unit} (usually "µm" or "micron").
 * <p>
 * An uncalibrated image has {@link #isCalibrated()} false: its sizes are 1 and its unit is "pixel".
 * Commands that need physical sizes (PSF models, resampling) must ask the user rather than assume 1 px.
 */
public record VoxelSize(double dx, double dy, double dz, String unit) {

	/** Unit used by ImageJ for uncalibrated images. */
	public static final String PIXEL = "pixel";

	public static final VoxelSize UNCALIBRATED = new VoxelSize(1, 1, 1, PIXEL);

	public VoxelSize {
		if (!(dx > 0) || !(dy > 0) || !(dz > 0) || !Double.isFinite(dx) || !Double.isFinite(dy) || !Double.isFinite(dz))
			throw new IllegalArgumentException("Voxel sizes must be positive and finite, got " + dx + " x " + dy + " x " + dz);
		if (unit == null || unit.isBlank()) unit = PIXEL;
	}

	/** Micrometres per voxel. */
	public static VoxelSize microns(final double dx, final double dy, final double dz) {
		return new VoxelSize(dx, dy, dz, "µm");
	}

	/** True when the unit is a length and not ImageJ's "pixel". */
	public boolean isCalibrated() {
		return !(unit.equalsIgnoreCase(PIXEL) || unit.equalsIgnoreCase("pixels"));
	}

	@Override
	public String toString() {
		return dx + " x " + dy + " x " + dz + " " + unit;
	}
}
