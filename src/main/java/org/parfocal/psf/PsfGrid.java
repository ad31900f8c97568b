package org.parfocal.psf;

import static org.parfocal.psf.Optics.fmt;

import java.util.Locale;

import org.parfocal.core.VoxelSize;

/**
 * Where a PSF is sampled: odd sizes {@code nx × ny × nz} and voxel sizes {@code dx, dy, dz} in µm. The origin
 * (the emitter, at the nominal focus) is the centre voxel ((nx−1)/2, (ny−1)/2, (nz−1)/2); voxel (i, j, l)
 * covers x ∈ [(i − (nx−1)/2 − ½)·dx, (i − (nx−1)/2 + ½)·dx] and likewise in y, and sits at
 * z = (l − (nz−1)/2)·dz.
 */
public record PsfGrid(int nx, int ny, int nz, double dx, double dy, double dz) {

	/** Largest size along x or y. */
	public static final int MAX_LATERAL = 4097;
	/** Largest size along z. */
	public static final int MAX_AXIAL = 2049;
	/** Largest number of voxels (1 GiB of floats). */
	public static final long MAX_VOXELS = 1L << 28;
	/** Largest plausible voxel size for a PSF, µm. */
	public static final double MAX_VOXEL_SIZE = 50;

	public PsfGrid {
		if (nx % 2 == 0 || ny % 2 == 0 || nz % 2 == 0 || nx < 1 || ny < 1 || nz < 1)
			throw new IllegalArgumentException("PSF sizes must be odd and positive (the centre voxel is the origin), got " + nx + " x " + ny + " x " + nz);
		if (nx > MAX_LATERAL || ny > MAX_LATERAL || nz > MAX_AXIAL || (long) nx * ny * nz > MAX_VOXELS)
			throw new IllegalArgumentException("PSF size " + nx + " x " + ny + " x " + nz + " is too large (at most " + MAX_LATERAL + " x "
					+ MAX_LATERAL + " x " + MAX_AXIAL + " and " + MAX_VOXELS + " voxels)");
		for (final double d : new double[] { dx, dy, dz }) {
			if (!(d > 0) || !Double.isFinite(d))
				throw new IllegalArgumentException("Voxel sizes must be positive, got " + fmt(dx) + " x " + fmt(dy) + " x " + fmt(dz) + " µm");
			if (d > MAX_VOXEL_SIZE)
				throw new IllegalArgumentException("Voxel size " + fmt(d) + " µm is implausible for a PSF (at most " + fmt(MAX_VOXEL_SIZE) + " µm): give sizes in µm");
		}
	}

	/** The calibration of the PSF volume, in µm. */
	public VoxelSize voxelSize() { return VoxelSize.microns(dx, dy, dz); }

	/** Same sizes, voxel sizes from an image calibration (converted to µm). */
	public static PsfGrid of(final int nx, final int ny, final int nz, final VoxelSize v) {
		final double f = micronsPer(v);
		return new PsfGrid(nx, ny, nz, v.dx() * f, v.dy() * f, v.dz() * f);
	}

	/**
	 * Micrometres per unit of an image calibration.
	 *
	 * @throws IllegalArgumentException if the image is uncalibrated (never assume 1 pixel = 1 µm) or the unit is
	 *         not a length
	 */
	public static double micronsPer(final VoxelSize v) {
		if (v == null || !v.isCalibrated())
			throw new IllegalArgumentException("The image has no voxel size: enter dx, dy and dz in µm (a PSF cannot assume 1 pixel = 1 µm)");
		final double f = micronsPerUnit(v.unit());
		if (Double.isNaN(f)) throw new IllegalArgumentException("Voxel unit '" + v.unit() + "' is not a length in nm, µm or mm: enter the voxel sizes in µm");
		return f;
	}

	/**
	 * Micrometres per length unit: the one table of unit names in Parfocal (case and surrounding spaces ignored).
	 * nm, nanometer(s), nanometre(s): 10⁻³; µm (micro sign U+00B5 or Greek mu U+03BC), um, micron(s),
	 * micrometer(s), micrometre(s): 1; mm, millimeter(s), millimetre(s): 10³ (the SI prefixes). NaN for anything
	 * else, ImageJ's uncalibrated "pixel" and "pixels", "none", blank and null included.
	 */
	public static double micronsPerUnit(final String unit) {
		if (unit == null) return Double.NaN;
		switch (unit.trim().toLowerCase(Locale.ROOT)) {
		case "µm": case "μm": case "um": case "micron": case "microns": case "micrometer": case "micrometre": case "micrometers": case "micrometres":
			return 1;
		case "nm": case "nanometer": case "nanometre": case "nanometers": case "nanometres":
			return 1e-3;
		case "mm": case "millimeter": case "millimetre": case "millimeters": case "millimetres":
			return 1e3;
		default:
			return Double.NaN;
		}
	}

	/**
	 * Sizes chosen from the optics for the given voxel sizes (µm): laterally at least 8 Airy rings (radius
	 * 4.5·λ/NA, and for widefield and light-sheet detection at least the defocus cone over the axial extent,
	 * z<sub>max</sub>·tan α + 2·λ/NA, {@link PsfExtent}; the k-th dark ring of the Airy pattern lies near (k + 0.22)·0.5·λ/NA, Born &amp; Wolf §8.5,
	 * from memory); axially ±6 zeros of the on-axis intensity (spacing λ/(n·(1 − cos α)), stretched by
	 * n<sub>i</sub>/n<sub>s</sub> for a sample of lower index) plus the paraxial focal shift
	 * depth·(n<sub>i</sub>/n<sub>s</sub> − 1), at least ±3 sheet FWHMs for a light sheet when the sheet is
	 * thinner. λ is the longest wavelength in use; sizes are capped at 1025 laterally and 513 axially.
	 */
	public static PsfGrid forOptics(final Optics o, final double dx, final double dy, final double dz) {
		final double lambda = o.longestWavelength();
		final double ni = o.immersionIndex(), ns = o.sampleIndex();
		double hz = 6 * lambda / (ni * (1 - Math.cos(o.apertureAngle()))) * Math.max(1, ni / ns) + Math.abs(o.depth() * (ni / ns - 1));
		if (o.modality() == Modality.LIGHT_SHEET) hz = Math.min(hz, Math.max(3 * o.sheetThickness(), 3 * lambda / (ni * (1 - Math.cos(o.apertureAngle())))));
		// widefield-type detection: the box holds the defocus cone over its axial extent (PsfExtent)
		final double cone = o.modality() == Modality.WIDEFIELD || o.modality() == Modality.LIGHT_SHEET ? hz * PsfExtent.coneSlope(o) + 2 * lambda / o.na() : 0;
		final double rxy = Math.max(4.5 * lambda / o.na(), cone);
		// validate the voxel sizes before dividing by them
		new PsfGrid(1, 1, 1, dx, dy, dz);
		return new PsfGrid(size(rxy, dx, 1025), size(rxy, dy, 1025), size(hz, dz, 513), dx, dy, dz);
	}

	private static int size(final double half, final double d, final int max) {
		final double n = 2 * Math.ceil(half / d) + 1;
		return (int) Math.max(3, Math.min(max, n));
	}

	/** x (µm) of the centre of column i. */
	public double x(final int i) { return (i - (nx - 1) / 2) * dx; }

	/** y (µm) of the centre of row j. */
	public double y(final int j) { return (j - (ny - 1) / 2) * dy; }

	/** z (µm) of plane l, relative to the nominal focus. */
	public double z(final int l) { return (l - (nz - 1) / 2) * dz; }

	@Override
	public String toString() {
		return nx + " x " + ny + " x " + nz + " voxels of " + fmt(dx) + " x " + fmt(dy) + " x " + fmt(dz) + " µm";
	}
}
