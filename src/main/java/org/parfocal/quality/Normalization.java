package org.parfocal.quality;

import java.util.Locale;

import org.parfocal.core.Parallel;
import org.parfocal.core.RobustStats;
import org.parfocal.core.Volume;

/**
 * Robust intensity normalisation of one image: v ↦ (v − P_low) / (P_high − P_low), with P the percentiles of
 * the image itself ({@link RobustStats#percentiles}, NumPy's "linear" definition). Images from different
 * microscopes, exposures and offsets are thus put on one scale where the dim background sits near 0 and the
 * bright structures near 1, while a few hot pixels (above P_high) cannot set the scale.
 */
public final class Normalization {

	private Normalization() {}

	/**
	 * {@code v} (not modified) normalised to its percentiles {@code low} and {@code high} (in percent).
	 *
	 * @param what how the image is named in messages, e.g. "Reference 2"
	 * @throws IllegalArgumentException if the image is constant (both percentiles equal) or has a non-finite value
	 */
	public static Volume robust(final Volume v, final double low, final double high, final String what) {
		if (!(low >= 0 && low < high && high <= 100))
			throw new IllegalArgumentException("Percentiles must satisfy 0 ≤ low < high ≤ 100, got " + low + " and " + high);
		final int bad = v.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException(what + " has a non-finite value (" + v.data()[bad] + ") at " + v.position(bad));
		final double[] q = RobustStats.percentiles(v.data(), low, high);
		final double range = q[1] - q[0];
		if (!(range > 1e-12 * Math.max(Math.abs(q[0]), Math.abs(q[1]))) || range == 0)
			throw new IllegalArgumentException(String.format(Locale.ROOT,
					"%s is constant or nearly so (its %s and %s percentiles are both %.6g): there is no structure to compare", what, fmt(low), fmt(high), q[0]));
		final Volume out = Volume.zeros(v.nx(), v.ny(), v.nz(), v.voxelSize());
		final float[] in = v.data(), o = out.data();
		final double lo = q[0], inv = 1 / range;
		Parallel.forRange(in.length, i -> o[i] = (float) ((in[i] - lo) * inv));
		return out;
	}

	private static String fmt(final double p) {
		return (p == Math.rint(p) ? String.valueOf((long) p) : String.valueOf(p)) + suffix(p);
	}

	private static String suffix(final double p) {
		if (p != Math.rint(p)) return "th";
		final long n = (long) p;
		if (n % 100 >= 11 && n % 100 <= 13) return "th";
		return switch ((int) (n % 10)) { case 1 -> "st"; case 2 -> "nd"; case 3 -> "rd"; default -> "th"; };
	}
}
