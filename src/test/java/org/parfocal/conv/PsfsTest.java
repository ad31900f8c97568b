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
}
