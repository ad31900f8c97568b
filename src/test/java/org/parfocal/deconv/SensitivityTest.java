package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * {@link Sensitivity} against the definition of Hᵀ1 for non-circulant edges (Bertero &amp; Boccacci, A&amp;A
 * 2005, the normalisation of their modified RL): the sum, over the voxels i of the image window, of the PSF
 * value that links object voxel l to i, computed here by direct summation in the engine's geometry (PSF origin
 * ⌊(k − 1)/2⌋, window starting at k − 1 − origin in the object domain). Odd and even PSF sizes, 2D and 3D.
 */
class SensitivityTest {

	@ParameterizedTest(name = "PSF {0} x {1} x {2}, image {3} x {4} x {5}")
	@CsvSource({ "5,4,3,7,6,4", "3,3,1,9,5,1", "4,5,2,3,8,5", "1,1,1,4,3,2" })
	void boxSumsEqualDirectSummation(final int kx, final int ky, final int kz, final int nx, final int ny, final int nz) {
		final int[] k = { kx, ky, kz }, n = { nx, ny, nz };
		final Random r = new Random(kx * 100 + nx);
		final float[] h = new float[kx * ky * kz];
		for (int i = 0; i < h.length; i++) h[i] = r.nextFloat();
		final float[] s = Sensitivity.of(h, k, n);
		final int mx = nx + kx - 1, my = ny + ky - 1, mz = nz + kz - 1;
		assertEquals(mx * my * mz, s.length, "object domain n + k - 1 per axis");
		final int wx = kx - 1 - (kx - 1) / 2, wy = ky - 1 - (ky - 1) / 2, wz = kz - 1 - (kz - 1) / 2;
		double total = 0;
		for (final float v : h) total += v;
		for (int lz = 0; lz < mz; lz++)
			for (int ly = 0; ly < my; ly++)
				for (int lx = 0; lx < mx; lx++) {
					// H x (i) = Σ_l psf(i − l + c) x(l) for window voxel i (object coordinates w + i)
					double sum = 0;
					for (int iz = 0; iz < nz; iz++)
						for (int iy = 0; iy < ny; iy++)
							for (int ix = 0; ix < nx; ix++) {
								final int dx = wx + ix - lx + (kx - 1) / 2, dy = wy + iy - ly + (ky - 1) / 2, dz = wz + iz - lz + (kz - 1) / 2;
								if (dx >= 0 && dx < kx && dy >= 0 && dy < ky && dz >= 0 && dz < kz) sum += h[dx + kx * (dy + ky * dz)];
							}
					assertEquals(sum, s[lx + mx * (ly + my * lz)], 1e-6 * total, "at " + lx + "," + ly + "," + lz);
				}
	}

	@ParameterizedTest(name = "PSF {0} x {1} x {2}")
	@CsvSource({ "5,5,3", "4,6,1" })
	void inversionHoldsBarelySeenVoxelsAtZero(final int kx, final int ky, final int kz) {
		final int[] k = { kx, ky, kz }, n = { 6, 5, kz == 1 ? 1 : 4 };
		final float[] h = new float[kx * ky * kz];
		java.util.Arrays.fill(h, 1f / h.length);
		h[0] = 1e-7f; // one corner voxel of the object domain sees the window through this value alone
		final float[] s = Sensitivity.of(h, k, n), inv = Sensitivity.invert(s.clone());
		final float max = Sensitivity.max(s);
		int held = 0;
		for (int i = 0; i < s.length; i++) {
			if (s[i] >= EdgeMode.MIN_SENSITIVITY * max) {
				assertEquals(1f / s[i], inv[i], 0f, "1/s at " + i);
			} else {
				assertEquals(0f, inv[i], 0f, "held at " + i);
				held++;
			}
		}
		assertTrue(held > 0, "the corner voxels are below the threshold");
	}
}
