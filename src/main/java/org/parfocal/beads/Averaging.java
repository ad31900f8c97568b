package org.parfocal.beads;

/** How the aligned, unit-sum bead boxes are combined voxel by voxel. The keys are macro values: keep them. */
public enum Averaging {
	/** Arithmetic mean: every accepted bead weighs the same. */
	MEAN("mean"),
	/** Median: robust to a bead the rejection rules missed (a faint neighbour, a hot pixel), noisier than the mean. */
	MEDIAN("median");

	private final String key;

	Averaging(final String key) { this.key = key; }

	/** Lower-case name used in dialogs, macros and provenance. */
	public String key() { return key; }

	/** Parses a dialog or macro value (case-insensitive). */
	public static Averaging parse(final String s) {
		if (s != null)
			for (final Averaging a : values())
				if (a.key.equalsIgnoreCase(s.trim())) return a;
		throw new IllegalArgumentException("Unknown averaging '" + s + "': use mean or median");
	}

	/** All keys, for a dialog's choice list. */
	public static String[] keys() {
		final Averaging[] v = values();
		final String[] k = new String[v.length];
		for (int i = 0; i < v.length; i++) k[i] = v[i].key;
		return k;
	}
}
