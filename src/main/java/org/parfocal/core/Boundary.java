package org.parfocal.core;

/**
 * How an image is continued beyond its edges before it is convolved. With n samples f(0..n-1):
 * <ul>
 * <li>{@link #ZERO}: f(i) = 0 outside;</li>
 * <li>{@link #MIRROR}: half-sample symmetric, the edge sample repeated: … f1 f0 | f0 f1 … f(n-1) | f(n-1) f(n-2) …
 * (period 2n; NumPy's {@code pad(mode="symmetric")}, ImgLib2's {@code extendMirrorDouble});</li>
 * <li>{@link #PERIODIC}: f(i) = f(i mod n), i.e. circular convolution on the image grid (NumPy {@code "wrap"}).</li>
 * </ul>
 * The names are the macro values of the {@code boundary=} option: keep them.
 */
public enum Boundary {
	ZERO("zero"), MIRROR("mirror"), PERIODIC("periodic");

	private final String key;

	Boundary(final String key) { this.key = key; }

	/** Lower-case name used in dialogs, macros and provenance. */
	public String key() { return key; }

	/** Parses a dialog or macro value (case-insensitive). */
	public static Boundary parse(final String s) {
		for (final Boundary b : values())
			if (b.key.equalsIgnoreCase(s.trim())) return b;
		throw new IllegalArgumentException("Unknown boundary '" + s + "': use zero, mirror or periodic");
	}

	/** All keys, for a dialog's choice list. */
	public static String[] keys() {
		final Boundary[] v = values();
		final String[] k = new String[v.length];
		for (int i = 0; i < v.length; i++) k[i] = v[i].key;
		return k;
	}

	/**
	 * Source index in {0..n-1} for position {@code i} of the extended signal, or -1 where the extension is
	 * zero.
	 */
	public int sourceIndex(final int i, final int n) {
		if (i >= 0 && i < n) return i;
		switch (this) {
		case ZERO:
			return -1;
		case PERIODIC:
			return Math.floorMod(i, n);
		default:
			final int m = Math.floorMod(i, 2 * n);
			return m < n ? m : 2 * n - 1 - m;
		}
	}
}
