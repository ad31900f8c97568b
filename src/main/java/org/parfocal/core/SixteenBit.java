package org.parfocal.core;

import java.util.Locale;

/**
 * 16-bit storage of a 32-bit result ({@code output=16-bit}), for tools that expect camera-like data:
 * {@code value = offset + scale · stored}, with offset = the smallest value of the whole output, scale = its
 * range ÷ {@value #MAX_STORED}, stored = round((value − offset) ÷ scale), so each value is within half a step
 * (scale ÷ 2) of the 32-bit one. One scaling for the whole output (every plane, block, channel and frame), so
 * ratios between its parts are kept. Used by the menu command ({@code ij1/OutputDepth}) and the block-wise
 * TIFF output ({@code cli/TiffBlockSink}), which both record the offset and scale.
 */
public final class SixteenBit {

	/** The macro value of the 32-bit output (the default) and of the 16-bit one. */
	public static final String FLOAT_KEY = "32-bit", KEY = "16-bit";
	/** The words the dialog shows for each (macros may give them too). */
	public static final String FLOAT_WORDS = "32-bit float (exact values)", WORDS = "16-bit, scaled (value = offset + scale x stored)";
	/** The largest stored value. */
	public static final int MAX_STORED = 65535;

	private SixteenBit() {}

	/**
	 * Reads an {@code output=} value (or its words): true for 16-bit, false for 32-bit or null (no key).
	 *
	 * @throws IllegalArgumentException one line naming the values
	 */
	public static boolean requested(final String value) {
		if (value == null) return false;
		final String t = value.trim();
		if (t.equalsIgnoreCase(FLOAT_KEY) || t.equalsIgnoreCase(FLOAT_WORDS)) return false;
		if (t.equalsIgnoreCase(KEY) || t.equalsIgnoreCase(WORDS)) return true;
		throw new IllegalArgumentException("Unknown output depth '" + value + "': use 32-bit or 16-bit (output=)");
	}

	/** How stored values map to real ones: {@code value = offset + scale · stored}. */
	public record Scaling(double offset, double scale) {

		/** The scaling of values from {@code min} to {@code max}: the range fills 0 … {@value SixteenBit#MAX_STORED}. */
		public static Scaling of(final double min, final double max) {
			return new Scaling(min, max > min ? (max - min) / MAX_STORED : 1);
		}

		/** The real value of a stored one. */
		public double value(final int stored) {
			return offset + scale * stored;
		}

		/** The stored value of a real one (nearest, clamped to 0 … {@value SixteenBit#MAX_STORED}). */
		public short stored(final float value) {
			return (short) Math.max(0, Math.min(MAX_STORED, Math.round((value - offset) / scale)));
		}

		/** The stored values of {@code values} (as ImageJ keeps 16-bit pixels: unsigned in a short). */
		public short[] stored(final float[] values) {
			final short[] s = new short[values.length];
			for (int k = 0; k < values.length; k++) s[k] = stored(values[k]);
			return s;
		}

		/** The line added to the output's Info. */
		public String infoLine() {
			return String.format(Locale.ROOT, "Parfocal 16-bit output: value = offset + scale x stored, offset = %s, scale = %s", text(offset), text(scale));
		}

		private static String text(final double v) {
			return v == Math.rint(v) && Math.abs(v) < 1e15 ? Long.toString((long) v) : Double.toString(v);
		}
	}

	/** The smallest and largest value seen, for the scaling of a whole output read in parts. */
	public static final class Range {
		private double min = Double.POSITIVE_INFINITY, max = Double.NEGATIVE_INFINITY;

		/**
		 * Adds values. @throws IllegalArgumentException for a value that is not finite (a 16-bit value cannot
		 * hold it)
		 */
		public Range add(final float[] values) {
			double lo = min, hi = max;
			for (final float v : values) {
				if (!Float.isFinite(v)) throw new IllegalArgumentException("The result holds a value that is not finite: keep output=32-bit");
				if (v < lo) lo = v;
				if (v > hi) hi = v;
			}
			min = lo;
			max = hi;
			return this;
		}

		/** The scaling of the values added (offset 0, scale 1 when none were). */
		public Scaling scaling() {
			return min > max ? Scaling.of(0, 0) : Scaling.of(min, max);
		}
	}
}
