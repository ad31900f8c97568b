package org.parfocal.quality;

import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Parallel;
import org.parfocal.core.Smoothing;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.PsfGrid;

/**
 * Resampling to another voxel size by linear (bilinear in 2D, trilinear in 3D) interpolation.
 * <p>
 * Voxel centres are aligned: output voxel i along an axis samples the input at the continuous index
 * (i + ½)·t/s − ½ (s the input, t the output voxel size), clamped to [0, n − 1], i.e. the edge value is
 * repeated; the output has round(n·(s/t)) voxels, halves rounded up (at least 1). This is
 * {@code scipy.ndimage.map_coordinates(image, coords, order=1, mode="nearest")}.
 * <p>
 * Linear interpolation alone does not low-pass filter: shrinking aliases fine structure (a reference at 0.13 µm
 * shrunk 3.9× to a 0.512 µm grid turns fine filaments into spurious texture). So along every axis that shrinks by
 * a factor k = s/t &lt; 1 the image is first smoothed with a Gaussian of σ = (1/k − 1)/2 input voxels, the default
 * anti-aliasing of scikit-image's {@code transform.resize} (from memory), with a mirrored border
 * ({@link Smoothing}). A large mismatch is reported by {@link #scaleFactors} for the caller to warn about.
 * Written by hand (a separable loop on the arrays) because ImgLib2's interpolators evaluate one point at a
 * time through a {@code RealRandomAccess}, several times slower for whole stacks.
 */
public final class Resampling {

	private Resampling() {}

	/**
	 * Micrometres per unit for the length units ImageJ users write; NaN for an unknown unit. The table is
	 * {@link PsfGrid#micronsPer}'s (one table of units in the project): this only turns its refusal into NaN.
	 */
	public static double micronsPerUnit(final String unit) {
		final VoxelSize v = new VoxelSize(1, 1, 1, unit);
		if (!v.isCalibrated()) return Double.NaN;
		try {
			return PsfGrid.micronsPer(v);
		} catch (final IllegalArgumentException notALength) {
			return Double.NaN;
		}
	}

	/** {dx, dy, dz} in µm, or an exception naming the unit if it is not a known length unit. */
	public static double[] microns(final VoxelSize v, final String what) {
		final double f = micronsPerUnit(v.unit());
		if (Double.isNaN(f))
			throw new IllegalArgumentException(what + " is calibrated in '" + v.unit() + "', which is not a length unit Parfocal converts (use µm, nm or mm)");
		return new double[] { v.dx() * f, v.dy() * f, v.dz() * f };
	}

	/** Input-to-output voxel size ratio s/t per axis (above 1: the output grid is finer). */
	public static double[] scaleFactors(final VoxelSize from, final VoxelSize to) {
		final double[] s = microns(from, "The image"), t = microns(to, "The target grid");
		return new double[] { s[0] / t[0], s[1] / t[1], s[2] / t[2] };
	}

	/**
	 * {@code v} (not modified) resampled to voxel size {@code target} (both calibrated in length units); a 2D
	 * image stays 2D. Returns a copy when the sizes already agree to 1e-9 relative.
	 */
	public static Volume toVoxelSize(final Volume v, final VoxelSize target) {
		final double[] f = scaleFactors(v.voxelSize(), target);
		final int[] n = v.shape(), o = new int[3];
		boolean same = true;
		for (int d = 0; d < 3; d++) {
			if (d == 2 && n[2] == 1) f[2] = 1;
			o[d] = (int) Math.max(1, Math.round(n[d] * f[d]));
			same &= Math.abs(f[d] - 1) < 1e-9;
		}
		if (same) return v.copy().withVoxelSize(target);
		final double[] sigma = new double[3];
		for (int d = 0; d < 3; d++) sigma[d] = f[d] < 1 && n[d] > 1 ? (1 / f[d] - 1) / 2 : 0;
		final Volume src = sigma[0] > 0 || sigma[1] > 0 || sigma[2] > 0 ? Smoothing.gaussian(v, sigma[0], sigma[1], sigma[2]) : v;
		MemoryBudget.require(4L * o[0] * o[1] * o[2], "resampling an image to " + o[0] + " x " + o[1] + " x " + o[2]);
		final Volume out = Volume.zeros(o[0], o[1], o[2], target);
		// Per axis: lower source index and weight of the upper neighbour for every output index.
		final int[][] lo = new int[3][];
		final double[][] w = new double[3][];
		for (int d = 0; d < 3; d++) {
			lo[d] = new int[o[d]];
			w[d] = new double[o[d]];
			for (int i = 0; i < o[d]; i++) {
				final double c = Math.min(Math.max((i + 0.5) / f[d] - 0.5, 0), n[d] - 1);
				final int l = Math.min((int) Math.floor(c), Math.max(n[d] - 2, 0));
				lo[d][i] = l;
				w[d][i] = n[d] == 1 ? 0 : c - l;
			}
		}
		final float[] in = src.data(), res = out.data();
		final int nx = n[0], ny = n[1];
		Parallel.forRange(o[1] * o[2], row -> {
			final int y = row % o[1], z = row / o[1];
			final int y0 = lo[1][y], z0 = lo[2][z];
			final int y1 = Math.min(y0 + 1, ny - 1), z1 = Math.min(z0 + 1, n[2] - 1);
			final double wy = w[1][y], wz = w[2][z];
			final int r00 = nx * (y0 + ny * z0), r10 = nx * (y1 + ny * z0), r01 = nx * (y0 + ny * z1), r11 = nx * (y1 + ny * z1);
			for (int x = 0; x < o[0]; x++) {
				final int x0 = lo[0][x], x1 = Math.min(x0 + 1, nx - 1);
				final double wx = w[0][x];
				final double c00 = in[r00 + x0] + wx * (in[r00 + x1] - in[r00 + x0]);
				final double c10 = in[r10 + x0] + wx * (in[r10 + x1] - in[r10 + x0]);
				final double c01 = in[r01 + x0] + wx * (in[r01 + x1] - in[r01 + x0]);
				final double c11 = in[r11 + x0] + wx * (in[r11 + x1] - in[r11 + x0]);
				final double c0 = c00 + wy * (c10 - c00), c1 = c01 + wy * (c11 - c01);
				res[x + o[0] * row] = (float) (c0 + wz * (c1 - c0));
			}
		});
		return out;
	}
}
