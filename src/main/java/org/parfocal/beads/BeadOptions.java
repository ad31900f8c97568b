package org.parfocal.beads;

import java.util.Locale;

/**
 * Everything that decides how a PSF is measured from a bead recording. Lengths in micrometres.
 *
 * @param boxXY lateral side of the PSF box (µm); rounded to an odd number of voxels, at least 5
 * @param boxZ axial side of the PSF box (µm); 0 for a 2D image (one plane). An odd number of planes, at least 3
 * @param beadDiameter nominal bead diameter (µm), 0 if unknown; only used for the bead-size rule ({@link BeadSize})
 * @param threshold detection threshold in robust noise standard deviations above the median of the smoothed stack
 * @param rejectSaturated refuse beads whose brightest voxel reaches the maximum of {@code bitDepth}
 * @param bitDepth bits per voxel of the recording: 8 or 16 (saturation at 2^bits − 1), or 32 (float: never saturated)
 * @param outlierZ limit of the robust (modified) z-score for intensity and width outliers; 0 switches the test off
 * @param background where each bead's background level comes from
 * @param averaging how the aligned beads are combined
 * @param symmetrize average the result over rings around the optical axis, plane by plane
 */
public record BeadOptions(double boxXY, double boxZ, double beadDiameter, double threshold, boolean rejectSaturated, int bitDepth,
		double outlierZ, BackgroundMode background, Averaging averaging, boolean symmetrize) {

	public BeadOptions {
		if (!(boxXY > 0) || !(boxXY <= 1000)) throw new IllegalArgumentException("The lateral box size must be between 0 and 1000 µm, got " + fmt(boxXY));
		if (!(boxZ >= 0) || !(boxZ <= 1000)) throw new IllegalArgumentException("The axial box size must be 0 (2D) or up to 1000 µm, got " + fmt(boxZ));
		if (!(beadDiameter >= 0) || !(beadDiameter <= 100))
			throw new IllegalArgumentException("The bead diameter must be between 0 (unknown) and 100 µm, got " + fmt(beadDiameter));
		if (!(threshold > 0) || !(threshold <= 1000))
			throw new IllegalArgumentException("The detection threshold must be above 0 (noise standard deviations), got " + fmt(threshold));
		if (bitDepth != 8 && bitDepth != 16 && bitDepth != 32) throw new IllegalArgumentException("Bit depth must be 8, 16 or 32, got " + bitDepth);
		if (!(outlierZ >= 0) || !Double.isFinite(outlierZ))
			throw new IllegalArgumentException("The outlier limit must be 0 (off) or a positive robust z-score, got " + fmt(outlierZ));
		if (background == null) throw new IllegalArgumentException("No background method given: use border or stack");
		if (averaging == null) throw new IllegalArgumentException("No averaging method given: use mean or median");
	}

	/** Value at which a voxel counts as saturated: 2^bits − 1, or +∞ for float images or when the test is off. */
	public double saturationLevel() {
		if (!rejectSaturated || bitDepth == 32) return Double.POSITIVE_INFINITY;
		return (1 << bitDepth) - 1;
	}

	static String fmt(final double v) {
		return String.format(Locale.ROOT, "%.6g", v).replaceAll("\\.?0+(?=$|e)", "");
	}
}
