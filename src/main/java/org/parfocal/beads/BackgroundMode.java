package org.parfocal.beads;

/**
 * Where each bead's background level comes from before it is subtracted. The keys are macro values: keep them.
 * <p>
 * {@link #BORDER} is local and follows uneven backgrounds, but it also removes whatever PSF light reaches the box
 * faces: a widefield PSF's out-of-focus cone is wider than any practical box, so its wings are cut (at a border level
 * of 0.5 % of the peak, about half the PSF's energy in a 2 × 2 × 3 µm box at NA 1.2). {@link #STACK} takes the most
 * frequent level of the whole (smoothed) recording, unbiased by the beads' wings when the background is even.
 */
public enum BackgroundMode {
	/** Median of the voxels on the faces of each bead's box. */
	BORDER("border"),
	/** Half-sample mode of the smoothed stack ({@code RobustStats.halfSampleMode}). */
	STACK("stack");

	private final String key;

	BackgroundMode(final String key) { this.key = key; }

	public String key() { return key; }

	/** Parses a dialog or macro value (case-insensitive). */
	public static BackgroundMode parse(final String s) {
		if (s != null)
			for (final BackgroundMode a : values())
				if (a.key.equalsIgnoreCase(s.trim())) return a;
		throw new IllegalArgumentException("Unknown background '" + s + "': use border or stack");
	}

	public static String[] keys() {
		final BackgroundMode[] v = values();
		final String[] k = new String[v.length];
		for (int i = 0; i < v.length; i++) k[i] = v[i].key;
		return k;
	}
}
