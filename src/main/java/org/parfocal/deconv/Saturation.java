package org.parfocal.deconv;

import java.util.Locale;

import org.parfocal.core.Volume;

/**
 * Saturated voxels of a recording: the camera clipped them at its largest value, so they tell only that the
 * light was at least that much. Detected when the image holds integer values only and its maximum is reached
 * by at least two voxels and is either a type maximum (255, 4095, 16383, 65535: 8-, 12-, 14- and 16-bit
 * cameras) or a spike in the histogram (at least 10 voxels at the maximum and more than four times as many as
 * in the 1 % of the range just below it).
 * <p>
 * Richardson–Lucy then leaves them out of the data term: there the ratio y/(Hx + b) is replaced by 1, the
 * expectation step of EM for missing observations (Dempster, Laird &amp; Rubin, J. R. Stat. Soc. B 39(1), 1977),
 * so the update maximises the Poisson likelihood of the other voxels only.
 *
 * @param value the saturation level (raw units)
 * @param count voxels at it
 */
public record Saturation(double value, int count) {

	private static final double[] TYPE_MAXIMA = { 255, 4095, 16383, 65535 };

	/** The saturated voxels of {@code image}, or null when it shows none. */
	public static Saturation detect(final Volume image) {
		final float[] a = image.data();
		float max = Float.NEGATIVE_INFINITY;
		for (final float v : a) {
			if (v != Math.rint(v)) return null; // not camera counts
			if (v > max) max = v;
		}
		if (!(max > 0)) return null;
		int at = 0, below = 0;
		final double delta = Math.max(1, 0.01 * max);
		for (final float v : a) {
			if (v == max) at++;
			else if (v >= max - delta) below++;
		}
		if (at < 2) return null;
		boolean typeMax = false;
		for (final double t : TYPE_MAXIMA) typeMax |= max == t;
		if (typeMax || (at >= 10 && at > 4 * below)) return new Saturation(max, at);
		return null;
	}

	/** The warning for the Log and the notes. */
	public String describe(final int voxels) {
		return String.format(Locale.ROOT, "%d voxels (%.2g%%) are saturated (at %.6g): left out of the data term", count, 100.0 * count / voxels, value);
	}
}
