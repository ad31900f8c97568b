package org.parfocal.beads;

/**
 * Whether a detected bead went into the average, and if not the first rule that refused it. Rules are checked in
 * the order of this enum: a bead whose box leaves the image is reported as {@link #EDGE} even if it is also
 * saturated. The keys are written to result tables and provenance: keep them.
 */
public enum BeadStatus {
	ACCEPTED("accepted"),
	/** The PSF box around the bead crosses the image border. */
	EDGE("edge"),
	/** The brightest voxel is at the maximum of the image's bit depth: the peak is clipped. */
	SATURATED("saturated"),
	/** Another detected bead lies inside this bead's PSF box (a cluster or a close pair). */
	NEIGHBOUR("neighbour"),
	/** The Gaussian fit did not converge or put the centre or the widths somewhere implausible. */
	FIT_FAILED("fit failed"),
	/** Integrated intensity far from the other beads' (robust z-score): a cluster, an aggregate or a dim bead. */
	INTENSITY_OUTLIER("intensity outlier"),
	/** A width far from the other beads' (robust z-score): an unresolved pair, a large aggregate, a defect. */
	WIDTH_OUTLIER("width outlier");

	private final String key;

	BeadStatus(final String key) { this.key = key; }

	/** Short lower-case name for tables. */
	public String key() { return key; }
}
