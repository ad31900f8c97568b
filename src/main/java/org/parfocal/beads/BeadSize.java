package org.parfocal.beads;

import java.util.Locale;

/**
 * The rule that decides when a bead may be taken for a point. A recorded bead is the PSF convolved with the bead's
 * fluorescent sphere. With a Gaussian PSF of full width F and a uniform solid sphere of diameter D, variances add; the
 * sphere's variance along one axis is (D/2)²/5 (second moment of a uniform ball), so the measured width is
 * F' = √(F² + 8 ln 2 · D²/20) = √(F² + 0.2773·D²). Common practice treats beads up to about half the lateral
 * resolution as points: at D = F/2 the width grows by 3.4 %, within what the average resolves. Above that Parfocal
 * warns and reports the widths corrected back in quadrature (F = √(F'² − 0.2773·D²)); it does not deconvolve the
 * average by the sphere.
 */
public final class BeadSize {

	/** Largest bead diameter, as a fraction of the lateral FWHM, that still counts as a point. */
	public static final double POINT_FRACTION = 0.5;

	/** 8 ln 2 / 20: FWHM² added by a uniform sphere of diameter D, per D². */
	static final double SPHERE = 8 * Math.log(2) / 20;

	private BeadSize() {}

	/** Relative widening F'/F − 1 of a Gaussian PSF of FWHM {@code fwhm} by a sphere of diameter {@code d}. */
	public static double widening(final double d, final double fwhm) {
		return Math.sqrt(1 + SPHERE * d * d / (fwhm * fwhm)) - 1;
	}

	/** The FWHM of the PSF alone, from a measured FWHM {@code measured} of beads of diameter {@code d}; NaN if d is too large. */
	public static double corrected(final double measured, final double d) {
		final double v = measured * measured - SPHERE * d * d;
		return v > 0 ? Math.sqrt(v) : Double.NaN;
	}

	/** Null when beads of diameter {@code d} count as points for a lateral FWHM {@code fwhm}; else one warning line. */
	public static String check(final double d, final double fwhm) {
		if (!(d > 0) || !(fwhm > 0) || d <= POINT_FRACTION * fwhm) return null;
		return String.format(Locale.ROOT,
				"Beads of %.3g µm are larger than half the lateral FWHM (%.3g µm): they widen the PSF by about %.1f %%; the widths are also given corrected for the bead size",
				d, fwhm, 100 * widening(d, fwhm));
	}
}
