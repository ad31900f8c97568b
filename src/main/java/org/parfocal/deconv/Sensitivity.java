package org.parfocal.deconv;

import org.parfocal.core.Parallel;

/**
 * Hᵀ1 on the object domain of non-circulant edges (Bertero &amp; Boccacci, A&amp;A 2005): how much of the
 * image window each object voxel reaches through the PSF. Object voxel l (per axis, in [0, n + k − 1)) meets
 * the window through the PSF offsets j ∈ [k − 1 − l, k − 1 − l + n) ∩ [0, k), a box, so Hᵀ1 is a box sum
 * of the PSF, read from its summed-area table (Crow, SIGGRAPH 1984) with eight lookups per voxel, in double.
 * <p>
 * Written by hand because it is cheaper and more exact than the convolution of the window's indicator with
 * the PSF by FFT that it replaces (one transform pair of the padded grid, rounding of about 1e-7), and no
 * library on the class path makes 3D summed-area tables. Shared by the non-blind and the blind engines, so
 * that with the PSF held fixed the two give the same numbers.
 */
public final class Sensitivity {

	private Sensitivity() {}

	/**
	 * Hᵀ1 for a PSF h (kx × ky × kz, x fastest) and an image window of nx × ny × nz, on the object domain of
	 * (n + k − 1) per axis, x fastest; negative box sums (a PSF with negative values) are taken as 0.
	 */
	public static float[] of(final float[] h, final int[] k, final int[] n) {
		final int kx = k[0], ky = k[1], kz = k[2];
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
		final int[] m = new int[3];
		final int[][] lo = new int[3][], hi = new int[3][];
		for (int d = 0; d < 3; d++) {
			m[d] = n[d] + k[d] - 1;
			lo[d] = new int[m[d]];
			hi[d] = new int[m[d]];
			for (int l = 0; l < m[d]; l++) {
				lo[d][l] = Math.max(0, k[d] - 1 - l);
				hi[d][l] = Math.max(lo[d][l], Math.min(k[d], k[d] - 1 - l + n[d]));
			}
		}
		final int mx = m[0], my = m[1], mz = m[2];
		final float[] sens = new float[mx * my * mz];
		Parallel.forRange(my * mz, r -> {
			final int iy = r % my, iz = r / my, y0 = sxn * lo[1][iy], y1 = sxn * hi[1][iy], z0 = sxy * lo[2][iz], z1 = sxy * hi[2][iz];
			// the y-z box sums of the table, per x: then each voxel is a difference of two of them
			final double[] row = new double[kx + 1];
			for (int xx = 0; xx <= kx; xx++) row[xx] = sat[xx + y1 + z1] - sat[xx + y0 + z1] - sat[xx + y1 + z0] + sat[xx + y0 + z0];
			for (int i = 0, o = r * mx; i < mx; i++) sens[o + i] = (float) Math.max(0, row[hi[0][i]] - row[lo[0][i]]);
		});
		return sens;
	}

	/** The largest value of a sensitivity map. */
	public static float max(final float[] sens) {
		float max = 0;
		for (final float v : sens) max = Math.max(max, v);
		return max;
	}

	/**
	 * In place: s ← 1/s where s ≥ {@link EdgeMode#MIN_SENSITIVITY} of the largest value (and positive), 0
	 * elsewhere: voxels the data barely see are held at zero.
	 */
	public static float[] invert(final float[] sens) {
		final float min = (float) (EdgeMode.MIN_SENSITIVITY * max(sens));
		final int block = 1 << 16;
		Parallel.forRange((sens.length + block - 1) / block, b -> {
			for (int i = b * block, e = Math.min(sens.length, i + block); i < e; i++) {
				final float v = sens[i];
				sens[i] = v >= min && v > 0 ? 1f / v : 0f;
			}
		});
		return sens;
	}
}
