package org.parfocal.core;

/**
 * Linear interpolation of a volume on a separable grid of sample points (bilinear in 2D, trilinear in 3D): the
 * one resampler of Parfocal ({@code quality/Resampling} for references, {@code conv/Psfs.resampleTo} for PSFs).
 * Along each axis output index i samples the input at a continuous index c(i), given by the caller; an
 * {@link Axis} holds, per output index, the two input indices and the weight that
 * {@code s·(f(lo) + w·(f(hi) − f(lo)))} needs, with the edge rule folded in ({@link Axis#clamped} repeats the edge
 * value, {@link Axis#zeroOutside} takes the volume as 0 beyond its ends), so the loop over the voxels has no
 * branches. The three axes are applied in turn, x first, in double.
 * <p>
 * Written by hand (a separable loop on the arrays) because ImgLib2's interpolators evaluate one point at a time
 * through a {@code RealRandomAccess}, several times slower for whole stacks.
 */
public final class Trilinear {

	private Trilinear() {}

	/**
	 * Sample points along one axis: output i is {@code scale[i]·(f(lo[i]) + w[i]·(f(hi[i]) − f(lo[i])))}, lo and hi
	 * always inside the line.
	 */
	public record Axis(int[] lo, int[] hi, double[] w, double[] scale) {

		public int size() { return lo.length; }

		/**
		 * Samples at continuous indices c of a line of n values, c clamped to [0, n − 1] (the edge value repeated;
		 * SciPy's {@code map_coordinates(order=1, mode="nearest")}).
		 */
		public static Axis clamped(final double[] c, final int n) {
			final int m = c.length;
			final int[] lo = new int[m], hi = new int[m];
			final double[] w = new double[m], s = new double[m];
			for (int i = 0; i < m; i++) {
				final double ci = Math.min(Math.max(c[i], 0), n - 1);
				final int l = Math.min((int) Math.floor(ci), Math.max(n - 2, 0));
				lo[i] = l;
				hi[i] = Math.min(l + 1, n - 1);
				w[i] = n == 1 ? 0 : ci - l;
				s[i] = 1;
			}
			return new Axis(lo, hi, w, s);
		}

		/**
		 * Samples at continuous indices c of a line of n values taken as 0 beyond its ends: between −1 and 0 (and
		 * n − 1 and n) the value falls linearly to 0, further out it is 0.
		 */
		public static Axis zeroOutside(final double[] c, final int n) {
			final int m = c.length;
			final int[] lo = new int[m], hi = new int[m];
			final double[] w = new double[m], s = new double[m];
			for (int i = 0; i < m; i++) {
				final int l = (int) Math.floor(c[i]);
				final double f = c[i] - l;
				if (l >= 0 && l + 1 < n) {
					lo[i] = l;
					hi[i] = l + 1;
					w[i] = f;
					s[i] = 1;
				} else if (l == -1 && n > 0) { // only the upper neighbour, index 0, is inside
					s[i] = f;
				} else if (l >= 0 && l < n) { // l = n − 1: only the lower neighbour is inside
					lo[i] = hi[i] = l;
					s[i] = 1 - f;
				} // else: both outside, scale 0
			}
			return new Axis(lo, hi, w, s);
		}
	}

	/**
	 * A new volume of ax.size() × ay.size() × az.size() voxels calibrated as {@code voxelSize}, sampled from
	 * {@code v} (not modified) at the given points; rows in parallel ({@link Parallel#forRange}), each computed
	 * the same way whatever the thread count.
	 */
	public static Volume sample(final Volume v, final Axis ax, final Axis ay, final Axis az, final VoxelSize voxelSize) {
		final int ox = ax.size(), oy = ay.size(), oz = az.size();
		MemoryBudget.require(4L * ox * oy * oz, "resampling an image to " + ox + " x " + oy + " x " + oz);
		final Volume out = Volume.zeros(ox, oy, oz, voxelSize);
		final float[] in = v.data(), res = out.data();
		final int nx = v.nx(), ny = v.ny();
		Parallel.forRange(oy * oz, row -> {
			final int y = row % oy, z = row / oy;
			final int y0 = ay.lo[y], y1 = ay.hi[y], z0 = az.lo[z], z1 = az.hi[z];
			final double wy = ay.w[y], wz = az.w[z], sy = ay.scale[y], sz = az.scale[z];
			final int r00 = nx * (y0 + ny * z0), r10 = nx * (y1 + ny * z0), r01 = nx * (y0 + ny * z1), r11 = nx * (y1 + ny * z1);
			for (int x = 0; x < ox; x++) {
				final int x0 = ax.lo[x], x1 = ax.hi[x];
				final double wx = ax.w[x], sx = ax.scale[x];
				final double c00 = sx * (in[r00 + x0] + wx * (in[r00 + x1] - in[r00 + x0]));
				final double c10 = sx * (in[r10 + x0] + wx * (in[r10 + x1] - in[r10 + x0]));
				final double c01 = sx * (in[r01 + x0] + wx * (in[r01 + x1] - in[r01 + x0]));
				final double c11 = sx * (in[r11 + x0] + wx * (in[r11 + x1] - in[r11 + x0]));
				final double c0 = sy * (c00 + wy * (c10 - c00)), c1 = sy * (c01 + wy * (c11 - c01));
				res[x + ox * row] = (float) (sz * (c0 + wz * (c1 - c0)));
			}
		});
		return out;
	}
}
