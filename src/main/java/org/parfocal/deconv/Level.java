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
	 * {@code fit-smooth}); DARK_OR_MEDIAN: the larger of the darkest region and the sigma-clipped median (macro word
	 * {@code dark-or-median}); BY_PSF: chosen by the PSF (macro word {@code by-psf}, {@link Preprocessing#forPsf}):
	 * DARK_OR_MEDIAN for a PSF whose out-of-focus planes fade (confocal-like), DARK otherwise.
	 */
	public enum Kind { NONE, VALUE, ESTIMATED, DARK, FIT, FIT_SMOOTH, DARK_OR_MEDIAN, BY_PSF }

	public static final Level NONE = new Level(Kind.NONE, 0);
	public static final Level ESTIMATED = new Level(Kind.ESTIMATED, 0);
	public static final Level DARK = new Level(Kind.DARK, 0);
	public static final Level FIT = new Level(Kind.FIT, 0);
	public static final Level FIT_SMOOTH = new Level(Kind.FIT_SMOOTH, 0);
	public static final Level DARK_OR_MEDIAN = new Level(Kind.DARK_OR_MEDIAN, 0);
	public static final Level BY_PSF = new Level(Kind.BY_PSF, 0);

	public Level {
		if (kind == null) kind = Kind.NONE;
		if (kind != Kind.VALUE) value = 0;
		else if (!Double.isFinite(value)) throw new IllegalArgumentException("Level must be a finite number, got " + value);
	}

	public static Level of(final double value) { return new Level(Kind.VALUE, value); }

	/**
	 * Reads the macro or dialog text of {@code key} ({@code offset} or {@code background}): "auto" = estimated,
	 * "0" or "" = none, "dark" = the darkest region (background only), else a number; with {@code fit}, "fit" and
	 * "fit-smooth" = fitted with the object, "by-psf" and "dark-or-median" (background only; refused with a line
	 * where no fit is available: they are Deconvolve's).
	 */
	public static Level parse(final String key, final String text, final boolean fit) {
		if (text.isEmpty() || text.equals("0")) return NONE;
		if ((text.equalsIgnoreCase("fit") || text.equalsIgnoreCase("fit-smooth")) && key.equals("background")) {
			// fitted with the object inside Richardson–Lucy (BackgroundFit): a constant, or slowly varying
			if (fit) return text.equalsIgnoreCase("fit") ? FIT : FIT_SMOOTH;
			throw new IllegalArgumentException("background=" + text + " is available in Deconvolve only: give a number, auto or dark");
		}
		if ((text.equalsIgnoreCase("by-psf") || text.equalsIgnoreCase("dark-or-median")) && key.equals("background")) {
			if (fit) return text.equalsIgnoreCase("by-psf") ? BY_PSF : DARK_OR_MEDIAN;
			throw new IllegalArgumentException("background=" + text + " is available in Deconvolve only: give a number, auto or dark");
		}
		if (text.equalsIgnoreCase("auto")) return ESTIMATED;
		if (text.equalsIgnoreCase("dark") && key.equals("background")) return DARK; // the darkest region (background only)
		try {
			final double v = Double.parseDouble(text);
			return v == 0 ? NONE : of(v);
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException("'" + text + "' is not a number or auto (" + key + "=)");
		}
	}

	/** The macro text of this level ({@link #parse} reads it back): auto, dark, fit, fit-smooth, dark-or-median, by-psf, 0 or the number. */
	public String macroValue() {
		return switch (kind) {
		case ESTIMATED -> "auto";
		case DARK -> "dark";
		case FIT -> "fit";
		case FIT_SMOOTH -> "fit-smooth";
		case DARK_OR_MEDIAN -> "dark-or-median";
		case BY_PSF -> "by-psf";
		case NONE -> "0";
		default -> org.parfocal.provenance.MacroOptions.number(value);
		};
	}

	@Override
	public String toString() {
		return kind == Kind.VALUE ? Double.toString(value) : kind.name().toLowerCase(java.util.Locale.ROOT);
	}
}
