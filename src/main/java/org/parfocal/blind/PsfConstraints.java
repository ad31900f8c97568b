package org.parfocal.blind;

import org.parfocal.fft.FastSizes;
import org.parfocal.fft.RealFft;

/**
 * The projections applied to the PSF estimate after each PSF update, in this order: band limit (optional),
 * non-negativity, cylindrical symmetry (optional), centring (optional), unit sum. The support limit is built
 * in: the estimate lives on its box. Each step works in place on the box array (x fastest) and is
 * single-threaded (the box is small), so results do not depend on the thread count.
 * <p>
 * Written by hand: these are small, specific projections with no library counterpart.
 */
final class PsfConstraints {

	private final int kx, ky, kz;
	private final double dx, dy, dz;
	/** Band-limit filter on a zero-padded grid, or null. */
	private final RealFft fft;
	private final boolean[] keep;
	/** The padded box in the in-place layout of {@link RealFft#newGrid} (real rows, then their half spectrum). */
	private final float[] grid;
	/** The rows of the padded grid that hold the box: the only rows transformed forward and back. */
	private final RealFft.Rows boxRows;
	private final boolean symmetric, centring;
	/** Centroid to keep (voxels), set from the starting PSF. */
	private final double[] target;
	/** Trust region: the model PSF and the largest relative L2 distance from it, or null / 0. */
	private float[] anchor;
	private double radius;
	private double anchorNorm;
	/** Relative distance to the anchor before the last {@link #apply}'s trust-region step (NaN without one). */
	private double lastDistance = Double.NaN;

	/**
	 * @param support the band limit, or null for none
	 * @param dx voxel sizes in µm (any positive values when there is no band limit)
	 */
	PsfConstraints(final int kx, final int ky, final int kz, final double dx, final double dy, final double dz, final OtfSupport support,
			final boolean symmetric, final boolean centring, final float[] start) {
		this.kx = kx;
		this.ky = ky;
		this.kz = kz;
		this.dx = dx;
		this.dy = dy;
		this.dz = dz;
		this.symmetric = symmetric;
		this.centring = centring;
		this.target = centroid(start);
		if (support != null) {
			// Zero padding to about twice the box: the filter's spread is cut back by the box, not wrapped around.
			final int qx = FastSizes.next(2 * kx), qy = ky > 1 ? FastSizes.next(2 * ky) : 1, qz = kz > 1 ? FastSizes.next(2 * kz) : 1;
			fft = new RealFft(qx, qy, qz);
			grid = fft.newGrid();
			boxRows = fft.rows(0, ky, 0, kz);
			final int h = qx / 2 + 1;
			keep = new boolean[h * qy * qz];
			for (int iz = 0; iz < qz; iz++) {
				final double fz = signed(iz, qz) / (qz * dz);
				for (int iy = 0; iy < qy; iy++) {
					final double fy = signed(iy, qy) / (qy * dy);
					for (int ix = 0; ix < h; ix++) {
						final double fx = ix / (qx * dx);
						keep[ix + h * (iy + qy * iz)] = support.contains(Math.hypot(fx, fy), kz > 1 ? fz : 0);
					}
				}
			}
		} else {
			fft = null;
			grid = null;
			boxRows = null;
			keep = null;
		}
	}

	private static int signed(final int i, final int n) {
		return i <= n / 2 ? i : i - n;
	}

	/** Applies every enabled constraint to {@code h} (box array), ending with unit sum. */
	void apply(final float[] h) {
		if (fft != null) bandLimit(h);
		for (int i = 0; i < h.length; i++) if (!(h[i] > 0)) h[i] = 0;
		if (symmetric) symmetrize(h);
		if (centring) centre(h);
		normalize(h);
		if (anchor != null) trust(h);
	}

	/**
	 * Keeps every later estimate within relative L2 distance {@code r} of {@code model} (a unit-sum,
	 * non-negative PSF on the box): a step that leaves the ball is pulled back along the segment to the model,
	 * h ← m + (r/d)(h − m). A convex combination of two unit-sum, non-negative PSFs, so those constraints still
	 * hold (symmetry and band limit too, when both PSFs have them).
	 */
	void trustRegion(final float[] model, final double r) {
		if (model.length != kx * ky * kz) throw new IllegalArgumentException("The model PSF does not match the box");
		if (!(r > 0)) throw new IllegalArgumentException("The trust radius must be above 0, got " + r);
		anchor = model.clone();
		radius = r;
		double s = 0;
		for (final float v : anchor) s += (double) v * v;
		anchorNorm = Math.sqrt(s);
	}

	/** Relative distance ‖h − m‖/‖m‖ to the trust region's model before its last pull-back (NaN without one). */
	double lastDistance() { return lastDistance; }

	double distanceToAnchor(final float[] h) {
		double s = 0;
		for (int i = 0; i < h.length; i++) {
			final double e = h[i] - anchor[i];
			s += e * e;
		}
		return Math.sqrt(s) / anchorNorm;
	}

	private void trust(final float[] h) {
		final double d = distanceToAnchor(h);
		lastDistance = d;
		if (d <= radius) return;
		final double f = radius / d;
		for (int i = 0; i < h.length; i++) {
			final float v = (float) (anchor[i] + f * (h[i] - anchor[i]));
			h[i] = v > 0 ? v : 0f;
		}
	}

	/**
	 * Zeroes the transfer function outside the support (zero-padded DFT), crops back to the box. The forward
	 * transform reads only the box's rows and the inverse makes only theirs ({@link RealFft#forwardInPlace},
	 * {@link RealFft#inverseInPlace}: the same values on those rows as the whole transforms).
	 */
	void bandLimit(final float[] h) {
		final int rs = fft.rowStride(), qy = fft.ny();
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < ky; y++) {
				final int o = rs * (y + qy * z);
				System.arraycopy(h, kx * (y + ky * z), grid, o, kx);
				java.util.Arrays.fill(grid, o + kx, o + rs, 0f);
			}
		fft.forwardInPlace(grid, boxRows);
		for (int i = 0; i < keep.length; i++)
			if (!keep[i]) {
				grid[2 * i] = 0;
				grid[2 * i + 1] = 0;
			}
		fft.inverseInPlace(grid, boxRows);
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < ky; y++)
				System.arraycopy(grid, rs * (y + qy * z), h, kx * (y + ky * z), kx);
	}

	/**
	 * Cylindrical symmetry about the lateral origin voxel: in every plane, the ring average of h at radius r
	 * (linear binning at a step of the smaller lateral voxel size), read back by linear interpolation.
	 */
	void symmetrize(final float[] h) {
		final int cx = (kx - 1) / 2, cy = (ky - 1) / 2;
		final double step = Math.min(dx, dy);
		final int bins = (int) Math.ceil(Math.hypot((kx - cx) * dx, (ky - cy) * dy) / step) + 2;
		final double[] sum = new double[bins], weight = new double[bins];
		for (int z = 0; z < kz; z++) {
			java.util.Arrays.fill(sum, 0);
			java.util.Arrays.fill(weight, 0);
			final int o = kx * ky * z;
			for (int y = 0; y < ky; y++)
				for (int x = 0; x < kx; x++) {
					final double r = Math.hypot((x - cx) * dx, (y - cy) * dy) / step;
					final int b = (int) r;
					final double f = r - b;
					final float v = h[o + x + kx * y];
					sum[b] += (1 - f) * v;
					weight[b] += 1 - f;
					sum[b + 1] += f * v;
					weight[b + 1] += f;
				}
			for (int b = 0; b < bins; b++) sum[b] = weight[b] > 0 ? sum[b] / weight[b] : 0;
			for (int y = 0; y < ky; y++)
				for (int x = 0; x < kx; x++) {
					final double r = Math.hypot((x - cx) * dx, (y - cy) * dy) / step;
					final int b = (int) r;
					final double f = r - b;
					final double lo = sum[b], hi = weight[b + 1] > 0 ? sum[b + 1] : lo;
					h[o + x + kx * y] = (float) ((1 - f) * lo + f * hi);
				}
		}
	}

	/**
	 * Shifts h by whole voxels (zero fill) so that its centroid lies within half a voxel of the starting PSF's
	 * centroid along each axis. Object and PSF can trade a translation without changing the data; this pins it
	 * to the start, without forcing an aberrated PSF (whose peak may lie off centre) to the box centre.
	 */
	void centre(final float[] h) {
		final double[] c = centroid(h);
		final int sx = (int) Math.round(target[0] - c[0]), sy = (int) Math.round(target[1] - c[1]), sz = (int) Math.round(target[2] - c[2]);
		if (sx == 0 && sy == 0 && sz == 0) return;
		final float[] src = h.clone();
		java.util.Arrays.fill(h, 0f);
		for (int z = 0; z < kz; z++) {
			final int tz = z + sz;
			if (tz < 0 || tz >= kz) continue;
			for (int y = 0; y < ky; y++) {
				final int ty = y + sy;
				if (ty < 0 || ty >= ky) continue;
				for (int x = 0; x < kx; x++) {
					final int tx = x + sx;
					if (tx >= 0 && tx < kx) h[tx + kx * (ty + ky * tz)] = src[x + kx * (y + ky * z)];
				}
			}
		}
	}

	/** {x, y, z} centroid in voxels (the box centre for an all-zero array). */
	double[] centroid(final float[] h) {
		double s = 0, mx = 0, my = 0, mz = 0;
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < ky; y++)
				for (int x = 0; x < kx; x++) {
					final double v = h[x + kx * (y + ky * z)];
					s += v;
					mx += v * x;
					my += v * y;
					mz += v * z;
				}
		if (!(s > 0)) return new double[] { (kx - 1) / 2, (ky - 1) / 2, (kz - 1) / 2 };
		return new double[] { mx / s, my / s, mz / s };
	}

	/** Scales h to unit sum (compensated sum); an all-zero h cannot be scaled and is an error. */
	static void normalize(final float[] h) {
		final double s = org.parfocal.core.Sums.sum(h);
		if (!(s > 0) || !Double.isFinite(s))
			throw new IllegalStateException("The PSF estimate vanished (sum " + s + "): lower the PSF regularisation or relax the constraints");
		for (int i = 0; i < h.length; i++) h[i] = (float) (h[i] / s);
	}
}
