package org.parfocal.blind;

import java.util.Arrays;

import org.parfocal.core.Parallel;
import org.parfocal.core.Sums;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.RichardsonLucyEngine;
import org.parfocal.deconv.Sensitivity;
import org.parfocal.deconv.TvRow;
import org.parfocal.fft.RealFft;

/**
 * The alternating engine: Richardson–Lucy (optionally with total variation) updates of the object x and of
 * the PSF h on one FFT grid, both on the {@link RichardsonLucyEngine}.
 * <p>
 * <b>Object update</b>: {@link RichardsonLucyEngine#objectStep}, the method the non-blind solver iterates
 * (geometry of image window, object domain and FFT grid, floor of Hx + b, Hᵀ1 weighting for non-circulant
 * edges, Dey et al. 2006 TV form, the same pruned in-place convolutions {@link RealFft#convolveInPlace}), so
 * with the PSF held fixed the result is {@code org.parfocal.deconv.Deconvolution}'s by construction.
 * <p>
 * <b>PSF update</b> (Holmes, J. Opt. Soc. Am. A 9, 1992; Fish et al., J. Opt. Soc. Am. A 12, 1995): the same
 * multiplicative form with the roles exchanged, h(j) ← h(j) · (Xᵀ r)(j) / (Xᵀ 1)(j) / (1 − λ_h div(∇h/|∇h|)),
 * r = y / (Hx + b) (the engine's ratio row), Xᵀ the correlation with the object; the TV factor is the Dey et
 * al. form applied to the PSF (the idea of TV on the PSF is Chan &amp; Wong, IEEE Trans. Image Process. 7,
 * 1998). Then the constraints ({@link PsfConstraints}). Xᵀ1(j), the sum of x over the image window shifted by
 * j, is the correlation of x with the window's indicator, made from the kept spectrum of x and the indicator's
 * separable transform (one product and one inverse pruned to the PSF's rows); Hᵀ1 after a PSF change comes from
 * a summed-area table of h (exact box sums, in double).
 * <p>
 * <b>FFT economy.</b> A PSF update needs the spectrum X of the current object; it is kept, and reused by the
 * next object update for H x (one pruned inverse transform instead of a fused convolution) as long as x has
 * not changed. The PSF offsets wrap around the origin of the grid, so the rows of Xᵀ r that are read are not
 * one box; the PSF update therefore works with everything shifted by the PSF centre c (when the grid has room
 * for it, i.e. not with periodic edges): H x is made shifted by +c (X · T times the phase ramp of the shift),
 * so the ratio sits in the window moved by +c, and Xᵀ of that shifted ratio has the PSF offsets in the box
 * [0, k) of rows: the correlation's inverse transform is pruned to those few rows. Likewise the new transfer
 * function is the transform of h placed at the origin (a pruned forward transform of k rows) times the phase
 * ramp back by −c. The phase ramps change the PSF step only by float rounding.
 * <p>
 * Reductions are the engine's (per grid row, combined in row order with compensation); the PSF steps are
 * single-threaded or row-wise: 1 and N threads give identical results.
 */
final class BlindSolver {

	private final RichardsonLucyEngine e;
	private final int[] n;
	private final int mx, my, mz, px, py, pz, kx, ky, kz;
	/** Floats per row of the in-place grids. */
	private final int rs;
	/** Shift of the PSF step (the PSF centre, or 0 when the grid has no room: periodic edges). */
	private final int sx0, sy0, sz0;
	private final EdgeMode mode;
	private final RealFft fft;
	/** Rows of the window moved by the shift, of the PSF offsets read, of the kernel placed at the origin. */
	private final RealFft.Rows shiftedWindowRows, psfRows, kernelRows;
	/** The spectrum of x (in place); swapped with the engine's working grid, never reallocated. */
	private float[] spec;
	private final float[] h, g;
	private final float lambdaH, epsH;
	/** Phase ramps exp(−2πi k·s/p) of the shift s per axis, (re, im) per frequency; null without shift. */
	private final double[] phaseX, phaseY, phaseZ;
	private final PsfConstraints constraints;
	/** spec holds the spectrum of the current x (scaled by 1/(py·pz) once specScaled); t holds x on the object rows. */
	private boolean specValid, specScaled, tHoldsX;
	/**
	 * The transform of the indicator of the window moved by the shift, one factor per axis (the indicator of a
	 * box is separable): (re, im) per frequency, in double; Xᵀ1 is the correlation of x with that indicator.
	 */
	private final double[] windowY, windowZ;
	/** The x factor of the indicator's transform in float, for the per-voxel product. */
	private final float[] windowXf;
	/** Xᵀ1 at the PSF offsets of the last PSF update (box array). */
	private final float[] windowSums;

	/**
	 * @param psf the starting PSF on its box (unit sum within 1e-4, non-negative)
	 * @param y offset-corrected data, non-negative (kept, not copied)
	 */
	BlindSolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background, final double objectTv,
			final double psfTv, final PsfConstraints constraints) {
		final int[] k = psf.shape();
		this.h = psf.data().clone();
		this.e = new RichardsonLucyEngine(h, k, n, mode, y, background, objectTv > 0 ? RichardsonLucyEngine.Update.TV : RichardsonLucyEngine.Update.RL,
				objectTv, null, null, false);
		this.n = n.clone();
		this.mode = mode;
		this.constraints = constraints;
		this.g = new float[h.length];
		this.fft = e.fft();
		final int[] m = e.objectShape(), w = e.windowStart(), p = e.gridShape();
		kx = k[0]; ky = k[1]; kz = k[2];
		mx = m[0]; my = m[1]; mz = m[2];
		px = p[0]; py = p[1]; pz = p[2];
		rs = fft.rowStride();
		// the shifted window [w + c, w + c + n) and the PSF box [0, k) fit in the grid without wrap-around
		// exactly when p ≥ n + k − 1, i.e. for zero and non-circulant edges
		boolean room = true;
		for (int d = 0; d < 3; d++) room &= w[d] + (k[d] - 1) / 2 + n[d] <= p[d] && k[d] <= p[d];
		sx0 = room ? (kx - 1) / 2 : 0;
		sy0 = room ? (ky - 1) / 2 : 0;
		sz0 = room ? (kz - 1) / 2 : 0;
		this.shiftedWindowRows = e.windowRows(sy0, sz0);
		this.psfRows = room ? fft.rows(0, ky, 0, kz) : fft.allRows();
		this.kernelRows = room ? fft.rows(0, ky, 0, kz) : null;
		final boolean shifted = sx0 != 0 || sy0 != 0 || sz0 != 0;
		phaseX = shifted ? phaseRamp(sx0, px, px / 2 + 1) : null;
		phaseY = shifted ? phaseRamp(sy0, py, py) : null;
		phaseZ = shifted ? phaseRamp(sz0, pz, pz) : null;
		this.spec = fft.newGrid();
		this.lambdaH = (float) psfTv;
		this.epsH = (float) Math.max(RichardsonLucyEngine.TV_EPSILON / h.length, Float.MIN_NORMAL);
		tHoldsX = true;
		final double[] windowX = boxTransform(w[0] + sx0, n[0], px, px / 2 + 1);
		windowY = boxTransform(w[1] + sy0, n[1], py, py);
		windowZ = boxTransform(w[2] + sz0, n[2], pz, pz);
		windowSums = new float[h.length];
		windowXf = new float[windowX.length];
		for (int i = 0; i < windowX.length; i++) windowXf[i] = (float) windowX[i];
	}

	/**
	 * Σ_{t ∈ [a, a + len)} exp(−2πi f t/p) for f in [0, count), interleaved (re, im), in double: one axis of the
	 * forward transform of a box's indicator (the sign of the forward transforms, checked by
	 * {@code BlindSolverTest} against direct box sums).
	 */
	private static double[] boxTransform(final int a, final int len, final int p, final int count) {
		final double[] d = new double[2 * count];
		for (int f = 0; f < count; f++) {
			double re = 0, im = 0;
			for (int t = a; t < a + len; t++) {
				final double ang = -2 * Math.PI * (((long) f * t) % p) / p;
				re += Math.cos(ang);
				im += Math.sin(ang);
			}
			d[2 * f] = re;
			d[2 * f + 1] = im;
		}
		return d;
	}

	/** exp(−2πi f·s/p) for f in [0, count), interleaved (re, im), in double. */
	private static double[] phaseRamp(final int s, final int p, final int count) {
		final double[] e = new double[2 * count];
		for (int f = 0; f < count; f++) {
			final double a = -2 * Math.PI * (((long) f * s) % p) / p;
			e[2 * f] = Math.cos(a);
			e[2 * f + 1] = Math.sin(a);
		}
		return e;
	}

	/** Bytes the solver allocates (prepared data included), for a memory check before starting. */
	static long bytesNeeded(final int[] n, final int[] k, final EdgeMode mode) {
		final int[] m = mode.domains(n, k).object();
		return RichardsonLucyEngine.bytesNeeded(n, k, mode, 3, 0) + 8L * m[0] * m[1] * k[2];
	}

	// -- updates --

	/** One object update ({@link RichardsonLucyEngine#objectStep}); {@code cancelCheck} runs between the two transforms. */
	RichardsonLucyEngine.Step objectUpdate(final Runnable cancelCheck) {
		final boolean blurred = blur();
		final RichardsonLucyEngine.Step s = e.objectStep(cancelCheck, blurred);
		specValid = false;
		tHoldsX = true;
		return s;
	}

	/**
	 * Readies the engine's grid for an object step or an evaluation: H x on the window rows from the kept
	 * spectrum (returns true), else x on the object rows (returns false).
	 */
	private boolean blur() {
		if (specValid) {
			productInverse(false);
			return true;
		}
		if (!tHoldsX) e.copyObjectToGrid();
		return false;
	}

	/** One PSF update followed by the constraints; relative change is Σ|h_new − h| (both unit sum). */
	RichardsonLucyEngine.Step psfUpdate(final Runnable cancelCheck) {
		if (!specValid) {
			if (!tHoldsX) e.copyObjectToGrid();
			fft.forwardInPlace(e.grid(), e.objectRows());
			swapGrid();
			specValid = true;
			specScaled = false;
		}
		productInverse(true);
		tHoldsX = false;
		cancelCheck.run();
		// t ← r ⋆ x: correlation of the (shifted) ratio with the object, only the rows of the PSF offsets made
		fft.convolveInPlace(e.grid(), spec, true, shiftedWindowRows, e.ratioRow(sx0, sy0, sz0), psfRows, null);
		final double[] sums = e.ratioSums();
		e.gatherKernel(e.grid(), g, sx0, sy0, sz0);
		final float[] norm = objectWindowSums();
		final float[] old = h.clone();
		for (int j = 0; j < h.length; j++) {
			float v = norm[j] > 0 ? (float) (old[j] * (double) g[j] / norm[j]) : 0f;
			if (lambdaH > 0) v = v / (1f - lambdaH * TvRow.divergence(old, j, j % kx, (j / kx) % ky, j / (kx * ky), kx, ky, kz, epsH));
			h[j] = v > 0 ? v : 0f;
		}
		constraints.apply(h);
		double change = 0;
		for (int j = 0; j < h.length; j++) change += Math.abs(h[j] - old[j]);
		cancelCheck.run();
		newTransfer();
		if (mode == EdgeMode.NON_CIRCULANT) updateSensitivity();
		return new RichardsonLucyEngine.Step(sums[0], sums[1], change, Sums.sum(h), sums[2]);
	}

	/** spec ↔ the engine's working grid. */
	private void swapGrid() {
		final float[] s = spec;
		spec = e.grid();
		e.setGrid(s);
	}

	/**
	 * Sets independent validation data of the image's shape (null: none), e.g. the other half of a Poisson
	 * thinning of the recording: every step then also reports its log-likelihood under the same model Hx + b.
	 */
	void validateWith(final float[] v) {
		e.validateWith(v);
	}

	/**
	 * Replaces the PSF (same box; non-negative, unit sum) without touching the object: new transfer function
	 * and, for non-circulant edges, new Hᵀ1.
	 */
	void replacePsf(final float[] next) {
		if (next.length != h.length) throw new IllegalArgumentException("The PSF box does not match");
		System.arraycopy(next, 0, h, 0, h.length);
		tHoldsX = false;
		newTransfer();
		if (mode == EdgeMode.NON_CIRCULANT) updateSensitivity();
	}

	/**
	 * Log-likelihood of the current object and PSF without an update: {data, validation data (NaN without)}.
	 * One convolution.
	 */
	double[] evaluate() {
		final boolean blurred = blur();
		tHoldsX = false;
		final double[] s = e.evaluate(blurred);
		return new double[] { s[0], s[2] };
	}

	/**
	 * transfer ← the transfer function of h (scaled by 1/(py·pz) as {@link RealFft#transferFunction}). With a
	 * shift: the pruned transform of h placed at the origin (the k rows that hold it), times the phase ramp
	 * of −c; without: the plain transform of the centred kernel. t is the working grid; the two are swapped.
	 */
	private void newTransfer() {
		final float[] t = e.grid();
		if (kernelRows == null) {
			Arrays.fill(t, 0f);
			e.placeKernel(h, t, 0, 0, 0);
			fft.transferFunctionInPlace(t);
		} else {
			for (int z = 0; z < kz; z++)
				for (int yy = 0; yy < ky; yy++) {
					final int o = rs * (yy + py * z);
					System.arraycopy(h, kx * (yy + ky * z), t, o, kx);
					Arrays.fill(t, o + kx, o + px, 0f);
				}
			fft.forwardInPlace(t, kernelRows);
			final float[] tt = t;
			final double s = 1.0 / ((double) py * pz);
			final int hx = px / 2 + 1;
			Parallel.forRange(py * pz, r -> {
				final int iy = r % py, iz = r / py;
				// conjugate ramp: the shift back by −c
				final double yr = phaseY[2 * iy] * phaseZ[2 * iz] - phaseY[2 * iy + 1] * phaseZ[2 * iz + 1];
				final double yi = phaseY[2 * iy] * phaseZ[2 * iz + 1] + phaseY[2 * iy + 1] * phaseZ[2 * iz];
				for (int f = 0, i = r * rs; f < hx; f++, i += 2) {
					final double er = phaseX[2 * f], ei = phaseX[2 * f + 1];
					final double pr = (yr * er - yi * ei) * s, pi = -(yr * ei + yi * er) * s;
					final double ar = tt[i], ai = tt[i + 1];
					tt[i] = (float) (ar * pr - ai * pi);
					tt[i + 1] = (float) (ar * pi + ai * pr);
				}
			});
		}
		e.setGrid(e.setTransfer(t));
	}

	/**
	 * t ← H x from the kept spectrum: t ← spec · transfer (times the phase ramp of the shift if
	 * {@code shifted}), then a pruned inverse transform to the window rows (moved by the shift). The first
	 * call after spec was made also scales spec by 1/(py·pz), so that it serves as a transfer function for
	 * the correlation with x.
	 */
	private void productInverse(final boolean shifted) {
		final boolean ramp = shifted && phaseX != null, scale = !specScaled;
		// transfer carries 1/(py·pz) for the fused convolution, and so does spec once scaled; inverseInPlace
		// divides by px·py·pz itself
		final double f = (double) py * pz, factor = scale ? f : f * f, s = 1.0 / f;
		final float ff = (float) factor, fs = (float) s;
		final int hx = px / 2 + 1;
		final float[] a = spec, tr = e.transfer(), tt = e.grid();
		Parallel.forRange(py * pz, r -> {
			final int e = r * rs + 2 * hx;
			if (ramp) {
				final int iy = r % py, iz = r / py;
				final double yr = phaseY[2 * iy] * phaseZ[2 * iz] - phaseY[2 * iy + 1] * phaseZ[2 * iz + 1];
				final double yi = phaseY[2 * iy] * phaseZ[2 * iz + 1] + phaseY[2 * iy + 1] * phaseZ[2 * iz];
				for (int i = r * rs, q = 0; i < e; i += 2, q += 2) {
					final double er = phaseX[q], ei = phaseX[q + 1];
					final double pr = (yr * er - yi * ei) * factor, pi = (yr * ei + yi * er) * factor;
					final double ar = a[i], ai = a[i + 1], br = tr[i], bi = tr[i + 1];
					final double cr = ar * br - ai * bi, ci = ar * bi + ai * br;
					tt[i] = (float) (cr * pr - ci * pi);
					tt[i + 1] = (float) (cr * pi + ci * pr);
					if (scale) {
						a[i] *= fs;
						a[i + 1] *= fs;
					}
				}
			} else {
				for (int i = r * rs; i < e; i += 2) {
					final float ar = a[i], ai = a[i + 1], br = tr[i] * ff, bi = tr[i + 1] * ff;
					tt[i] = ar * br - ai * bi;
					tt[i + 1] = ar * bi + ai * br;
					if (scale) {
						a[i] = ar * fs;
						a[i + 1] = ai * fs;
					}
				}
			}
		});
		specScaled = true;
		fft.inverseInPlace(tt, shifted ? shiftedWindowRows : e.windowRows(0, 0));
	}

	/**
	 * Xᵀ1 at every PSF offset j, the correlation of x with the indicator of the (shifted) image window, as the
	 * ratio's correlation is made: t ← W · conj(X) from the kept spectrum and the separable transform of the
	 * indicator, then the inverse transform pruned to the rows of the PSF offsets. This replaces box sums of the
	 * object in double (one pass over the object domain per axis, which cost more than this product and pruned
	 * inverse); in float, rounding of about 1e-7 of the largest sum. Needs spec scaled (after productInverse).
	 */
	private float[] objectWindowSums() {
		final float[] a = spec, tt = e.grid();
		final double f = (double) py * pz;
		final int hx = px / 2 + 1;
		final float[] wx = windowXf;
		Parallel.forRange(py * pz, r -> {
			final int iy = r % py, iz = r / py;
			// the y-z factor of the row, with the scale, in double; the per-voxel product in float
			final float yr = (float) ((windowY[2 * iy] * windowZ[2 * iz] - windowY[2 * iy + 1] * windowZ[2 * iz + 1]) * f);
			final float yi = (float) ((windowY[2 * iy] * windowZ[2 * iz + 1] + windowY[2 * iy + 1] * windowZ[2 * iz]) * f);
			for (int q = 0, i = r * rs; q < 2 * hx; q += 2, i += 2) {
				final float wr = yr * wx[q] - yi * wx[q + 1], wi = yr * wx[q + 1] + yi * wx[q];
				final float ar = a[i], ai = a[i + 1];
				tt[i] = wr * ar + wi * ai;
				tt[i + 1] = wi * ar - wr * ai;
			}
		});
		fft.inverseInPlace(tt, psfRows);
		e.gatherKernel(tt, windowSums, sx0, sy0, sz0);
		return windowSums;
	}

	/** Xᵀ1 at the PSF offsets as the last {@link #psfUpdate} used it (live). */
	float[] lastWindowSums() { return windowSums; }

	/**
	 * Hᵀ1 on the object domain after a PSF change ({@link Sensitivity}, from a summed-area table of h). Voxels below
	 * {@link EdgeMode#MIN_SENSITIVITY} of the largest value are held at zero, as in the non-blind engine; a
	 * voxel that was held and is seen again restarts from the starting level.
	 */
	private void updateSensitivity() {
		final float[] sens = Sensitivity.of(h, new int[] { kx, ky, kz }, n);
		final float max = Sensitivity.max(sens);
		final float min = (float) (EdgeMode.MIN_SENSITIVITY * max);
		final float[] oldInv = e.sensitivity(), x = e.object();
		final float seed = e.seed();
		final boolean[] restarted = new boolean[1];
		final boolean[] rowRestarted = new boolean[my * mz];
		Parallel.forRange(my * mz, r -> {
			for (int i = r * mx, e = i + mx; i < e; i++) {
				final float v = sens[i];
				final float inv = v >= min && v > 0 ? 1f / v : 0f;
				if (inv > 0 && oldInv[i] == 0f && x[i] == 0f) {
					x[i] = seed;
					rowRestarted[r] = true;
				}
				sens[i] = inv;
			}
		});
		for (final boolean v : rowRestarted) restarted[0] |= v;
		e.setSensitivity(sens);
		if (restarted[0]) {
			specValid = false;
			tHoldsX = false;
		}
	}

	// -- output --

	/** A copy of the object on its domain (for a warm start of another solver on the same geometry). */
	float[] objectCopy() { return e.object().clone(); }

	/** Sets the object on its domain (from {@link #objectCopy} of a solver of the same geometry). */
	void setObject(final float[] src) {
		final float[] x = e.object();
		if (src.length != x.length) throw new IllegalArgumentException("The object does not match the solver's domain");
		System.arraycopy(src, 0, x, 0, x.length);
		specValid = false;
		tHoldsX = false;
	}

	/** Held-out log-likelihood per image row (y fastest, then z) of the iterate the last update or evaluation started from. */
	double[] heldOutRows() { return e.heldOutRows(); }

	/** The current PSF (box array, live). */
	float[] psf() { return h; }

	/** Shape of the PSF box. */
	int[] psfShape() { return new int[] { kx, ky, kz }; }

	/** Σ over the object domain. */
	double objectSum() { return Sums.sum(e.object()); }

	/** Value of the estimate at image voxel (ix, iy, iz). */
	float objectAt(final int ix, final int iy, final int iz) {
		return e.objectAt(ix, iy, iz);
	}

	/** dst ← the estimate on the image window. */
	void crop(final float[] dst) {
		e.crop(dst);
	}
}
