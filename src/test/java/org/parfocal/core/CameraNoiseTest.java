package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.testing.TestVolumes;

/**
 * The gain and read-noise estimate against seeded simulations of y = g·Poisson(λ) + N(0, σ²) + o rounded to
 * integers, whose truth is known (Poisson mean = variance, textbook; the affine variance of Foi et al., IEEE
 * TIP 17(10), 2008).
 */
class CameraNoiseTest {

	/** Blurred blobs on a background, photons up to ~peak. */
	static Volume recording(final double gain, final double readNoise, final double offset, final double peak, final double bg, final long seed) {
		final int nx = 80, ny = 80, nz = 24;
		final Volume obj = Volume.zeros(nx, ny, nz, VoxelSize.UNCALIBRATED);
		final Well19937c rng = new Well19937c(seed);
		for (int b = 0; b < 25; b++) {
			final double cx = rng.nextDouble() * nx, cy = rng.nextDouble() * ny, cz = 6 + rng.nextDouble() * (nz - 12), r = 3 + 5 * rng.nextDouble();
			final double a = 0.3 + 0.7 * rng.nextDouble();
			for (int z = 0; z < nz; z++)
				for (int y = 0; y < ny; y++)
					for (int x = 0; x < nx; x++) {
						final double d2 = ((x - cx) * (x - cx) + (y - cy) * (y - cy) + 4 * (z - cz) * (z - cz)) / (r * r);
						if (d2 < 1) obj.data()[x + nx * (y + ny * z)] += (float) a;
					}
		}
		final Volume blurred = ConvolutionOperator.create(TestVolumes.gaussianPsf(9, 9, 9, 1.2, 1.2, 1.5), obj, Boundary.MIRROR).apply(obj);
		float max = 0;
		for (final float v : blurred.data()) max = Math.max(max, v);
		final float[] mean = blurred.data().clone();
		for (int i = 0; i < mean.length; i++) mean[i] = (float) (mean[i] / max * peak + bg);
		final Volume photons = Noise.poisson(Volume.wrap(mean, nx, ny, nz, VoxelSize.UNCALIBRATED), 1, seed + 1);
		final float[] out = photons.data();
		final Well19937c read = new Well19937c(seed + 2);
		for (int i = 0; i < out.length; i++) out[i] = (float) Math.max(0, Math.min(65535, Math.rint(out[i] * gain + readNoise * read.nextGaussian() + offset)));
		return photons;
	}

	@Test
	void gainAndReadNoiseOfSeededSimulations() {
		final double[][] cases = { // gain, read noise (ADU), offset, peak photons, background photons
				{ 2.5, 3.0, 100, 500, 20 }, { 0.7, 1.2, 400, 1500, 5 }, { 4.0, 6.0, 200, 200, 10 } };
		long seed = 11;
		for (final double[] c : cases) {
			final CameraNoise n = CameraNoise.estimate(recording(c[0], c[1], c[2], c[3], c[4], seed++), c[2]);
			assertEquals(c[0], n.gain(), 0.10 * c[0], "gain of " + java.util.Arrays.toString(c));
			assertEquals(c[1], n.readNoise(), 0.5 * c[1], // the rougher figure: extrapolated to the offset
					 "read noise of " + java.util.Arrays.toString(c));
			assertEquals(1 / n.gain(), n.photonsPerUnit(), 1e-12);
		}
	}

	@Test
	void withoutOffsetTheReadNoiseIsUnknown() {
		final CameraNoise n = CameraNoise.estimate(recording(2, 2, 100, 300, 10, 5), Double.NaN);
		assertTrue(Double.isNaN(n.readNoise()));
		assertEquals(2, n.gain(), 0.2);
	}

	@Test
	void flatOrTinyImagesGetOneLine() {
		TestVolumes.assertMessage("The image is too small to estimate its noise (at least 7 voxels along one axis)",
				() -> CameraNoise.estimate(Volume.zeros(5, 5, 5, VoxelSize.UNCALIBRATED), 0));
		TestVolumes.assertMessage("The noise does not grow with the signal here: cannot estimate the camera gain (too flat or too dark an image?)",
				() -> CameraNoise.estimate(Volume.zeros(64, 64, 8, VoxelSize.UNCALIBRATED), 0));
	}
}
