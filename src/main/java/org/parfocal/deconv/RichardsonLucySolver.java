package org.parfocal.deconv;

import java.util.Arrays;

import org.parfocal.core.FastLog;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.fft.RealFft;

/**
 * The iterative engine: Richardson–Lucy, RL-TV and accelerated RL on one FFT grid.
 * <p>
 * <b>Grids.</b> Three boxes, all with x fastest: the image window (n voxels, where data y live), the object
 * domain (m voxels, where the estimate x lives; it starts at the origin of the FFT grid) and the FFT grid (p
 * voxels, 5-smooth sizes). The PSF origin is voxel c = ⌊(k − 1)/2⌋ per axis, as in
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
 * cache) t ← y / max(t + b, floor) in the window and 0 elsewhere in the row (log-likelihood and Σ Hx summed
 * on the way); t ← Hᵀ t with the window rows as input and the object rows as output, then per object row
 * x ← x · t / Hᵀ1 (change and Σx summed on the way, the new x also written to t for the next iteration).
 * The accelerated method makes its prediction of each object row just before the first convolution
 * transforms it. With a {@link BackgroundFit} the ratio is also summed per window row (weighted by the
 * background's hat functions along x when it varies) and b takes its EM step once per iteration, after the
 * object's (both from the same ratio: the joint EM step).
 * Rows of t outside these boxes are never read, so they are never cleared. Reductions are per row, combined in
 * row order with compensation, so 1 and N threads give identical results.
 * <p>
 * <b>Memory</b>: the grid t (in place: the real grid and its spectrum share it) and the transfer function,
 * rearranged line by line for the fused product ({@link RealFft.LineTransfer}; ≈ p each, 2·(px/2 + 1)·py·pz
 * floats; t first holds the transfer function in the spectrum layout, so no third grid is needed), the object
 * x and, non-circulant, 1/Hᵀ1 from box sums of the PSF ({@link Sensitivity}) (m each), the data (n).
 * The accelerated method adds two object arrays.
 */
final class RichardsonLucySolver {

	/** Floor of Hx + b relative to the mean of y: guards the ratio y / (Hx + b) where the model is ~0. */
	static final double FLOOR = 1e-6;
	/** ε of the TV gradient norm sqrt(ε² + |∇x|²), relative to the mean of y. */
	static final double TV_EPSILON = 1e-4;

	private final int nx, ny, nz, mx, my, mz, wx, wy, wz, px, py, pz;
	/** Floats per row of the grid t (the in-place layout). */
	private final int rs;
	private final RealFft fft;
	/** Rows of the grid holding the object domain and the image window. */
	private final RealFft.Rows objectRows, windowRows;
	private final RealFft.LineTransfer transfer;
	private final float[] t, x, invW, y;
	private final float floor;
	/** Background of the model Hx + b (a fitted one's mean); changes once per iteration when {@link #fit} is set. */
	private float b;
	/** The joint background fit, or null (b fixed). */
	private final BackgroundFit fit;
	/** The fitted background varies over the image (else b is used). */
	private final boolean varying;
	/** Nodes of the fit along x (1 without a fit). */
	private final int gx;
	private final DeconvolutionMethod method;
	private final float lambda, eps;
	/** Accelerated method: the last RL output x_k, and the last RL step g (overwritten in place by the next). */
	private final float[] xPrev, g;
	/** Per-row partial sums: of window rows (ratio) and of object rows (update). */
	private final double[] w1, w2, w3, r1, r2, r3, r4, norm3;
	/** Extrapolation factor of the next prediction and the number of RL steps done (accelerated method). */
	private double alpha;
	private int accelSteps;

	/** Largest extrapolation factor (Biggs & Andrews keep 0 ≤ α < 1). */
	static final double MAX_ALPHA = 0.999;

	RichardsonLucySolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background,
			final DeconvolutionMethod method, final double regularization, final float[] initial) {
		this(psf, n, mode, y, background, method, regularization, initial, null);
	}

	/** @param fit if not null, b is fitted from {@code fit}'s start (and {@code background} ignored) */
	RichardsonLucySolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background,
			final DeconvolutionMethod method, final double regularization, final float[] initial, final BackgroundFit fit) {
		final int[] k = psf.shape();
		final EdgeMode.Domains dom = mode.domains(n, k);
		final int[] m = dom.object(), w = dom.window(), p = dom.grid();
		MemoryBudget.require(bytesNeeded(n, k, mode, method), "deconvolving a " + n[0] + " x " + n[1] + " x " + n[2] + " image");
		nx = n[0]; ny = n[1]; nz = n[2];
		mx = m[0]; my = m[1]; mz = m[2];
		wx = w[0]; wy = w[1]; wz = w[2];
		px = p[0]; py = p[1]; pz = p[2];
		this.y = y;
		this.method = method;
		this.fft = new RealFft(px, py, pz);
		this.rs = fft.rowStride();
		this.objectRows = fft.rows(0, my, 0, mz);
		this.windowRows = fft.rows(wy, wy + ny, wz, wz + nz);
		final float[] spectrum = fft.newGrid();
		placeKernel(psf, spectrum);
		fft.transferFunctionInPlace(spectrum);
		this.transfer = fft.lineTransfer(spectrum, fft.newGrid());
		this.t = spectrum; // the spectrum-layout copy is not needed any more: it becomes the working grid
		w1 = new double[ny * nz];
		w2 = new double[ny * nz];
		this.fit = fit;
		this.varying = fit != null && !fit.constant();
		this.gx = fit == null ? 1 : fit.nodesX();
		w3 = new double[ny * nz * gx];
		final int rows = my * mz;
		r1 = new double[rows];
		r2 = new double[rows];
		r3 = new double[rows];
		r4 = new double[rows];
		norm3 = method == DeconvolutionMethod.RL_ACCELERATED ? new double[rows] : null;
		double mean = 0;
		int used = 0;
		for (final float v : y)
			if (v == v) { mean += v; used++; }
		mean /= Math.max(1, used);
		this.b = (float) (fit != null ? fit.value() : background);
		this.floor = (float) Math.max(FLOOR * mean, Float.MIN_NORMAL);
		this.lambda = method == DeconvolutionMethod.RL_TV ? (float) regularization : 0f;
		this.eps = (float) Math.max(TV_EPSILON * mean, Float.MIN_NORMAL);
		this.invW = mode == EdgeMode.NON_CIRCULANT ? Sensitivity.invert(Sensitivity.of(psf.data(), k, n)) : null;
		this.x = new float[mx * my * mz];
		initialise(initial, (float) Math.max(mean - b, floor));
		final boolean acc = method == DeconvolutionMethod.RL_ACCELERATED;
		xPrev = acc ? new float[x.length] : null;
		g = acc ? new float[x.length] : null;
		copyObjectToGrid();
	}

	/** Bytes the solver allocates (the prepared data y included). */
	static long bytesNeeded(final int[] n, final int[] k, final EdgeMode mode, final DeconvolutionMethod method) {
		final EdgeMode.Domains dom = mode.domains(n, k);
		long s = 2, m = 1, img = 1;
		for (int d = 0; d < 3; d++) {
			final long pd = dom.grid()[d];
			s *= d == 0 ? pd / 2 + 1 : pd;
			m *= dom.object()[d];
			img *= n[d];
		}
		final int objects = 1 + (mode == EdgeMode.NON_CIRCULANT ? 1 : 0) + (method == DeconvolutionMethod.RL_ACCELERATED ? 2 : 0);
		return 4 * (2 * s + objects * m + img);
	}

	int[] gridShape() { return new int[] { px, py, pz }; }

	int[] objectShape() { return new int[] { mx, my, mz }; }

	// -- setup --

	private void placeKernel(final Volume psf, final float[] dst) {
		final int[] k = psf.shape();
		for (int z = 0; z < k[2]; z++) {
			final int qz = Math.floorMod(z - (k[2] - 1) / 2, pz);
			for (int yy = 0; yy < k[1]; yy++) {
				final int qy = Math.floorMod(yy - (k[1] - 1) / 2, py);
				for (int xx = 0; xx < k[0]; xx++) {
					final int qx = Math.floorMod(xx - (k[0] - 1) / 2, px);
					dst[qx + rs * (qy + py * qz)] += psf.get(xx, yy, z);
				}
			}
		}
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

	// -- geometry of rows --

	/** Grid row of object row r = iy + my·iz. */
	private int gridRowOfObjectRow(final int r) {
		return r % my + py * (r / my);
	}

	/** Object row of grid row r, or -1. */
	private int objectRow(final int r) {
		final int gy = r % py, gz = r / py;
		return gy < my && gz < mz ? gy + my * gz : -1;
	}

	/** Image row of grid row r, or -1. */
	private int windowRow(final int r) {
		final int iy = r % py - wy, iz = r / py - wz;
		return iy >= 0 && iy < ny && iz >= 0 && iz < nz ? iy + ny * iz : -1;
	}

	// -- iteration --

	/** Result of one iteration: stats of the entering iterate and of the change. */
	record Step(double logLikelihood, double modelSum, double relativeChange, double estimateSum) {}

	/** One iteration; {@code cancelCheck} runs between the two convolutions. */
	Step iterate(final Runnable cancelCheck) {
		final double[] lm = ratio(true, method == DeconvolutionMethod.RL_ACCELERATED ? predictor() : null);
		cancelCheck.run();
		final double[] cs = method == DeconvolutionMethod.RL_TV ? updateTv() : update();
		if (fit != null) {
			fit.update(w3);
			b = (float) fit.value();
		}
		return new Step(lm[0], lm[1], cs[0], cs[1]);
	}

	/** The background b of the model now (the fitted value, or its mean over the image, after the last iteration with a fit). */
	double background() {
		return b;
	}

	/** Log-likelihood and Σ Hx of the current estimate (one convolution); leaves t holding a copy of x. */
	double[] likelihood() {
		final double[] lm = ratio(false, null);
		copyObjectToGrid();
		return lm;
	}

	/**
	 * t ← H t (object rows in, window rows out), then per window row t ← y / max(t + b, floor) in the window
	 * and 0 elsewhere in the row (if {@code divide}; then the background fit's ratio sums of each row go to
	 * w3); returns {log-likelihood, Σ Hx}. {@code before}, if not
	 * null, makes each object row of t just before its transform.
	 */
	private double[] ratio(final boolean divide, final RealFft.RowAction before) {
		fft.convolveInPlace(t, transfer, false, objectRows, before, windowRows, (r, o) -> {
			final int wr = windowRow(r);
			final int q = o + wx, yo = wr * nx;
			final float bb = b;
			final float[] rowB = varying ? new float[gx] : null;
			final double[] nodeSums = varying ? new double[gx] : null;
			if (varying) fit.rowBackground(wr % ny, wr / ny, rowB);
			double ll = 0, model = 0, ratioSum = 0;
			for (int i = 0; i < nx; i++) {
				final float hx = t[q + i];
				float bi = bb;
				if (varying) {
					bi = 0f;
					for (int j = 0; j < gx; j++) bi += fit.weightX(i, j) * rowB[j];
				}
				float den = hx + bi;
				if (!(den >= floor)) den = floor;
				final float yy = y[yo + i];
				model += hx;
				if (yy != yy) { // a saturated voxel (NaN): left out, its ratio is 1 (see Saturation)
					if (divide) t[q + i] = 1f;
					continue;
				}
				ll -= den;
				if (yy > 0) ll += yy * FastLog.ln(den);
				if (divide) {
					final float q1 = yy / den;
					t[q + i] = q1;
					if (varying) for (int j = 0; j < gx; j++) nodeSums[j] += fit.weightX(i, j) * (double) q1;
					else ratioSum += q1;
				}
			}
			if (divide) {
				Arrays.fill(t, o, q, 0f);
				Arrays.fill(t, q + nx, o + px, 0f);
			}
			w1[wr] = ll;
			w2[wr] = model;
			if (varying) System.arraycopy(nodeSums, 0, w3, wr * gx, gx);
			else w3[wr] = ratioSum;
		});
		return new double[] { ordered(w1), ordered(w2) };
	}

	/**
	 * t ← Hᵀ t (window rows in, object rows out), then per object row x ← x · t / Hᵀ1 (≥ 0), written to x and
	 * to t (zero beyond the object in the row); returns {change, Σx}.
	 */
	private double[] update() {
		final boolean acc = method == DeconvolutionMethod.RL_ACCELERATED;
		final float[] gs = g, ref = acc ? xPrev : null;
		fft.convolveInPlace(t, transfer, true, windowRows, null, objectRows, (r, o) -> {
			final int or = objectRow(r);
			final int c = or * mx;
			double change = 0, before = 0, after = 0, dot = 0, norm = 0;
			for (int i = 0; i < mx; i++) {
				final float xo = x[c + i];
				float v = xo * t[o + i];
				if (invW != null) v = v * invW[c + i];
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
				t[o + i] = v;
			}
			Arrays.fill(t, o + mx, o + px, 0f);
			r1[or] = change;
			r2[or] = before;
			r3[or] = after;
			if (acc) {
				r4[or] = dot;
				norm3[or] = norm;
			}
		});
		if (acc) {
			final double dot = ordered(r4), norm = ordered(norm3);
			alpha = norm > 0 ? Math.max(0, Math.min(MAX_ALPHA, dot / norm)) : 0;
			accelSteps++;
		}
		final double before = ordered(r2);
		return new double[] { before > 0 ? ordered(r1) / before : 0, ordered(r3) };
	}


	/**
	 * Biggs–Andrews prediction, row by row as the first convolution reads the rows: x_(k−1) ← x_k,
	 * x ← max(x_k + α (x_k − x_(k−1)), 0), t ← x; α = Σ g_(k−1) g_(k−2) / Σ g_(k−2)², from the last two RL
	 * steps g = RL(prediction) − prediction, and 0 until both exist.
	 */
	private RealFft.RowAction predictor() {
		final float a = accelSteps >= 2 ? (float) alpha : 0f;
		return (r, o) -> {
			final int c = objectRow(r) * mx;
			for (int i = 0; i < mx; i++) {
				final float xk = x[c + i];
				float v = xk + a * (xk - xPrev[c + i]);
				if (!(v > 0)) v = 0;
				xPrev[c + i] = xk;
				x[c + i] = v;
				t[o + i] = v;
			}
			Arrays.fill(t, o + mx, o + px, 0f);
		};
	}

	/**
	 * RL-TV (Dey et al. 2006): x ← x · t / Hᵀ1 / (1 − λ div(∇x/|∇x|)), forward differences for ∇ and their
	 * negative adjoint (backward differences) for div, zero flux across the edges of the object domain,
	 * |∇x| = sqrt(ε² + Σ (∂x)²). Near the edges of a non-circulant domain the TV term is weighted by Hᵀ1 like
	 * the data term (denominator Hᵀ1 · (1 − λ div)). The new x goes to t (the old one is still needed for div)
	 * and is then copied back.
	 */
	private double[] updateTv() {
		final int plane = mx * my;
		fft.convolveInPlace(t, transfer, true, windowRows, null, objectRows, (r, o) -> {
			final int or = objectRow(r);
			final double[] acc = new double[3];
			TvRow.update(x, t, o, or, invW, lambda, eps, mx, my, mz, acc);
			Arrays.fill(t, o + mx, o + px, 0f);
			r1[or] = acc[0];
			r2[or] = acc[1];
			r3[or] = acc[2];
		});
		Parallel.forRange(my * mz, r -> System.arraycopy(t, gridRowOfObjectRow(r) * rs, x, r * mx, mx));
		final double before = ordered(r2);
		return new double[] { before > 0 ? ordered(r1) / before : 0, ordered(r3) };
	}


	/** t ← x on the object rows (the rest of those rows zero; other rows are never read). */
	private void copyObjectToGrid() {
		Parallel.forRange(my * mz, or -> {
			final int o = gridRowOfObjectRow(or) * rs;
			System.arraycopy(x, or * mx, t, o, mx);
			Arrays.fill(t, o + mx, o + px, 0f);
		});
	}

	/** Σ of per-row partials in row order, compensated: independent of the thread count. */
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
				if (ix < 0 || iy < 0 || iz < 0 || ix >= nx || iy >= ny || iz >= nz)
					throw new IndexOutOfBoundsException("(" + ix + ", " + iy + ", " + iz + ") is outside the " + nx + " x " + ny + " x " + nz + " image");
				return x[ix + wx + mx * (iy + wy + my * (iz + wz))];
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

	/** dst ← the estimate on the image window. */
	void crop(final float[] dst) {
		if (dst.length != nx * ny * nz) throw new IllegalArgumentException("Array of " + dst.length + " values does not match the image");
		Parallel.forRange(ny * nz, r -> {
			final int iy = r % ny, iz = r / ny;
			System.arraycopy(x, wx + mx * (iy + wy + my * (iz + wz)), dst, r * nx, nx);
		});
	}

	// -- held-out validation (HoldOutStop) --

	/**
	 * Poisson log-likelihood Σ [v ln(Hx + bv) − (Hx + bv)] of other data v (another half of a thinned
	 * recording, image window, NaN voxels left out) under the current estimate, with background bv (one
	 * convolution; the iterate is not changed, t holds a copy of x afterwards).
	 */
	double logLikelihoodOf(final float[] v, final double background) {
		if (v.length != nx * ny * nz) throw new IllegalArgumentException("Array of " + v.length + " values does not match the image");
		final float bv = (float) background;
		fft.convolveInPlace(t, transfer, false, objectRows, null, windowRows, (r, o) -> {
			final int wr = windowRow(r);
			final int q = o + wx, yo = wr * nx;
			double ll = 0;
			for (int i = 0; i < nx; i++) {
				float den = t[q + i] + bv;
				if (!(den >= floor)) den = floor;
				final float yy = v[yo + i];
				if (yy != yy) continue;
				ll -= den;
				if (yy > 0) ll += yy * FastLog.ln(den);
			}
			w1[wr] = ll;
		});
		final double ll = ordered(w1);
		copyObjectToGrid();
		return ll;
	}
}
