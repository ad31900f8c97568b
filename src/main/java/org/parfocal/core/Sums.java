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
		final Compensated s = new Compensated();
		for (int i = from; i < to; i++) s.add(a[i]);
		return s.value();
	}

	/**
	 * Σ a[i] in index order with compensation: the sum of per-row partial sums, which is then independent of
	 * the thread count that made them.
	 */
	public static double sum(final double[] a) {
		final Compensated s = new Compensated();
		for (final double v : a) s.add(v);
		return s.value();
	}

	/** Σ a[i]·b[i] with compensation. */
	public static double dot(final float[] a, final float[] b) {
		if (a.length != b.length) throw new IllegalArgumentException("Arrays differ in length: " + a.length + " vs " + b.length);
		final Compensated s = new Compensated();
		for (int i = 0; i < a.length; i++) s.add((double) a[i] * b[i]);
		return s.value();
	}

	/** A running sum with Neumaier's compensation term. Not thread-safe: one per thread or block. */
	public static final class Compensated {
		private double s, c;

		public void add(final double v) {
			final double t = s + v;
			c += Math.abs(s) >= Math.abs(v) ? (s - t) + v : (v - t) + s;
			s = t;
		}

		public double value() {
			return s + c;
		}
	}
}
