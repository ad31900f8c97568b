package org.parfocal.ij1;

import java.util.Locale;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.ShortProcessor;

import org.parfocal.provenance.MacroOptions;

/**
 * The bit depth of a command's output ({@code output=} key). {@link #FLOAT} (32-bit, the default: an absent key
 * means it, so macros recorded before the key existed reproduce) keeps the computed values exactly;
 * {@link #SCALED_16} stores 16-bit values for tools that expect camera-like data, with
 * {@code value = offset + scale · stored}: offset = the smallest value of the whole output, scale = its range ÷
 * 65535, stored = round((value − offset) ÷ scale), so each value is within half a step (scale ÷ 2) of the
 * 32-bit one. The scale and offset go into the provenance ({@code output_scale}, {@code output_offset}), a line
 * of the Info, and ImageJ's calibration function (a straight line), so ImageJ shows and measures the real values.
 * One scale for all channels and frames keeps their ratios.
 */
enum OutputDepth {
	FLOAT("32-bit", "32-bit float (exact values)"), SCALED_16("16-bit", "16-bit, scaled (value = offset + scale x stored)");

	/** The largest stored value of a 16-bit output. */
	static final int MAX_STORED = 65535;

	private final String key, words;

	OutputDepth(final String key, final String words) {
		this.key = key;
		this.words = words;
	}

	/** The macro value. */
	String key() {
		return key;
	}

	/** The words the dialog shows. */
	String words() {
		return words;
	}

	static String[] keys() {
		return new String[] { FLOAT.key, SCALED_16.key };
	}

	/** @throws IllegalArgumentException one line naming the values */
	static OutputDepth parse(final String s) {
		final String t = s == null ? "" : s.trim();
		for (final OutputDepth d : values()) if (d.key.equalsIgnoreCase(t) || d.words.equalsIgnoreCase(t)) return d;
		throw new IllegalArgumentException("Unknown output depth '" + s + "': use 32-bit or 16-bit (output=)");
	}

	/** How stored values map to real ones: {@code value = offset + scale · stored}. */
	record Scaling(double offset, double scale) {
		double value(final int stored) {
			return offset + scale * stored;
		}
	}

	/**
	 * Converts a 32-bit output in place to this depth (nothing for {@link #FLOAT}); returns the scaling, or null
	 * for 32-bit. Non-finite values are refused (a 16-bit value cannot hold them).
	 */
	Scaling apply(final ImagePlus out) {
		if (this == FLOAT) return null;
		final ImageStack st = out.getStack();
		double min = Double.POSITIVE_INFINITY, max = Double.NEGATIVE_INFINITY;
		for (int i = 1; i <= st.getSize(); i++)
			for (final float v : (float[]) st.getPixels(i)) {
				if (!Float.isFinite(v)) throw new IllegalArgumentException("The result holds a value that is not finite: keep output=32-bit");
				min = Math.min(min, v);
				max = Math.max(max, v);
			}
		final double offset = min, scale = max > min ? (max - min) / MAX_STORED : 1;
		final ImageStack s16 = new ImageStack(st.getWidth(), st.getHeight());
		for (int i = 1; i <= st.getSize(); i++) {
			final float[] f = (float[]) st.getPixels(i);
			final short[] s = new short[f.length];
			for (int k = 0; k < f.length; k++) s[k] = (short) Math.max(0, Math.min(MAX_STORED, Math.round((f[k] - offset) / scale)));
			s16.addSlice(st.getSliceLabel(i), new ShortProcessor(st.getWidth(), st.getHeight(), s, null));
		}
		final int[] dims = out.getDimensions();
		out.setStack(s16, dims[2], dims[3], dims[4]);
		final Calibration cal = out.getCalibration();
		cal.setImage(out); // a calibration made for a 32-bit image refuses a function
		cal.setFunction(Calibration.STRAIGHT_LINE, new double[] { offset, scale }, "intensity");
		out.resetDisplayRange();
		final Scaling sc = new Scaling(offset, scale);
		final Object info = out.getProperty("Info");
		out.setProperty("Info", (info instanceof String t && !t.isBlank() ? t + "\n" : "") + infoLine(sc));
		return sc;
	}

	/** The Info line of a 16-bit output. */
	static String infoLine(final Scaling s) {
		return String.format(Locale.ROOT, "Parfocal 16-bit output: value = offset + scale x stored, offset = %s, scale = %s",
				MacroOptions.number(s.offset()), MacroOptions.number(s.scale()));
	}
}
