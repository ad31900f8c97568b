package org.parfocal.ij1;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.ShortProcessor;

import org.parfocal.core.SixteenBit;

/**
 * The bit depth of a command's output ({@code output=} key). {@link #FLOAT} (32-bit, the default: an absent key
 * means it, so macros recorded before the key existed reproduce) keeps the computed values exactly;
 * {@link #SCALED_16} stores 16-bit values for tools that expect camera-like data, with
 * {@code value = offset + scale · stored} ({@link SixteenBit}: offset = the smallest value of the whole output,
 * scale = its range ÷ 65535, each value within half a step of the 32-bit one). The scale and offset go into the provenance ({@code output_scale}, {@code output_offset}), a line
 * of the Info, and ImageJ's calibration function (a straight line), so ImageJ shows and measures the real values.
 * One scale for all channels and frames keeps their ratios.
 */
enum OutputDepth {
	FLOAT(SixteenBit.FLOAT_KEY, SixteenBit.FLOAT_WORDS), SCALED_16(SixteenBit.KEY, SixteenBit.WORDS);

	/** The largest stored value of a 16-bit output. */
	static final int MAX_STORED = SixteenBit.MAX_STORED;

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
		return SixteenBit.requested(s == null ? "" : s) ? SCALED_16 : FLOAT;
	}

	/** How stored values map to real ones: {@code value = offset + scale · stored}. */
	record Scaling(double offset, double scale) {
		double value(final int stored) {
			return offset + scale * stored;
		}
	}

	/**
	 * Converts a 32-bit output in place to this depth (nothing for {@link #FLOAT}); returns the scaling, or null
	 * for 32-bit. Non-finite values are refused (a 16-bit value cannot hold them). The numbers are
	 * {@link SixteenBit}'s, shared with the block-wise outputs.
	 */
	Scaling apply(final ImagePlus out) {
		if (this == FLOAT) return null;
		final ImageStack st = out.getStack();
		final SixteenBit.Range range = new SixteenBit.Range();
		for (int i = 1; i <= st.getSize(); i++) range.add((float[]) st.getPixels(i));
		final SixteenBit.Scaling sc = range.scaling();
		final ImageStack s16 = new ImageStack(st.getWidth(), st.getHeight());
		for (int i = 1; i <= st.getSize(); i++)
			s16.addSlice(st.getSliceLabel(i), new ShortProcessor(st.getWidth(), st.getHeight(), sc.stored((float[]) st.getPixels(i)), null));
		final int[] dims = out.getDimensions();
		out.setStack(s16, dims[2], dims[3], dims[4]);
		final Calibration cal = out.getCalibration();
		cal.setImage(out); // a calibration made for a 32-bit image refuses a function
		cal.setFunction(Calibration.STRAIGHT_LINE, new double[] { sc.offset(), sc.scale() }, "intensity");
		out.resetDisplayRange();
		final Object info = out.getProperty("Info");
		out.setProperty("Info", (info instanceof String t && !t.isBlank() ? t + "\n" : "") + sc.infoLine());
		return new Scaling(sc.offset(), sc.scale());
	}

	/** The Info line of a 16-bit output. */
	static String infoLine(final Scaling s) {
		return new SixteenBit.Scaling(s.offset(), s.scale()).infoLine();
	}
}
