package org.parfocal.blind;

import java.util.Arrays;

import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.fft.FastSizes;
import org.parfocal.fft.RealFft;

/**
 * The alternating engine: Richardson–Lucy (optionally with total variation) updates of the object x and of
 * the PSF h on one FFT grid.
 * <p>
 * <b>Object update</b>: the non-blind engine's update, operation for operation (geometry of image window,
 * object domain and FFT grid, floor of Hx + b, Hᵀ1 weighting for non-circulant edges, Dey et al. 2006 TV
 * form), so that with the PSF held fixed the result equals {@code org.parfocal.deconv.Deconvolution} bit for
 * bit: t ← H x, t ← y / max(t + b, floor) in the window, t ← Hᵀ t, x ← x · t / Hᵀ1 / (1 − λ div(∇x/|∇x|)).
 * <p>
 * <b>PSF update</b> (Holmes, J. Opt. Soc. Am. A 9, 1992; Fish et al., J. Opt. Soc. Am. A 12, 1995): the same
 * multiplicative form with the roles exchanged, h(j) ← h(j) · (Xᵀ r)(j) / (Xᵀ 1)(j) / (1 − λ_h div(∇h/|∇h|)),
 * r = y / (Hx + b), Xᵀ the correlation with the object; the TV factor is the Dey et al. form applied to the
 * PSF (the idea of TV on the PSF is Chan &amp; Wong, IEEE Trans. Image Process. 7, 1998). Then the constraints
 * ({@link PsfConstraints}). Xᵀ1(j), the sum of x over the image window shifted by j, comes from separable
 * sliding sums; Hᵀ1 after a PSF change from a summed-area table of h (both exact box sums, in double).
 * <p>
 * <b>FFT economy.</b> A PSF update needs the spectrum X of the current object; it is kept, and reused by the
 * next object update for H x (one inverse transform instead of a fused convolution) as long as x has not
 * changed. With one object and one PSF update per outer iteration this is 8 transforms against 4 for a
 * non-blind iteration: object 3 (H x from X, fused Hᵀ), PSF 5 (X, H x, r̂, Xᵀ r, new transfer function).
 * <p>
 * Reductions are per grid row, combined in row order with compensation; the PSF steps are single-threaded:
 * 1 and N threads give identical results.
 */
final class BlindSolver {

	/** The non-blind engine's floor of Hx + b and TV ε, relative to the mean of y (its constants, kept equal). */
	static final double FLOOR = 1e-6, TV_EPSILON = 1e-4;

	private final int nx, ny, nz, mx, my, mz, wx, wy, wz, px, py, pz, kx, ky, kz;
	private final EdgeMode mode;
	private final RealFft fft;
	private final float[] t, work, transfer, sx, x, y, h, g;
	private float[] invW;
	private final float b, floor, lambda, eps, lambdaH, epsH, seed;
	private final double[] r1, r2, r3;
	private final PsfConstraints constraints;
	/** sx holds the spectrum of the current x; t holds x on the grid (zero elsewhere). */
	private boolean sxValid, tHoldsX;
	/** Per-axis object-index interval [lo, hi) summed by Xᵀ1 for PSF offset j. */
	private final int[][] boxLo = new int[3][], boxHi = new int[3][];

	/**
	 * @param psf the starting PSF on its box (unit sum within 1e-4, non-negative)
	 * @param y offset-corrected data, non-negative (kept, not copied)
	 */
	BlindSolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background, final double objectTv,
			final double psfTv, final PsfConstraints constraints) {
		final int[] k = psf.shape(), m = new int[3], w = new int[3], p = new int[3];
		for (int d = 0; d < 3; d++) {
			final int c = (k[d] - 1) / 2;
			switch (mode) {
			case PERIODIC:
				p[d] = m[d] = n[d];
				break;
			case ZERO:
				m[d] = n[d];
				p[d] = FastSizes.next(n[d] + k[d] - 1);
				break;
			default:
				m[d] = n[d] + k[d] - 1;
				w[d] = k[d] - 1 - c;
				p[d] = FastSizes.next(m[d]);
			}
		}
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
		this.t = new float[fft.realLength()];
		placeKernel(h, t);
		this.transfer = fft.transferFunction(t);
		this.work = fft.newSpectrum();
		this.sx = fft.newSpectrum();
		final int rows = py * pz;
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
		this.invW = mode == EdgeMode.NON_CIRCULANT ? sensitivityInverse() : null;
		this.x = new float[mx * my * mz];
		this.seed = (float) Math.max(mean - background, floor);
		initialise(seed);
		copyObjectToGrid();
		tHoldsX = true;
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

	/** Bytes the solver allocates (prepared data included), for a memory check before starting. */
	static long bytesNeeded(final int[] n, final int[] k, final EdgeMode mode) {
		long p = 1, s = 2, m = 1, img = 1, slab = 8;
		for (int d = 0; d < 3; d++) {
			final long pd = mode == EdgeMode.PERIODIC ? n[d] : FastSizes.next(n[d] + k[d] - 1);
			final long md = mode == EdgeMode.NON_CIRCULANT ? n[d] + k[d] - 1 : n[d];
			p *= pd;
			s *= d == 0 ? pd / 2 + 1 : pd;
			m *= md;
			img *= n[d];
			slab *= d == 2 ? k[d] : md;
		}
		final int objects = 1 + (mode == EdgeMode.NON_CIRCULANT ? 1 : 0);
		return 4 * (p + 3 * s + objects * m + img) + slab;
	}

	// -- setup (as the non-blind engine) --

	private void placeKernel(final float[] kernel, final float[] dst) {
		for (int z = 0; z < kz; z++) {
			final int qz = Math.floorMod(z - (kz - 1) / 2, pz);
			for (int yy = 0; yy < ky; yy++) {
				final int qy = Math.floorMod(yy - (ky - 1) / 2, py);
				for (int xx = 0; xx < kx; xx++) {
					final int qx = Math.floorMod(xx - (kx - 1) / 2, px);
					dst[qx + px * (qy + py * qz)] += kernel[xx + kx * (yy + ky * z)];
				}
			}
		}
	}

	/** 1 / Hᵀ1_window by FFT, as the non-blind engine computes it (used for the starting PSF). */
	private float[] sensitivityInverse() {
		Parallel.forRange(py * pz, r -> {
			final int o = r * px;
			Arrays.fill(t, o, o + px, 0f);
			if (windowRow(r) >= 0) Arrays.fill(t, o + wx, o + wx + nx, 1f);
		});
		fft.convolve(t, transfer, true, work);
		float max = 0;
		for (int r = 0; r < my * mz; r++) {
			final int o = gridRowOfObjectRow(r) * px;
			for (int i = 0; i < mx; i++) max = Math.max(max, t[o + i]);
		}
		final float min = (float) (EdgeMode.MIN_SENSITIVITY * max);
		final float[] inv = new float[mx * my * mz];
		Parallel.forRange(my * mz, r -> {
			final int o = gridRowOfObjectRow(r) * px, c = r * mx;
			for (int i = 0; i < mx; i++) {
				final float v = t[o + i];
				inv[c + i] = v >= min ? 1f / v : 0f;
			}
		});
		return inv;
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

	private int windowRow(final int r) {
		final int iy = r % py - wy, iz = r / py - wz;
		return iy >= 0 && iy < ny && iz >= 0 && iz < nz ? iy + ny * iz : -1;
	}

	// -- updates --

	/** Statistics of one update: of the iterate it started from (log-likelihood, Σ Hx) and of the change. */
	record Step(double logLikelihood, double modelSum, double relativeChange, double estimateSum) {}

	/** One object update; {@code cancelCheck} runs between the two transforms. */
	Step objectUpdate(final Runnable cancelCheck) {
		if (sxValid) productInverse(sx, false);
		else {
			if (!tHoldsX) copyObjectToGrid();
			fft.convolve(t, transfer, false, work);
		}
		final double[] lm = ratio();
		cancelCheck.run();
		fft.convolve(t, transfer, true, work);
		final double[] cs = lambda > 0 ? updateTv() : update();
		sxValid = false;
		tHoldsX = true;
		return new Step(lm[0], lm[1], cs[0], cs[1]);
	}

	/** One PSF update followed by the constraints; relative change is Σ|h_new − h| (both unit sum). */
	Step psfUpdate(final Runnable cancelCheck) {
		if (!sxValid) {
			if (!tHoldsX) copyObjectToGrid();
			fft.forward(t, sx);
			sxValid = true;
		}
		productInverse(sx, false);
		tHoldsX = false;
		final double[] lm = ratio();
		cancelCheck.run();
		// t ← r ⋆ x: correlation of the ratio with the object, read at the PSF offsets
		fft.forward(t, work);
		multiplyConjugate(work, sx);
		fft.inverse(work, t);
		for (int z = 0; z < kz; z++) {
			final int qz = Math.floorMod(z - (kz - 1) / 2, pz);
			for (int yy = 0; yy < ky; yy++) {
				final int qy = Math.floorMod(yy - (ky - 1) / 2, py);
				for (int xx = 0; xx < kx; xx++) g[xx + kx * (yy + ky * z)] = t[Math.floorMod(xx - (kx - 1) / 2, px) + px * (qy + py * qz)];
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
		// new transfer function, the arithmetic of RealFft.transferFunction without a new array
		Arrays.fill(t, 0f);
		placeKernel(h, t);
		fft.forward(t, transfer);
		final float s = (float) (1.0 / ((double) py * pz));
		Parallel.forRange(py * pz, r -> {
			final int o = r * 2 * (px / 2 + 1), e = o + 2 * (px / 2 + 1);
			for (int i = o; i < e; i++) transfer[i] *= s;
		});
		if (mode == EdgeMode.NON_CIRCULANT) updateSensitivity();
		return new Step(lm[0], lm[1], change, org.parfocal.core.Sums.sum(h));
	}

	/** t ← F⁻¹(spectrum · transfer) without touching {@code spectrum}: H applied to the object of that spectrum. */
	private void productInverse(final float[] spectrum, final boolean conj) {
		final int h2 = 2 * (px / 2 + 1);
		// transfer carries 1/(ny·nz) for the fused convolution; RealFft.inverse divides by nx·ny·nz itself
		final float f = (float) ((double) py * pz);
		final float sign = conj ? -1f : 1f;
		Parallel.forRange(py * pz, r -> {
			for (int i = r * h2, e = i + h2; i < e; i += 2) {
				final float ar = spectrum[i], ai = spectrum[i + 1], br = transfer[i] * f, bi = sign * transfer[i + 1] * f;
				work[i] = ar * br - ai * bi;
				work[i + 1] = ar * bi + ai * br;
			}
		});
		fft.inverse(work, t);
	}

	/** a ← a · conj(s) (complex, element-wise). */
	private void multiplyConjugate(final float[] a, final float[] s) {
		final int h2 = 2 * (px / 2 + 1);
		Parallel.forRange(py * pz, r -> {
			for (int i = r * h2, e = i + h2; i < e; i += 2) {
				final float ar = a[i], ai = a[i + 1], br = s[i], bi = -s[i + 1];
				a[i] = ar * br - ai * bi;
				a[i + 1] = ar * bi + ai * br;
			}
		});
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
	 * Hᵀ1 on the object domain after a PSF change, from a summed-area table of h: object voxel l meets the
	 * image window through the PSF offsets j ∈ [k − 1 − l, k − 1 − l + n) ∩ [0, k) per axis. Voxels below
	 * {@link EdgeMode#MIN_SENSITIVITY} of the largest value are held at zero, as in the non-blind engine; a
	 * voxel that was held and is seen again restarts from the starting level.
	 */
	private void updateSensitivity() {
		final int sxn = kx + 1, sxy = (kx + 1) * (ky + 1);
		final double[] sat = new double[sxy * (kz + 1)];
		for (int z = 0; z < kz; z++)
			for (int yy = 0; yy < ky; yy++) {
				double row = 0;
				for (int xx = 0; xx < kx; xx++) {
					row += h[xx + kx * (yy + ky * z)];
					final int q = (xx + 1) + sxn * (yy + 1) + sxy * (z + 1);
					sat[q] = row + sat[q - sxn] + sat[q - sxy] - sat[q - sxn - sxy];
				}
			}
		final int[][] lo = new int[3][], hi = new int[3][];
		final int[] kk = { kx, ky, kz }, nn = { nx, ny, nz }, mm = { mx, my, mz };
		for (int d = 0; d < 3; d++) {
			lo[d] = new int[mm[d]];
			hi[d] = new int[mm[d]];
			for (int l = 0; l < mm[d]; l++) {
				lo[d][l] = Math.max(0, kk[d] - 1 - l);
				hi[d][l] = Math.max(lo[d][l], Math.min(kk[d], kk[d] - 1 - l + nn[d]));
			}
		}
		final float[] sens = new float[mx * my * mz];
		final double[] rowMax = new double[my * mz];
		Parallel.forRange(my * mz, r -> {
			final int iy = r % my, iz = r / my, y0 = lo[1][iy], y1 = hi[1][iy], z0 = lo[2][iz], z1 = hi[2][iz];
			float max = 0;
			for (int i = 0; i < mx; i++) {
				final int x0 = lo[0][i], x1 = hi[0][i];
				final double v = sat[x1 + sxn * y1 + sxy * z1] - sat[x0 + sxn * y1 + sxy * z1] - sat[x1 + sxn * y0 + sxy * z1]
						- sat[x1 + sxn * y1 + sxy * z0] + sat[x0 + sxn * y0 + sxy * z1] + sat[x0 + sxn * y1 + sxy * z0]
						+ sat[x1 + sxn * y0 + sxy * z0] - sat[x0 + sxn * y0 + sxy * z0];
				final float f = (float) Math.max(0, v);
				sens[r * mx + i] = f;
				max = Math.max(max, f);
			}
			rowMax[r] = max;
		});
		double max = 0;
		for (final double v : rowMax) max = Math.max(max, v);
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
			sxValid = false;
			tHoldsX = false;
		}
	}

	/**
	 * t ← y / max(t + b, floor) in the window, 0 elsewhere; returns {log-likelihood, Σ t} (as the non-blind
	 * engine, the log in double).
	 */
	private double[] ratio() {
		Parallel.forRange(py * pz, r -> {
			final int o = r * px, wr = windowRow(r);
			if (wr < 0) {
				Arrays.fill(t, o, o + px, 0f);
				r1[r] = 0;
				r2[r] = 0;
				return;
			}
			final int q = o + wx, yo = wr * nx;
			double ll = 0, model = 0;
			for (int i = 0; i < nx; i++) {
				final float hx = t[q + i];
				float den = hx + b;
				if (!(den >= floor)) den = floor;
				final float yy = y[yo + i];
				model += hx;
				ll -= den;
				if (yy > 0) ll += yy * Math.log(den);
				t[q + i] = yy / den;
			}
			Arrays.fill(t, o, q, 0f);
			Arrays.fill(t, q + nx, o + px, 0f);
			r1[r] = ll;
			r2[r] = model;
		});
		return new double[] { ordered(r1), ordered(r2) };
	}

	/** x ← x · t / Hᵀ1 (≥ 0), written to x and t; returns {relative change, Σx}. */
	private double[] update() {
		Parallel.forRange(py * pz, r -> {
			final int o = r * px, or = objectRow(r);
			if (or < 0) {
				Arrays.fill(t, o, o + px, 0f);
				r1[r] = r2[r] = r3[r] = 0;
				return;
			}
			final int c = or * mx;
			double change = 0, before = 0, after = 0;
			for (int i = 0; i < mx; i++) {
				final float xo = x[c + i];
				float v = xo * t[o + i];
				if (invW != null) v = v * invW[c + i];
				if (!(v > 0)) v = 0;
				change += Math.abs(v - xo);
				before += xo;
				after += v;
				x[c + i] = v;
				t[o + i] = v;
			}
			Arrays.fill(t, o + mx, o + px, 0f);
			r1[r] = change;
			r2[r] = before;
			r3[r] = after;
		});
		final double before = ordered(r2);
		return new double[] { before > 0 ? ordered(r1) / before : 0, ordered(r3) };
	}

	/** RL-TV (Dey et al. 2006), as the non-blind engine: forward differences, zero flux across the domain edges. */
	private double[] updateTv() {
		final int plane = mx * my;
		Parallel.forRange(py * pz, r -> {
			final int o = r * px, or = objectRow(r);
			if (or < 0) {
				Arrays.fill(t, o, o + px, 0f);
				r1[r] = r2[r] = r3[r] = 0;
				return;
			}
			final int c = or * mx, iy = or % my, iz = or / my;
			double change = 0, before = 0, after = 0;
			for (int i = 0; i < mx; i++) {
				final int l = c + i;
				final float xo = x[l];
				float v = xo * t[o + i];
				if (invW != null) v = v * invW[l];
				final float gn = gradNorm(l, i, iy, iz, plane);
				float div = 0;
				if (i + 1 < mx) div += (x[l + 1] - xo) / gn;
				if (iy + 1 < my) div += (x[l + mx] - xo) / gn;
				if (iz + 1 < mz) div += (x[l + plane] - xo) / gn;
				if (i > 0) div -= (xo - x[l - 1]) / gradNorm(l - 1, i - 1, iy, iz, plane);
				if (iy > 0) div -= (xo - x[l - mx]) / gradNorm(l - mx, i, iy - 1, iz, plane);
				if (iz > 0) div -= (xo - x[l - plane]) / gradNorm(l - plane, i, iy, iz - 1, plane);
				v = v / (1f - lambda * div);
				if (!(v > 0)) v = 0;
				change += Math.abs(v - xo);
				before += xo;
				after += v;
				t[o + i] = v;
			}
			Arrays.fill(t, o + mx, o + px, 0f);
			r1[r] = change;
			r2[r] = before;
			r3[r] = after;
		});
		Parallel.forRange(my * mz, r -> System.arraycopy(t, gridRowOfObjectRow(r) * px, x, r * mx, mx));
		final double before = ordered(r2);
		return new double[] { before > 0 ? ordered(r1) / before : 0, ordered(r3) };
	}

	private float gradNorm(final int l, final int i, final int iy, final int iz, final int plane) {
		final float xl = x[l];
		final float dx = i + 1 < mx ? x[l + 1] - xl : 0f;
		final float dy = iy + 1 < my ? x[l + mx] - xl : 0f;
		final float dz = iz + 1 < mz ? x[l + plane] - xl : 0f;
		return (float) Math.sqrt(eps * eps + dx * dx + dy * dy + dz * dz);
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

	private void copyObjectToGrid() {
		Parallel.forRange(py * pz, r -> {
			final int o = r * px, or = objectRow(r);
			if (or < 0) {
				Arrays.fill(t, o, o + px, 0f);
				return;
			}
			System.arraycopy(x, or * mx, t, o, mx);
			Arrays.fill(t, o + mx, o + px, 0f);
		});
		tHoldsX = true;
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
