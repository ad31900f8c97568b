package org.parfocal.deconv;

import java.util.Locale;

/**
 * A constant background b estimated jointly with the object inside Richardson–Lucy ({@code background=fit}).
 * <p>
 * For the Poisson model y ~ Poisson(Hx + b), b is one more unknown with a "PSF" of 1 at every data voxel, so
 * the expectation–maximisation step of Shepp &amp; Vardi (IEEE Trans. Med. Imaging 1(2), 1982) and Lange &amp;
 * Carson (J. Comput. Assist. Tomogr. 8(2), 1984) (both from memory) updates it beside the object, from the
 * same ratio y / (Hx + b) the object update uses:
 * <pre>
 *   b ← b · (1/N) Σ_i y_i / (Hx + b)_i
 * </pre>
 * over the N data voxels: the recorded window only (with non-circulant edges the model has no data beyond it),
 * saturated (masked) voxels left out. Like the object's, the step keeps b ≥ 0 and never lowers the likelihood
 * (joint EM). b and a constant part of x explain the data alike; the positivity of x in dark regions is what
 * pins b down, so the fit needs a start above 0 (a multiplicative update cannot leave 0): the darkest-region
 * estimate ({@link Preprocessing#estimateDarkBackground}), at least {@link #MIN_START} of the mean data value.
 * <p>
 * Known bias: as Richardson–Lucy goes on fitting the noise, the object (kept ≥ 0) takes up the background's
 * upward fluctuations in dark regions, so the fitted b drifts below the truth with the iteration count
 * (measured on a seeded simulation with b = 20: −3 % after 20 RL iterations, −16 % after 200; faster with the
 * accelerated method, slower with total variation). A slowly varying background is fitted as a constant at or
 * below its low end.
 * <p>
 * The solver sums the ratio per window row (fixed order, so the fit does not depend on the thread count) and
 * calls {@link #update} once per iteration.
 */
public final class BackgroundFit {

	/** Smallest start, relative to the mean of the data. */
	public static final double MIN_START = 0.01;

	private final double start;
	private double value;
	private int updates;

	/** A fit starting at {@code start} (≥ 0; a start of 0 stays 0). */
	public BackgroundFit(final double start) {
		if (!(start >= 0) || !Double.isFinite(start)) throw new IllegalArgumentException("The background start must be 0 or more, got " + start);
		this.start = start;
		this.value = start;
	}

	/** The start for data y (offset removed; NaN = masked): the darkest-region estimate, at least {@link #MIN_START} of the mean. */
	public static double start(final float[] y, final int nx, final int ny, final int nz) {
		double sum = 0;
		long n = 0;
		for (final float v : y)
			if (v == v) { sum += v; n++; }
		final float[] clean = y.clone();
		for (int i = 0; i < clean.length; i++) if (clean[i] != clean[i]) clean[i] = (float) (sum / Math.max(1, n));
		return Math.max(Preprocessing.estimateDarkBackground(clean, nx, ny, nz), MIN_START * sum / Math.max(1, n));
	}

	/** The EM step b ← b · ratioSum / voxels (ratioSum = Σ y/(Hx + b) over the voxels used); returns the new b. */
	public static double step(final double b, final double ratioSum, final long voxels) {
		if (voxels <= 0) return b;
		final double next = b * ratioSum / voxels;
		return next >= 0 && Double.isFinite(next) ? next : b;
	}

	/** Applies one EM step to the current value and returns it. */
	public double update(final double ratioSum, final long voxels) {
		value = step(value, ratioSum, voxels);
		updates++;
		return value;
	}

	/** The current value. */
	public double value() {
		return value;
	}

	public double start() {
		return start;
	}

	/** EM steps done. */
	public int updates() {
		return updates;
	}

	/** One line for the Log and the provenance. */
	public String describe() {
		return String.format(Locale.ROOT, "Background fitted with the object: %.4g (maximum-likelihood EM update over %d iterations, start %.4g from the darkest region)",
				value, updates, start);
	}
}
