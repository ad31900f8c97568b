package org.parfocal.deconv;

import java.util.Arrays;

import org.parfocal.conv.Psfs;
import org.parfocal.core.FastLog;
import org.parfocal.core.Parallel;
import org.parfocal.core.Sums;
import org.parfocal.core.Volume;
import org.parfocal.fft.RealFft;

/**
 * The one iterative engine of the non-blind and the blind solvers ({@link RichardsonLucySolver},
 * {@code org.parfocal.blind.BlindSolver}): grid geometry, kernel placement, the ratio row y / (Hx + b), the
 * update rows of Richardson–Lucy, RL-TV and accelerated RL, and the compensated sums of their per-row partials.
 * The blind solver's object update is {@link #objectStep}, the very method the non-blind solver iterates, so
 * with the PSF held fixed blind deconvolution is non-blind deconvolution by construction; its PSF update is
 * the same ratio row ({@link #ratioRow} on the window moved by the PSF centre) correlated with the object
 * instead of the PSF.
 * <p>
 * <b>Grids.</b> Three boxes, all with x fastest: the image window (n voxels, where data y live), the object
 * domain (m voxels, where the estimate x lives; it starts at the origin of the FFT grid) and the FFT grid (p
 * voxels, 5-smooth sizes) ({@link EdgeMode#domains}). The PSF origin is voxel c = ⌊(k − 1)/2⌋ per axis, as in
 * {@link org.parfocal.conv.ConvolutionOperator}.
 * <ul>
 * <li>non-circulant: m = n + k − 1, the window starts at k − 1 − c, p = next5smooth(n + k − 1) ≥ m. Every
 * window output of the circular convolution on p reads object voxels within [0, m) only and the
 * correlation back onto [0, m) reads window voxels only, so H and Hᵀ are exact, without wrap-around;</li>
 * <li>zero: m = n, the window is the object domain, p = next5smooth(n + k − 1): no wrap-around reaches it;</li>
 * <li>periodic: m = n = p, plain circular convolution on the image grid.</li>
 * </ul>
 * <b>One iteration</b> is two fused, pruned, in-place convolutions ({@link RealFft#convolveInPlace}) on the
 * grid t: t ← x (kept from the previous update), t ← H t with only the object rows as input and only the
 * window rows as output, then per window row (as soon as the inverse transform has made it, while it is in
 * cache) t ← y / max(t + b, floor) in the window and 0 elsewhere in the row (log-likelihood, Σ Hx and, with
 * validation data, their log-likelihood summed on the way); t ← Hᵀ t with the window rows as input and the
 * object rows as output, then per object row x ← x · t / Hᵀ1 (change and Σx summed on the way, the new x also
 * written to t for the next iteration). The accelerated method makes its prediction of each object row just
 * before the first convolution transforms it. With a {@link BackgroundFit} the ratio is also summed per window
 * row (weighted by the background's hat functions along x when it varies) and b takes its EM step once per
 * iteration, after the object's (both from the same ratio: the joint EM step).
 * Rows of t outside these boxes are never read, so they are never cleared. Reductions are per row, combined in
 * row order with compensation ({@link Sums#sum(double[])}), so 1 and N threads give identical results.
 * <p>
 * <b>Transfer function.</b> Either rearranged line by line for the fused product ({@link RealFft.LineTransfer};
 * the non-blind solver, whose PSF never changes) or kept in the spectrum layout, replaceable
 * ({@link #setTransfer}; the blind solver, which multiplies it with the object's spectrum). The two give the
 * same numbers.
 */
public final class RichardsonLucyEngine {

	/** Floor of Hx + b relative to the mean of y: guards the ratio y / (Hx + b) where the model is ~0. */
	public static final double FLOOR = 1e-6;
	/** ε of the TV gradient norm sqrt(ε² + |∇x|²), relative to the mean of y. */
	public static final double TV_EPSILON = 1e-4;
	/** Largest extrapolation factor (Biggs & Andrews keep 0 ≤ α < 1). */
	static final double MAX_ALPHA = 0.999;

	/** The update of the object: plain RL, RL-TV (Dey et al. 2006) or accelerated RL (Biggs & Andrews 1997). */
	public enum Update { RL, TV, ACCELERATED }

	private final int nx, ny, nz, mx, my, mz, wx, wy, wz, px, py, pz;
	private final int[] k;
	/** Floats per row of the grid t (the in-place layout). */
	private final int rs;
	private final RealFft fft;
	/** Rows of the grid holding the object domain and the image window. */
	private final RealFft.Rows objectRows, windowRows;
	/** The working grid (in place: the real grid and its spectrum share it). */
	private float[] t;
	/** The transfer function: rearranged (fixed PSF) or in the spectrum layout (replaceable); one of them is null. */
	private RealFft.LineTransfer lines;
	private float[] transfer;
	private final float[] x, y;
	/** 1/Hᵀ1 on the object domain (non-circulant edges), else null. */
	private float[] invW;
	private final float floor, lambda, eps, seed;
	/** Background of the model Hx + b (a fitted one's mean); changes once per iteration when {@link #fit} is set. */
	private float b;
	/** The joint background fit, or null (b fixed). */
	private final BackgroundFit fit;
	/** The fitted background varies over the image (else b is used). */
	private final boolean varying;
	/** Nodes of the fit along x (1 without a fit). */
	private final int gx;
	private final Update update;
	/** Independent validation data on the image (same model Hx + b), or null. */
	private float[] validation;
	/** Accelerated method: the last RL output x_k, and the last RL step g (overwritten in place by the next). */
	private final float[] xPrev, g;
	/** Per-row partial sums: of window rows (ratio) and of object rows (update). */
	private final double[] w1, w2, w3, w4, r1, r2, r3, r4, norm3;
	/** Extrapolation factor of the next prediction and the number of RL steps done (accelerated method). */
	private double alpha;
	private int accelSteps;

	/**
	 * @param psf the PSF on its box k (x fastest), used as given
	 * @param n image shape; {@code y} the prepared data on it (kept, not copied; NaN = saturated, left out)
	 * @param lineTransfer the transfer function rearranged for the fused product (fixed PSF) rather than kept
	 *            in the spectrum layout ({@link #setTransfer})
	 * @param fit if not null, b is fitted from {@code fit}'s start (and {@code background} ignored)
	 * @param initial starting estimate on the image (extended by the nearest image voxel), or null: a constant
	 */
	public RichardsonLucyEngine(final float[] psf, final int[] k, final int[] n, final EdgeMode mode, final float[] y, final double background,
			final Update update, final double regularization, final float[] initial, final BackgroundFit fit, final boolean lineTransfer) {
		this.k = k.clone();
		final EdgeMode.Domains dom = mode.domains(n, k);
		final int[] m = dom.object(), w = dom.window(), p = dom.grid();
		nx = n[0]; ny = n[1]; nz = n[2];
		mx = m[0]; my = m[1]; mz = m[2];
		wx = w[0]; wy = w[1]; wz = w[2];
		px = p[0]; py = p[1]; pz = p[2];
		this.y = y;
		this.update = update;
		this.fft = new RealFft(px, py, pz);
		this.rs = fft.rowStride();
		this.objectRows = fft.rows(0, my, 0, mz);
		this.windowRows = fft.rows(wy, wy + ny, wz, wz + nz);
		final float[] spectrum = fft.newGrid();
		placeKernel(psf, spectrum, 0, 0, 0);
		fft.transferFunctionInPlace(spectrum);
		if (lineTransfer) {
			this.lines = fft.lineTransfer(spectrum, fft.newGrid());
			this.t = spectrum; // the spectrum-layout copy is not needed any more: it becomes the working grid
		} else {
			this.transfer = spectrum;
			this.t = fft.newGrid();
		}
		w1 = new double[ny * nz];
		w2 = new double[ny * nz];
		w4 = new double[ny * nz];
		this.fit = fit;
		this.varying = fit != null && !fit.constant();
		this.gx = fit == null ? 1 : fit.nodesX();
		w3 = new double[ny * nz * gx];
		final int rows = my * mz;
		final boolean acc = update == Update.ACCELERATED;
		r1 = new double[rows];
		r2 = new double[rows];
		r3 = new double[rows];
		r4 = acc ? new double[rows] : null;
		norm3 = acc ? new double[rows] : null;
		double mean = 0;
		int used = 0;
		for (final float v : y)
			if (v == v) { mean += v; used++; }
		mean /= Math.max(1, used);
		this.b = (float) (fit != null ? fit.value() : background);
		this.floor = (float) Math.max(FLOOR * mean, Float.MIN_NORMAL);
		this.lambda = update == Update.TV ? (float) regularization : 0f;
		this.eps = (float) Math.max(TV_EPSILON * mean, Float.MIN_NORMAL);
		this.invW = mode == EdgeMode.NON_CIRCULANT ? Sensitivity.invert(Sensitivity.of(psf, k, n)) : null;
		this.x = new float[mx * my * mz];
		this.seed = (float) Math.max(mean - b, floor);
		initialise(initial, seed);
		xPrev = acc ? new float[x.length] : null;
		g = acc ? new float[x.length] : null;
		copyObjectToGrid();
	}

	/** Floats of one in-place grid, of the object domain and of the image, for memory estimates. */
	static long[] sizes(final int[] n, final int[] k, final EdgeMode mode) {
		final EdgeMode.Domains dom = mode.domains(n, k);
		long s = 2, m = 1, img = 1;
		for (int d = 0; d < 3; d++) {
			final long pd = dom.grid()[d];
			s *= d == 0 ? pd / 2 + 1 : pd;
			m *= dom.object()[d];
			img *= n[d];
		}
		return new long[] { s, m, img };
	}

	/**
	 * Bytes of {@code grids} in-place grids, the object and, non-circulant, 1/Hᵀ1 plus {@code extraObjects}
	 * more object arrays, and the data.
	 */
	public static long bytesNeeded(final int[] n, final int[] k, final EdgeMode mode, final int grids, final int extraObjects) {
		final long[] s = sizes(n, k, mode);
		final int objects = 1 + (mode == EdgeMode.NON_CIRCULANT ? 1 : 0) + extraObjects;
		return 4 * (grids * s[0] + objects * s[1] + s[2]);
	}

	// -- geometry --

	public int[] imageShape() { return new int[] { nx, ny, nz }; }

	public int[] objectShape() { return new int[] { mx, my, mz }; }

	public int[] gridShape() { return new int[] { px, py, pz }; }

	/** Where the image window starts in the object domain. */
	public int[] windowStart() { return new int[] { wx, wy, wz }; }

	public RealFft fft() { return fft; }

	public RealFft.Rows objectRows() { return objectRows; }

	/** Rows of the image window moved by (dy, dz) rows. */
	public RealFft.Rows windowRows(final int dy, final int dz) {
		return dy == 0 && dz == 0 ? windowRows : fft.rows(wy + dy, wy + dy + ny, wz + dz, wz + dz + nz);
	}

	/** Grid row of object row r = iy + my·iz. */
	public int gridRowOfObjectRow(final int r) {
		return r % my + py * (r / my);
	}

	/** Object row of grid row r, or -1. */
	public int objectRow(final int r) {
		final int gy = r % py, gz = r / py;
		return gy < my && gz < mz ? gy + my * gz : -1;
	}

	/**
	 * The PSF box of {@code kernel} on an in-place grid of this engine, its origin at grid voxel s (0: voxel
	 * 0, wrapping around): added to {@code grid}, or, with {@code gather}, read from it into {@code kernel}.
	 */
	public void placeKernel(final float[] kernel, final float[] grid, final int sx, final int sy, final int sz) {
		Psfs.place(kernel, k, grid, new int[] { px, py, pz }, rs, new int[] { sx, sy, sz }, false);
	}

	/** kernel ← the values of {@code grid} at the PSF offsets placed as {@link #placeKernel} places them. */
	public void gatherKernel(final float[] grid, final float[] kernel, final int sx, final int sy, final int sz) {
		Psfs.place(kernel, k, grid, new int[] { px, py, pz }, rs, new int[] { sx, sy, sz }, true);
	}

	// -- state --

	/** The working grid (live). */
	public float[] grid() { return t; }

	/** Replaces the working grid (an array of {@link RealFft#newGrid}'s length). */
	public void setGrid(final float[] grid) { t = grid; }

	/** The transfer function in the spectrum layout (live), or null when it was rearranged. */
	public float[] transfer() { return transfer; }

	/** Replaces the spectrum-layout transfer function (a PSF change); the previous one is returned. */
	public float[] setTransfer(final float[] next) {
		if (transfer == null) throw new IllegalStateException("The transfer function of this engine is fixed");
		final float[] old = transfer;
		transfer = next;
		return old;
	}

	/** The object on its domain (live). */
	public float[] object() { return x; }

	/** 1/Hᵀ1 on the object domain (live), or null. */
	public float[] sensitivity() { return invW; }

	public void setSensitivity(final float[] inverse) { invW = inverse; }

	/** The constant start of the object, max(mean y − b, floor). */
	public float seed() { return seed; }

	/** The background b of the model now (the fitted value, or its mean over the image, after the last iteration with a fit). */
	public double background() { return b; }

	/**
	 * Sets independent validation data of the image's shape (null: none), e.g. the other half of a Poisson
	 * thinning of the recording: every step then also reports its log-likelihood under the same model Hx + b.
	 */
	public void validateWith(final float[] v) {
		if (v != null && v.length != nx * ny * nz) throw new IllegalArgumentException("The validation data do not match the image");
		validation = v;
	}

	/** Log-likelihood per image row (y fastest, then z) of the data the last ratio rows scored (e.g. {@link #logLikelihoodOf}'s). */
	public double[] logLikelihoodRows() { return w1.clone(); }

	/** Held-out log-likelihood per image row (y fastest, then z) of the iterate the last ratio rows saw. */
	public double[] heldOutRows() { return w4.clone(); }

	/** Σ over image rows of the last ratio rows: {log-likelihood, Σ Hx, held-out log-likelihood (NaN without validation)}. */
	public double[] ratioSums() {
		return new double[] { Sums.sum(w1), Sums.sum(w2), validation == null ? Double.NaN : Sums.sum(w4) };
	}

	private void initialise(final float[] initial, final float constant) {
		Parallel.forRange(my * mz, r -> {
			final int iy = r % my, iz = r / my, c = r * mx;
			final int sy = clamp(iy - wy, ny), sz = clamp(iz - wz, nz);
			for (int i = 0; i < mx; i++) {
				float v = initial == null ? constant : initial[clamp(i - wx, nx) + nx * (sy + ny * sz)];
				if (!(v > 0)) v = 0;
				if (invW != null && invW[c + i] == 0f) v = 0;
				x[c + i] = v;
			}
		});
	}

	private static int clamp(final int i, final int n) {
		return i < 0 ? 0 : i >= n ? n - 1 : i;
	}

	/** t ← x on the object rows (the rest of those rows zero; other rows are never read). */
	public void copyObjectToGrid() {
		Parallel.forRange(my * mz, or -> {
			final int o = gridRowOfObjectRow(or) * rs;
			System.arraycopy(x, or * mx, t, o, mx);
			Arrays.fill(t, o + mx, o + px, 0f);
		});
	}

	// -- iteration --

	/**
	 * Statistics of one update: of the iterate it started from (log-likelihood, Σ Hx, held-out log-likelihood,
	 * NaN without validation data) and of the change (relative change, Σ of the new estimate).
	 */
	public record Step(double logLikelihood, double modelSum, double relativeChange, double estimateSum, double heldOutLogLikelihood) {}

	private void convolve(final boolean adjoint, final RealFft.Rows input, final RealFft.RowAction before, final RealFft.Rows output,
			final RealFft.RowAction after) {
		if (lines != null) fft.convolveInPlace(t, lines, adjoint, input, before, output, after);
		else fft.convolveInPlace(t, transfer, adjoint, input, before, output, after);
	}

	/**
	 * One object update; {@code cancelCheck} runs between the two convolutions. t holds x on the object rows
	 * on entry, or, if {@code blurred}, already H x on the window rows (the blind solver makes it from the
	 * object's kept spectrum; the ratio rows are then made just before the correlation transforms them). On
	 * return t holds the new x on the object rows.
	 */
	public Step objectStep(final Runnable cancelCheck, final boolean blurred) {
		final boolean acc = update == Update.ACCELERATED;
		RealFft.RowAction ratio = ratioRow(0, 0, 0);
		if (!blurred) {
			convolve(false, objectRows, acc ? predictor() : null, windowRows, ratio);
			ratio = null;
		}
		cancelCheck.run();
		final boolean tv = update == Update.TV;
		convolve(true, windowRows, ratio, objectRows, tv ? tvRow() : updateRow());
		if (tv) Parallel.forRange(my * mz, r -> System.arraycopy(t, gridRowOfObjectRow(r) * rs, x, r * mx, mx));
		if (acc) {
			final double dot = Sums.sum(r4), norm = Sums.sum(norm3);
			alpha = norm > 0 ? Math.max(0, Math.min(MAX_ALPHA, dot / norm)) : 0;
			accelSteps++;
		}
		final double before = Sums.sum(r2);
		final double[] lm = ratioSums();
		final Step s = new Step(lm[0], lm[1], before > 0 ? Sums.sum(r1) / before : 0, Sums.sum(r3), lm[2]);
		if (fit != null) {
			fit.update(w3);
			b = (float) fit.value();
		}
		return s;
	}

	/**
	 * {log-likelihood, Σ Hx, held-out log-likelihood} of the current estimate without an update: t ← H x
	 * (one convolution) unless {@code blurred} (t already holds H x on the window rows). t no longer holds x.
	 */
	public double[] evaluate(final boolean blurred) {
		final RealFft.RowAction r = ratioRow(false, y, b, 0, 0, 0);
		if (!blurred) convolve(false, objectRows, null, windowRows, r);
		else
			for (int iz = 0; iz < nz; iz++)
				for (int iy = 0; iy < ny; iy++) {
					final int row = (iy + wy) + py * (iz + wz);
					r.row(row, row * rs);
				}
		return ratioSums();
	}

	/**
	 * Poisson log-likelihood Σ [v ln(Hx + bv) − (Hx + bv)] of other data v (another half of a thinned
	 * recording, image window, NaN voxels left out) under the current estimate, with background bv (one
	 * convolution; the iterate is not changed, t holds a copy of x afterwards).
	 */
	public double logLikelihoodOf(final float[] v, final double background) {
		if (v.length != nx * ny * nz) throw new IllegalArgumentException("Array of " + v.length + " values does not match the image");
		convolve(false, objectRows, null, windowRows, ratioRow(false, v, (float) background, 0, 0, 0));
		final double ll = Sums.sum(w1);
		copyObjectToGrid();
		return ll;
	}

	/**
	 * dst ← H x on the image window (no background; x fastest, then y, z), for criteria that need the re-blurred
	 * iterate itself (one convolution; the iterate is not changed, t holds a copy of x afterwards).
	 */
	public void blurInto(final float[] dst) {
		if (dst.length != nx * ny * nz) throw new IllegalArgumentException("Array of " + dst.length + " values does not match the image");
		final float[] tt = t;
		convolve(false, objectRows, null, windowRows, (r, o) -> System.arraycopy(tt, o + wx, dst, ((r % py - wy) + ny * (r / py - wz)) * nx, nx));
		copyObjectToGrid();
	}

	/**
	 * The ratio row of the window moved by (dx, dy, dz): t ← y / max(t + b, floor) in the window and 0
	 * elsewhere in the row; log-likelihood, Σ Hx and the held-out log-likelihood of the row into the partial
	 * sums ({@link #ratioSums}), and the background fit's ratio sums.
	 */
	public RealFft.RowAction ratioRow(final int dx, final int dy, final int dz) {
		return ratioRow(true, y, b, dx, dy, dz);
	}

	/**
	 * {@link #ratioRow(int, int, int)} of other data (then with the constant background {@code bb}); without
	 * {@code divide} only the sums are made.
	 */
	private RealFft.RowAction ratioRow(final boolean divide, final float[] data, final float bb, final int dx, final int dy, final int dz) {
		final float[] tt = t, v = validation;
		final boolean vary = varying && data == y;
		return (r, o) -> {
			final int wr = (r % py - wy - dy) + ny * (r / py - wz - dz);
			final int q = o + wx + dx, yo = wr * nx;
			final float[] rowB = vary ? new float[gx] : null;
			final double[] nodeSums = vary ? new double[gx] : null;
			if (vary) fit.rowBackground(wr % ny, wr / ny, rowB);
			double ll = 0, model = 0, held = 0, ratioSum = 0;
			for (int i = 0; i < nx; i++) {
				final float hx = tt[q + i];
				float bi = bb;
				if (vary) {
					bi = 0f;
					for (int j = 0; j < gx; j++) bi += fit.weightX(i, j) * rowB[j];
				}
				float den = hx + bi;
				if (!(den >= floor)) den = floor;
				final float yy = data[yo + i];
				model += hx;
				if (v != null) {
					final float vv = v[yo + i];
					if (vv == vv) held += vv > 0 ? vv * FastLog.ln(den) - den : -den;
				}
				if (yy != yy) { // a saturated voxel (NaN): left out, its ratio is 1 (see Saturation)
					if (divide) tt[q + i] = 1f;
					continue;
				}
				ll -= den;
				if (yy > 0) ll += yy * FastLog.ln(den);
				if (divide) {
					final float q1 = yy / den;
					tt[q + i] = q1;
					if (vary) for (int j = 0; j < gx; j++) nodeSums[j] += fit.weightX(i, j) * (double) q1;
					else ratioSum += q1;
				}
			}
			if (divide) {
				Arrays.fill(tt, o, q, 0f);
				Arrays.fill(tt, q + nx, o + px, 0f);
				if (vary) System.arraycopy(nodeSums, 0, w3, wr * gx, gx);
				else if (fit != null) w3[wr] = ratioSum;
			}
			w1[wr] = ll;
			w2[wr] = model;
			w4[wr] = held;
		};
	}

	/**
	 * Per object row: x ← x · t / Hᵀ1 (≥ 0), written to x and to t (zero beyond the object in the row); the
	 * accelerated method also keeps the RL step and its products with the previous one.
	 */
	private RealFft.RowAction updateRow() {
		final boolean acc = update == Update.ACCELERATED;
		final float[] tt = t, iw = invW, gs = g, ref = acc ? xPrev : null;
		return (r, o) -> {
			final int or = objectRow(r);
			final int c = or * mx;
			double change = 0, before = 0, after = 0, dot = 0, norm = 0;
			for (int i = 0; i < mx; i++) {
				final float xo = x[c + i];
				float v = xo * tt[o + i];
				if (iw != null) v = v * iw[c + i];
				if (!(v > 0)) v = 0;
				if (acc) {
					final float gk = v - xo, gp = gs[c + i], prev = ref[c + i];
					gs[c + i] = gk; // the previous step is read just before: one array for both
					dot += (double) gk * gp;
					norm += (double) gp * gp;
					change += Math.abs(v - prev);
					before += prev;
				} else {
					change += Math.abs(v - xo);
					before += xo;
				}
				after += v;
				x[c + i] = v;
				tt[o + i] = v;
			}
			Arrays.fill(tt, o + mx, o + px, 0f);
			r1[or] = change;
			r2[or] = before;
			r3[or] = after;
			if (acc) {
				r4[or] = dot;
				norm3[or] = norm;
			}
		};
	}

	/**
	 * Biggs–Andrews prediction, row by row as the first convolution reads the rows: x_(k−1) ← x_k,
	 * x ← max(x_k + α (x_k − x_(k−1)), 0), t ← x; α = Σ g_(k−1) g_(k−2) / Σ g_(k−2)², from the last two RL
	 * steps g = RL(prediction) − prediction, and 0 until both exist.
	 */
	private RealFft.RowAction predictor() {
		final float a = accelSteps >= 2 ? (float) alpha : 0f;
		final float[] tt = t;
		return (r, o) -> {
			final int c = objectRow(r) * mx;
			for (int i = 0; i < mx; i++) {
				final float xk = x[c + i];
				float v = xk + a * (xk - xPrev[c + i]);
				if (!(v > 0)) v = 0;
				xPrev[c + i] = xk;
				x[c + i] = v;
				tt[o + i] = v;
			}
			Arrays.fill(tt, o + mx, o + px, 0f);
		};
	}

	/**
	 * RL-TV (Dey et al. 2006): x ← x · t / Hᵀ1 / (1 − λ div(∇x/|∇x|)), forward differences for ∇ and their
	 * negative adjoint (backward differences) for div, zero flux across the edges of the object domain,
	 * |∇x| = sqrt(ε² + Σ (∂x)²). Near the edges of a non-circulant domain the TV term is weighted by Hᵀ1 like
	 * the data term (denominator Hᵀ1 · (1 − λ div)). The new x goes to t (the old one is still needed for div)
	 * and is copied back after the convolution.
	 */
	private RealFft.RowAction tvRow() {
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

	// -- output --

	/** Value of the estimate at image voxel (ix, iy, iz). */
	public float objectAt(final int ix, final int iy, final int iz) {
		if (ix < 0 || iy < 0 || iz < 0 || ix >= nx || iy >= ny || iz >= nz)
			throw new IndexOutOfBoundsException("(" + ix + ", " + iy + ", " + iz + ") is outside the " + nx + " x " + ny + " x " + nz + " image");
		return x[ix + wx + mx * (iy + wy + my * (iz + wz))];
	}

	/** dst ← the estimate on the image window. */
	public void crop(final float[] dst) {
		if (dst.length != nx * ny * nz) throw new IllegalArgumentException("Array of " + dst.length + " values does not match the image");
		Parallel.forRange(ny * nz, r -> {
			final int iy = r % ny, iz = r / ny;
			System.arraycopy(x, wx + mx * (iy + wy + my * (iz + wz)), dst, r * nx, nx);
		});
	}

	/** The current estimate on the image window, read in place. */
	EstimateView view() {
		return new EstimateView() {
			@Override
			public int nx() { return nx; }

			@Override
			public int ny() { return ny; }

			@Override
			public int nz() { return nz; }

			@Override
			public float get(final int ix, final int iy, final int iz) {
				return objectAt(ix, iy, iz);
			}

			@Override
			public void copyTo(final float[] dst) {
				crop(dst);
			}

			@Override
			public Volume toVolume() {
				final Volume v = Volume.zeros(nx, ny, nz, null);
				crop(v.data());
				return v;
			}

			@Override
			public double background() {
				return fit != null ? b : Double.NaN;
			}

			@Override
			public float[] backgroundMap() {
				return varying ? fit.map() : null;
			}
		};
	}
}
