package org.parfocal.ij1;

import java.util.Arrays;

import ij.CompositeImage;
import ij.ImagePlus;
import ij.process.ImageProcessor;

/**
 * Where a new stack opens: on the plane with the most signal and with a display range that shows faint structure
 * beside bright puncta. Used for the sample stacks and, outside macros, for the results of Deconvolve and Blind
 * Deconvolve (a macro's result keeps ImageJ's first plane and full range, as before, so recorded macros that read
 * the current plane or convert to 8-bit give what they gave). Display only: pixels are not changed.
 */
public final class FirstView {

	private FirstView() {}

	/** {@link #showSomething} unless a macro drives the command. */
	static void forPerson(final ImagePlus imp) {
		if (!Commands.isMacro()) showSomething(imp);
	}

	/**
	 * Moves to the plane with the most signal (largest sum above the stack's median) and sets, per channel, a
	 * display range from the stack's median to its 99.9th percentile, so that faint structure shows beside bright
	 * puncta. Pixels are not changed.
	 */
	public static void showSomething(final ImagePlus imp) {
		final int nc = imp.getNChannels(), nz = imp.getNSlices();
		int bestZ = 1;
		double best = Double.NEGATIVE_INFINITY;
		final double[][] range = new double[nc][];
		for (int c = 1; c <= nc; c++) {
			final float[] all = new float[imp.getWidth() * imp.getHeight() * nz];
			for (int z = 1; z <= nz; z++) {
				final ImageProcessor ip = imp.getStack().getProcessor(imp.getStackIndex(c, z, 1));
				for (int i = 0; i < ip.getPixelCount(); i++) all[(z - 1) * ip.getPixelCount() + i] = ip.getf(i);
			}
			final float[] sorted = all.clone();
			Arrays.sort(sorted);
			final double median = sorted[sorted.length / 2], high = sorted[(int) Math.min(sorted.length - 1, Math.floor(0.999 * sorted.length))];
			range[c - 1] = new double[] { median, high > median ? high : sorted[sorted.length - 1] };
			if (c == 1) {
				final int plane = imp.getWidth() * imp.getHeight();
				for (int z = 0; z < nz; z++) {
					double sum = 0;
					for (int i = 0; i < plane; i++) sum += Math.max(0, all[z * plane + i] - median);
					if (sum > best) {
						best = sum;
						bestZ = z + 1;
					}
				}
			}
		}
		imp.setPosition(1, bestZ, 1);
		if (imp instanceof CompositeImage ci) {
			for (int c = 1; c <= nc; c++) {
				ci.setPositionWithoutUpdate(c, bestZ, 1);
				ci.setDisplayRange(range[c - 1][0], range[c - 1][1]);
			}
			ci.setPosition(1, bestZ, 1);
		} else imp.setDisplayRange(range[0][0], range[0][1]);
	}
}
