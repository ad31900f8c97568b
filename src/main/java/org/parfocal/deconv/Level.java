package org.parfocal.deconv;

/**
 * A constant intensity level (camera offset or background): none, a value given by the user, or estimated
 * from the image (see {@link Preprocessing}).
 */
public record Level(Kind kind, double value) {

	/**
	 * ESTIMATED: the sigma-clipped median (macro word {@code auto}); DARK: the darkest region (macro word
	 * {@code dark}); FIT: fitted jointly with the object inside Richardson–Lucy (macro word {@code fit}, background
	 * only, see {@link BackgroundFit}); FIT_SMOOTH: a slowly varying background fitted the same way (macro word
	 * {@code fit-smooth}).
	 */
	public enum Kind { NONE, VALUE, ESTIMATED, DARK, FIT, FIT_SMOOTH }

	public static final Level NONE = new Level(Kind.NONE, 0);
	public static final Level ESTIMATED = new Level(Kind.ESTIMATED, 0);
	public static final Level DARK = new Level(Kind.DARK, 0);
	public static final Level FIT = new Level(Kind.FIT, 0);
	public static final Level FIT_SMOOTH = new Level(Kind.FIT_SMOOTH, 0);

	public Level {
		if (kind == null) kind = Kind.NONE;
		if (kind != Kind.VALUE) value = 0;
		else if (!Double.isFinite(value)) throw new IllegalArgumentException("Level must be a finite number, got " + value);
	}

	public static Level of(final double value) { return new Level(Kind.VALUE, value); }

	@Override
	public String toString() {
		return kind == Kind.VALUE ? Double.toString(value) : kind.name().toLowerCase(java.util.Locale.ROOT);
	}
}
