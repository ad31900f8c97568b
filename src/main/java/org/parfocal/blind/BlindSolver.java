package org.parfocal.blind;

import java.util.Arrays;

import org.parfocal.core.FastLog;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Sensitivity;
import org.parfocal.deconv.TvRow;
import org.parfocal.fft.RealFft;

/**
 * The alternating engine: Richardson–Lucy (optionally with total variation) updates of the object x and of
 * the PSF h on one FFT grid.
 * <p>
 * <b>Object update</b>: the non-blind engine's update, operation for operation (geometry of image window,
 * object domain and FFT grid, floor of Hx + b, Hᵀ1 weighting for non-circulant edges, Dey et al. 2006 TV
 * form, the same pruned in-place convolutions {@link RealFft#convolveInPlace}), so that with the PSF held
 * fixed the result equals {@code org.parfocal.deconv.Deconvolution} bit for bit: t ← H x (object rows in,
 * window rows out), t ← y / max(t + b, floor) in the window (made row by row just before the next
 * convolution transforms it), t ← Hᵀ t (window rows in, object rows out), x ← x · t / Hᵀ1 / (1 − λ div(∇x/|∇x|))
 * row by row as the rows come out.
 * <p>
 * <b>PSF update</b> (Holmes, J. Opt. Soc. Am. A 9, 1992; Fish et al., J. Opt. Soc. Am. A 12, 1995): the same
 * multiplicative form with the roles exchanged, h(j) ← h(j) · (Xᵀ r)(j) / (Xᵀ 1)(j) / (1 − λ_h div(∇h/|∇h|)),
 * r = y / (Hx + b), Xᵀ the correlation with the object; the TV factor is the Dey et al. form applied to the
 * PSF (the idea of TV on the PSF is Chan &amp; Wong, IEEE Trans. Image Process. 7, 1998). Then the constraints
 * ({@link PsfConstraints}). Xᵀ1(j), the sum of x over the image window shifted by j, comes from separable
 * sliding sums; Hᵀ1 after a PSF change from a summed-area table of h (both exact box sums, in double).
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
 * Reductions are per grid row, combined in row order with compensation; the PSF steps are single-threaded
 * or row-wise: 1 and N threads give identical results.
 */
final class BlindSolver {

	/** The non-blind engine's floor of Hx + b and TV ε, relative to the mean of y (its constants, kept equal). */
	static final double FLOOR = 1e-6, TV_EPSILON = 1e-4;

	private final int nx, ny, nz, mx, my, mz, wx, wy, wz, px, py, pz, kx, ky, kz;
	/** Floats per row of the in-place grids. */
	private final int rs;
	/** Shift of the PSF step (the PSF centre, or 0 when the grid has no room: periodic edges). */
	private final int sx0, sy0, sz0;
	private final EdgeMode mode;
	private final RealFft fft;
	/** Rows of the object domain, of the image window, of the window moved by the shift, of the PSF offsets read. */
	private final RealFft.Rows objectRows, windowRows, shiftedWindowRows, psfRows, kernelRows;
	/** In-place grids: t (working grid), transfer (of h), spec (spectrum of x); swapped, never reallocated. */
	private float[] t, transfer, spec;
	private final float[] x, y, h, g;
	private float[] invW;
	private final float b, floor, lambda, eps, lambdaH, epsH, seed;
	/** Per-row partials: of window rows (ratio) and of object rows (update). */
	private final double[] w1, w2, w3, r1, r2, r3;
	/** Independent validation data on the image (same model Hx + b), or null. */
	private float[] validation;
	/** Phase ramps exp(−2πi k·s/p) of the shift s per axis, (re, im) per frequency; null without shift. */
	private final double[] phaseX, phaseY, phaseZ;
	private final PsfConstraints constraints;
	/** spec holds the spectrum of the current x (scaled by 1/(py·pz) once specScaled); t holds x on the object rows. */
	private boolean specValid, specScaled, tHoldsX;
	/** Per-axis object-index interval [lo, hi) summed by Xᵀ1 for PSF offset j. */
	private final int[][] boxLo = new int[3][], boxHi = new int[3][];

	/**
	 * @param psf the starting PSF on its box (unit sum within 1e-4, non-negative)
	 * @param y offset-corrected data, non-negative (kept, not copied)
	 */
	BlindSolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background, final double objectTv,
			final double psfTv, final PsfConstraints constraints) {
		final int[] k = psf.shape();
		final EdgeMode.Domains dom = mode.domains(n, k);
		final int[] m = dom.object(), w = dom.window(), p = dom.grid();
		nx = n[0]; ny = n[1]; nz = n[2];
		mx = m[0]; my = m[1]; mz = m[2];
		wx = w[0]; wy = w[1]; wz = w[2];
		px = p[0]; py = p[1]; pz = p[2];
		kx = k[0]; ky = k[1]; kz = k[2];
		this.mode = mode;
		this.y = y;
		this.constraints = constraints;
		this.h = psf.data().clone();
		this.g = new float[h.length];
		this.fft = new RealFft(px, py, pz);
		this.rs = fft.rowStride();
		this.objectRows = fft.rows(0, my, 0, mz);
		this.windowRows = fft.rows(wy, wy + ny, wz, wz + nz);
		// the shifted window [w + c, w + c + n) and the PSF box [0, k) fit in the grid without wrap-around
		// exactly when p ≥ n + k − 1, i.e. for zero and non-circulant edges
		boolean room = true;
		for (int d = 0; d < 3; d++) room &= w[d] + (k[d] - 1) / 2 + n[d] <= p[d] && k[d] <= p[d];
		sx0 = room ? (kx - 1) / 2 : 0;
		sy0 = room ? (ky - 1) / 2 : 0;
		sz0 = room ? (kz - 1) / 2 : 0;
		this.shiftedWindowRows = fft.rows(wy + sy0, wy + sy0 + ny, wz + sz0, wz + sz0 + nz);
		this.psfRows = room ? fft.rows(0, ky, 0, kz) : fft.allRows();
		this.kernelRows = room ? fft.rows(0, ky, 0, kz) : null;
		final boolean shifted = sx0 != 0 || sy0 != 0 || sz0 != 0;
		phaseX = shifted ? phaseRamp(sx0, px, px / 2 + 1) : null;
		phaseY = shifted ? phaseRamp(sy0, py, py) : null;
		phaseZ = shifted ? phaseRamp(sz0, pz, pz) : null;
		this.t = fft.newGrid();
		this.transfer = fft.newGrid();
		placeKernel(h, transfer);
		fft.transferFunctionInPlace(transfer);
		this.spec = fft.newGrid();
		w1 = new double[ny * nz];
		w2 = new double[ny * nz];
		w3 = new double[ny * nz];
		final int rows = my * mz;
		r1 = new double[rows];
		r2 = new double[rows];
		r3 = new double[rows];
		double mean = 0;
		for (final float v : y) mean += v;
		mean /= y.length;
		this.b = (float) background;
		this.floor = (float) Math.max(FLOOR * mean, Float.MIN_NORMAL);
		this.lambda = (float) objectTv;
		this.eps = (float) Math.max(TV_EPSILON * mean, Float.MIN_NORMAL);
		this.lambdaH = (float) psfTv;
		this.epsH = (float) Math.max(TV_EPSILON / h.length, Float.MIN_NORMAL);
		this.invW = mode == EdgeMode.NON_CIRCULANT ? Sensitivity.invert(Sensitivity.of(h, k, n)) : null;
		this.x = new float[mx * my * mz];
		this.seed = (float) Math.max(mean - background, floor);
		initialise(seed);
		copyObjectToGrid();
		for (int d = 0; d < 3; d++) {
			final int kd = k[d], nd = n[d], md = m[d], c = (kd - 1) / 2;
			final int off = mode == EdgeMode.NON_CIRCULANT ? kd - 1 : c;
			boxLo[d] = new int[kd];
			boxHi[d] = new int[kd];
			for (int j = 0; j < kd; j++) {
				boxLo[d][j] = mode == EdgeMode.PERIODIC ? 0 : Math.max(0, off - j);
				boxHi[d][j] = mode == EdgeMode.PERIODIC ? md : Math.min(md, off - j + nd);
			}
		}
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
		final EdgeMode.Domains dom = mode.domains(n, k);
		long s = 2, m = 1, img = 1, slab = 8;
		for (int d = 0; d < 3; d++) {
			final long pd = dom.grid()[d], md = dom.object()[d];
			s *= d == 0 ? pd / 2 + 1 : pd;
			m *= md;
			img *= n[d];
			slab *= d == 2 ? k[d] : md;
		}
		final int objects = 1 + (mode == EdgeMode.NON_CIRCULANT ? 1 : 0);
		return 4 * (3 * s + objects * m + img) + slab;
	}

	// -- setup (as the non-blind engine) --

	/** dst (an in-place grid, zero) ← the kernel with its centre at voxel 0, wrapping around. */
	private void placeKernel(final float[] kernel, final float[] dst) {
		for (int z = 0; z < kz; z++) {
			final int qz = Math.floorMod(z - (kz - 1) / 2, pz);
			for (int yy = 0; yy < ky; yy++) {
				final int qy = Math.floorMod(yy - (ky - 1) / 2, py);
				for (int xx = 0; xx < kx; xx++) {
					final int qx = Math.floorMod(xx - (kx - 1) / 2, px);
					dst[qx + rs * (qy + py * qz)] += kernel[xx + kx * (yy + ky * z)];
				}
			}
		}
	}

	private void initialise(final float constant) {
		Parallel.forRange(my * mz, r -> {
			final int c = r * mx;
			for (int i = 0; i < mx; i++) {
				float v = constant;
				if (!(v > 0)) v = 0;
				if (invW != null && invW[c + i] == 0f) v = 0;
				x[c + i] = v;
			}
		});
	}

	// -- geometry of rows --

	private int gridRowOfObjectRow(final int r) {
		return r % my + py * (r / my);
	}

	private int objectRow(final int r) {
		final int gy = r % py, gz = r / py;
		return gy < my && gz < mz ? gy + my * gz : -1;
	}

	// -- updates --

	/** Statistics of one update: of the iterate it started from (log-likelihood, Σ Hx) and of the change. */
	record Step(double logLikelihood, double modelSum, double relativeChange, double estimateSum, double heldOutLogLikelihood) {
		Step(final double logLikelihood, final double modelSum, final double relativeChange, final double estimateSum) {
			this(logLikelihood, modelSum, relativeChange, estimateSum, Double.NaN);
		}
	}

	/** One object update; {@code cancelCheck} runs between the two transforms. */
	Step objectUpdate(final Runnable cancelCheck) {
		if (specValid) {
			productInverse(false);
		} else {
			if (!tHoldsX) copyObjectToGrid();
			fft.convolveInPlace(t, transfer, false, objectRows, windowRows, null);
		}
		cancelCheck.run();
		fft.convolveInPlace(t, transfer, true, windowRows, ratio(0, 0, 0), objectRows, lambda > 0 ? updateTv() : update());
		final double[] cs = lambda > 0 ? finishTv() : finish();
		final double ll = ordered(w1), model = ordered(w2);
		specValid = false;
		tHoldsX = true;
		return new Step(ll, model, cs[0], cs[1], validation == null ? Double.NaN : ordered(w3));
	}

	/** One PSF update followed by the constraints; relative change is Σ|h_new − h| (both unit sum). */
	Step psfUpdate(final Runnable cancelCheck) {
		if (!specValid) {
			if (!tHoldsX) copyObjectToGrid();
			fft.forwardInPlace(t, objectRows);
			final float[] s = spec;
			spec = t;
			t = s;
			specValid = true;
			specScaled = false;
		}
		productInverse(true);
		tHoldsX = false;
		cancelCheck.run();
		// t ← r ⋆ x: correlation of the (shifted) ratio with the object, only the rows of the PSF offsets made
		fft.convolveInPlace(t, spec, true, shiftedWindowRows, ratio(sx0, sy0, sz0), psfRows, null);
		final double ll = ordered(w1), model = ordered(w2);
		for (int z = 0; z < kz; z++) {
			final int qz = Math.floorMod(z - (kz - 1) / 2 + sz0, pz);
			for (int yy = 0; yy < ky; yy++) {
				final int qy = Math.floorMod(yy - (ky - 1) / 2 + sy0, py);
				for (int xx = 0; xx < kx; xx++) g[xx + kx * (yy + ky * z)] = t[Math.floorMod(xx - (kx - 1) / 2 + sx0, px) + rs * (qy + py * qz)];
			}
		}
		final double[] norm = objectBoxSums();
		final float[] old = h.clone();
		for (int j = 0; j < h.length; j++) {
			float v = norm[j] > 0 ? (float) (old[j] * (double) g[j] / norm[j]) : 0f;
			if (lambdaH > 0) v = v / (1f - lambdaH * psfDivergence(old, j));
			h[j] = v > 0 ? v : 0f;
		}
		constraints.apply(h);
		double change = 0;
		for (int j = 0; j < h.length; j++) change += Math.abs(h[j] - old[j]);
		cancelCheck.run();
		newTransfer();
		if (mode == EdgeMode.NON_CIRCULANT) updateSensitivity();
		return new Step(ll, model, change, org.parfocal.core.Sums.sum(h), validation == null ? Double.NaN : ordered(w3));
	}

	/**
	 * Sets independent validation data of the image's shape (null: none), e.g. the other half of a Poisson
	 * thinning of the recording: every step then also reports its log-likelihood under the same model Hx + b.
	 */
	void validateWith(final float[] v) {
		if (v != null && v.length != nx * ny * nz) throw new IllegalArgumentException("The validation data do not match the image");
		validation = v;
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
		if (specValid) productInverse(false);
		else {
			if (!tHoldsX) copyObjectToGrid();
			fft.convolveInPlace(t, transfer, false, objectRows, windowRows, null);
		}
		tHoldsX = false;
		final RealFft.RowAction r = ratio(0, 0, 0);
		for (int iz = 0; iz < nz; iz++)
			for (int iy = 0; iy < ny; iy++) {
				final int row = (iy + wy) + py * (iz + wz);
				r.row(row, row * rs);
			}
		return new double[] { ordered(w1), validation == null ? Double.NaN : ordered(w3) };
	}

	/**
	 * transfer ← the transfer function of h (scaled by 1/(py·pz) as {@link RealFft#transferFunction}). With a
	 * shift: the pruned transform of h placed at the origin (the k rows that hold it), times the phase ramp
	 * of −c; without: the plain transform of the centred kernel. t is the working grid; the two are swapped.
	 */
	private void newTransfer() {
		if (kernelRows == null) {
			Arrays.fill(t, 0f);
			placeKernel(h, t);
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
		final float[] o = transfer;
		transfer = t;
		t = o;
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
		final float[] a = spec, tr = transfer, tt = t;
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
		fft.inverseInPlace(t, shifted ? shiftedWindowRows : windowRows);
	}

	/**
	 * Xᵀ1 at every PSF offset j: Σ x over the object box [lo(j), hi(j)) per axis (the object voxels that meet
	 * the image window through offset j), by separable sliding sums in double: along z, then y, then x.
	 */
	private double[] objectBoxSums() {
		final int[] loZ = boxLo[2], hiZ = boxHi[2], loY = boxLo[1], hiY = boxHi[1], loX = boxLo[0], hiX = boxHi[0];
		final double[] a = new double[mx * my * kz];
		Parallel.forRange(my, iy -> {
			final double[] prefix = new double[mz + 1];
			for (int i = 0; i < mx; i++) {
				for (int iz = 0; iz < mz; iz++) prefix[iz + 1] = prefix[iz] + x[i + mx * (iy + my * iz)];
				for (int j = 0; j < kz; j++) a[i + mx * (iy + my * j)] = prefix[hiZ[j]] - prefix[loZ[j]];
			}
		});
		final double[] bsum = new double[mx * ky * kz];
		Parallel.forRange(kz, jz -> {
			final double[] prefix = new double[my + 1];
			for (int i = 0; i < mx; i++) {
				for (int iy = 0; iy < my; iy++) prefix[iy + 1] = prefix[iy] + a[i + mx * (iy + my * jz)];
				for (int j = 0; j < ky; j++) bsum[i + mx * (j + ky * jz)] = prefix[hiY[j]] - prefix[loY[j]];
			}
		});
		final double[] out = new double[kx * ky * kz];
		final double[] prefix = new double[mx + 1];
		for (int r = 0; r < ky * kz; r++) {
			for (int i = 0; i < mx; i++) prefix[i + 1] = prefix[i] + bsum[i + mx * r];
			for (int j = 0; j < kx; j++) out[j + kx * r] = prefix[hiX[j]] - prefix[loX[j]];
		}
		return out;
	}

	/**
	 * Hᵀ1 on the object domain after a PSF change ({@link Sensitivity}, from a summed-area table of h). Voxels below
	 * {@link EdgeMode#MIN_SENSITIVITY} of the largest value are held at zero, as in the non-blind engine; a
	 * voxel that was held and is seen again restarts from the starting level.
	 */
	private void updateSensitivity() {
		final float[] sens = Sensitivity.of(h, new int[] { kx, ky, kz }, new int[] { nx, ny, nz });
		final float max = Sensitivity.max(sens);
		final float min = (float) (EdgeMode.MIN_SENSITIVITY * max);
		final float[] oldInv = invW;
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
		invW = sens;
		if (restarted[0]) {
			specValid = false;
			tHoldsX = false;
		}
	}

	/**
	 * Per window row (the window moved by (dx, dy, dz)), as the non-blind engine: t ← y / max(t + b, floor) in
	 * the window and 0 elsewhere in the row; log-likelihood and Σ Hx of the row into w1, w2.
	 */
	private RealFft.RowAction ratio(final int dx, final int dy, final int dz) {
		final float[] tt = t;
		return (r, o) -> {
			final int wr = (r % py - wy - dy) + ny * (r / py - wz - dz);
			final int q = o + wx + dx, yo = wr * nx;
			double ll = 0, model = 0, held = 0;
			final float[] v = validation;
			for (int i = 0; i < nx; i++) {
				final float hx = tt[q + i];
				float den = hx + b;
				if (!(den >= floor)) den = floor;
				final float yy = y[yo + i];
				model += hx;
				ll -= den;
				if (yy > 0) ll += yy * FastLog.ln(den);
				if (v != null) held += v[yo + i] > 0 ? v[yo + i] * FastLog.ln(den) - den : -den;
				tt[q + i] = yy / den;
			}
			Arrays.fill(tt, o, q, 0f);
			Arrays.fill(tt, q + nx, o + px, 0f);
			w1[wr] = ll;
			w2[wr] = model;
			w3[wr] = held;
		};
	}

	/** Per object row: x ← x · t / Hᵀ1 (≥ 0), written to x and t (zero beyond the object in the row). */
	private RealFft.RowAction update() {
		final float[] tt = t, iw = invW;
		return (r, o) -> {
			final int or = objectRow(r);
			final int c = or * mx;
			double change = 0, before = 0, after = 0;
			for (int i = 0; i < mx; i++) {
				final float xo = x[c + i];
				float v = xo * tt[o + i];
				if (iw != null) v = v * iw[c + i];
				if (!(v > 0)) v = 0;
				change += Math.abs(v - xo);
				before += xo;
				after += v;
				x[c + i] = v;
				tt[o + i] = v;
			}
			Arrays.fill(tt, o + mx, o + px, 0f);
			r1[or] = change;
			r2[or] = before;
			r3[or] = after;
		};
	}

	/** {relative change, Σx} of the last {@link #update}. */
	private double[] finish() {
		final double before = ordered(r2);
		return new double[] { before > 0 ? ordered(r1) / before : 0, ordered(r3) };
	}

	/**
	 * Per object row, RL-TV (Dey et al. 2006) as the non-blind engine: forward differences, zero flux across
	 * the domain edges; the new x goes to t (the old one is still needed for div), copied back by
	 * {@link #finishTv}.
	 */
	private RealFft.RowAction updateTv() {
		final int plane = mx * my;
		final float[] tt = t, iw = invW;
		return (r, o) -> {
			final int or = objectRow(r);
			final double[] acc = new double[3];
			TvRow.update(x, tt, o, or, iw, lambda, eps, mx, my, mz, acc);
			Arrays.fill(tt, o + mx, o + px, 0f);
			r1[or] = acc[0];
			r2[or] = acc[1];
			r3[or] = acc[2];
		};
	}

	/** x ← t on the object rows after {@link #updateTv}; {relative change, Σx}. */
	private double[] finishTv() {
		Parallel.forRange(my * mz, r -> System.arraycopy(t, gridRowOfObjectRow(r) * rs, x, r * mx, mx));
		return finish();
	}


	/** t ← x on the object rows (the rest of those rows zero; other rows are never read). */
	private void copyObjectToGrid() {
		Parallel.forRange(my * mz, or -> {
			final int o = gridRowOfObjectRow(or) * rs;
			System.arraycopy(x, or * mx, t, o, mx);
			Arrays.fill(t, o + mx, o + px, 0f);
		});
		tHoldsX = true;
	}

	/** div(∇h/|∇h|) at box voxel j of {@code p} (forward differences, zero flux across the box edges). */
	private float psfDivergence(final float[] p, final int j) {
		final int i = j % kx, iy = (j / kx) % ky, iz = j / (kx * ky), plane = kx * ky;
		final float v = p[j];
		final float gn = psfGradNorm(p, j, i, iy, iz);
		float div = 0;
		if (i + 1 < kx) div += (p[j + 1] - v) / gn;
		if (iy + 1 < ky) div += (p[j + kx] - v) / gn;
		if (iz + 1 < kz) div += (p[j + plane] - v) / gn;
		if (i > 0) div -= (v - p[j - 1]) / psfGradNorm(p, j - 1, i - 1, iy, iz);
		if (iy > 0) div -= (v - p[j - kx]) / psfGradNorm(p, j - kx, i, iy - 1, iz);
		if (iz > 0) div -= (v - p[j - plane]) / psfGradNorm(p, j - plane, i, iy, iz - 1);
		return div;
	}

	private float psfGradNorm(final float[] p, final int j, final int i, final int iy, final int iz) {
		final float v = p[j];
		final float dx = i + 1 < kx ? p[j + 1] - v : 0f;
		final float dy = iy + 1 < ky ? p[j + kx] - v : 0f;
		final float dz = iz + 1 < kz ? p[j + kx * ky] - v : 0f;
		return (float) Math.sqrt(epsH * epsH + dx * dx + dy * dy + dz * dz);
	}

	private static double ordered(final double[] a) {
		double s = 0, c = 0;
		for (final double v : a) {
			final double u = s + v;
			c += Math.abs(s) >= Math.abs(v) ? (s - u) + v : (v - u) + s;
			s = u;
		}
		return s + c;
	}

	// -- output --

	/** A copy of the object on its domain (for a warm start of another solver on the same geometry). */
	float[] objectCopy() { return x.clone(); }

	/** Sets the object on its domain (from {@link #objectCopy} of a solver of the same geometry). */
	void setObject(final float[] src) {
		if (src.length != x.length) throw new IllegalArgumentException("The object does not match the solver's domain");
		System.arraycopy(src, 0, x, 0, x.length);
		specValid = false;
		tHoldsX = false;
	}

	/** Held-out log-likelihood per image row (y fastest, then z) of the iterate the last update or evaluation started from. */
	double[] heldOutRows() { return w3.clone(); }

	/** The current PSF (box array, live). */
	float[] psf() { return h; }

	/** Shape of the PSF box. */
	int[] psfShape() { return new int[] { kx, ky, kz }; }

	/** Σ over the object domain. */
	double objectSum() { return org.parfocal.core.Sums.sum(x); }

	/** Value of the estimate at image voxel (ix, iy, iz). */
	float objectAt(final int ix, final int iy, final int iz) {
		return x[ix + wx + mx * (iy + wy + my * (iz + wz))];
	}

	/** dst ← the estimate on the image window. */
	void crop(final float[] dst) {
		Parallel.forRange(ny * nz, r -> {
			final int iy = r % ny, iz = r / ny;
			System.arraycopy(x, wx + mx * (iy + wy + my * (iz + wz)), dst, r * nx, nx);
		});
	}
}
