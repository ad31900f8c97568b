package org.parfocal.core;

/**
 * Sums of float arrays in double precision with Neumaier's compensation (Neumaier 1974), so that flux
 * checks over tens of millions of voxels are exact to well below 1e-6 relative. The order of summation is
 * fixed, so results do not depend on the number of threads.
 * <p>
 * Written by hand: ImgLib2's {@code RealSum} does the same on {@code RealType}s, but the core's hot loops
 * run on primitive arrays.
 */
public final class Sums {

	private Sums() {}

	public static double sum(final float[] a) {
		return sum(a, 0, a.length);
	}

	public static double sum(final float[] a, final int from, final int to) {
		double s = 0, c = 0;
		for (int i = from; i < to; i++) {
			final double v = a[i];
			final double t = s + v;
			c += Math.abs(s) >= Math.abs(v) ? (s - t) + v : (v - t) + s;
			s = t;
		}
		return s + c;
	}

	/** Σ a[i]·b[i] with compensation. */
	public static double dot(final float[] a, final float[] b) {
		if (a.length != b.length) throw new IllegalArgumentException("Arrays differ in length: " + a.length + " vs " + b.length);
		double s = 0, c = 0;
		for (int i = 0; i < a.length; i++) {
			final double v = (double) a[i] * b[i];
			final double t = s + v;
			c += Math.abs(s) >= Math.abs(v) ? (s - t) + v : (v - t) + s;
			s = t;
		}
		return s + c;
	}
}
