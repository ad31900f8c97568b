package org.parfocal.beads;

/**
 * One detected bead. Positions are in voxels (x, y, z; z = 0 for a 2D image), sub-voxel after the fit, and in µm
 * from the image origin; widths are the FWHM of the fitted Gaussian, 2·√(2 ln 2)·σ, in µm (NaN when no fit was
 * possible). {@code peak} is the brightest raw voxel value, {@code background} the median of the PSF box's border
 * and {@code flux} the box sum minus the background (NaN when the box leaves the image).
 *
 * @param reason the status and, for a rejection, the numbers behind it, one line
 */
public record Bead(int id, double x, double y, double z, double xUm, double yUm, double zUm, double peak, double background,
		double flux, double fwhmX, double fwhmY, double fwhmZ, BeadStatus status, String reason) {

	/** True if this bead went into the average. */
	public boolean accepted() { return status == BeadStatus.ACCEPTED; }

	Bead with(final BeadStatus s, final String why) {
		return new Bead(id, x, y, z, xUm, yUm, zUm, peak, background, flux, fwhmX, fwhmY, fwhmZ, s, why);
	}
}
