package org.parfocal.conv;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

class PsfsTest {

	/** A unit-sum Gaussian sampled at voxel centres, origin at (k-1)/2: the analytic oracle. */
	static Volume gaussian(final int k, final int kz, final double sigma, final double sigmaZ, final VoxelSize v) {
		final Volume g = Volume.zeros(k, k, kz, v);
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < k; y++)
				for (int x = 0; x < k; x++) {
					final double dx = (x - (k - 1) / 2) * v.dx(), dy = (y - (k - 1) / 2) * v.dy(), dz = (z - (kz - 1) / 2) * v.dz();
					g.set(x, y, z, (float) Math.exp(-0.5 * ((dx * dx + dy * dy) / (sigma * sigma) + dz * dz / (sigmaZ * sigmaZ))));
				}
		return Psfs.normalized(g);
	}

	@Test
	void resamplingAGaussianMatchesSamplingItDirectly() {
		final VoxelSize fine = VoxelSize.microns(0.04, 0.04, 0.1), coarse = VoxelSize.microns(0.08, 0.08, 0.2);
		final Volume resampled = Psfs.resampleTo(gaussian(41, 21, 0.15, 0.4, fine), coarse);
		assertEquals(21, resampled.nx());
		assertEquals(11, resampled.nz());
		assertEquals(coarse, resampled.voxelSize());
		final Volume direct = gaussian(21, 11, 0.15, 0.4, coarse);
		double maxErr = 0, peak = 0;
		for (int i = 0; i < direct.size(); i++) {
			maxErr = Math.max(maxErr, Math.abs(direct.data()[i] - resampled.data()[i]));
			peak = Math.max(peak, direct.data()[i]);
		}
		// Voxel centres coincide every second fine voxel, so interpolation is exact up to float rounding.
		assertEquals(0, maxErr / peak, 1e-5);
		assertEquals(1, resampled.sum(), 1e-6);
	}

	@Test
	void upsamplingKeepsTheCentreAndUnitSum() {
		final VoxelSize coarse = VoxelSize.microns(0.1, 0.1, 0.3), fine = VoxelSize.microns(0.05, 0.05, 0.15);
		final Volume up = Psfs.resampleTo(gaussian(15, 9, 0.2, 0.5, coarse), fine);
		assertEquals(29, up.nx());
		assertEquals(17, up.nz());
		int arg = 0;
		for (int i = 1; i < up.size(); i++) if (up.data()[i] > up.data()[arg]) arg = i;
		assertEquals(up.position(arg), "(14, 14, 8)");
		assertEquals(1, up.sum(), 1e-6);
	}

	/**
	 * Placement on an FFT grid follows the origin convention of SciPy's {@code fftconvolve(mode="same")}
	 * (voxel ⌊(k − 1)/2⌋, also for even sizes): that voxel lands on grid voxel s, the one before it on s − 1
	 * modulo p (wrapping around), in a grid with padded rows; gathering reads the same voxels back.
	 */
	@Test
	void placementPutsTheOriginOnTheShiftAndWraps() {
		final int[] k = { 4, 3, 2 }, p = { 6, 5, 4 };
		final int rs = 8; // rows padded as in RealFft's in-place grids
		final float[] kernel = new float[24];
		for (int j = 0; j < kernel.length; j++) kernel[j] = j + 1;
		final float[] grid = new float[rs * p[1] * p[2]];
		Psfs.place(kernel, k, grid, p, rs, new int[3], false);
		// origin (1, 1, 0) at grid voxel 0; kernel voxel (0, 0, 0) at (−1, −1, 0) = (5, 4, 0); (3, 2, 1) at (2, 1, 1)
		assertEquals(kernel[1 + 4 * 1], grid[0]);
		assertEquals(kernel[0], grid[5 + rs * 4]);
		assertEquals(kernel[3 + 4 * (2 + 3 * 1)], grid[2 + rs * (1 + p[1] * 1)]);
		double sum = 0;
		for (final float v : grid) sum += v;
		assertEquals(24 * 25 / 2, sum, 0, "every voxel placed once");
		final float[] shifted = new float[grid.length], back = new float[kernel.length];
		Psfs.place(kernel, k, shifted, p, rs, new int[] { 1, 1, 0 }, false);
		assertEquals(kernel[0], shifted[0], "shifted by the origin: the box starts at voxel 0");
		Psfs.place(back, k, shifted, p, rs, new int[] { 1, 1, 0 }, true);
		org.junit.jupiter.api.Assertions.assertArrayEquals(kernel, back);
	}
}
