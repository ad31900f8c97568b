package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;

/**
 * The held-out stop's band criterion ({@link BandScore}) against Parseval's theorem for the discrete Fourier
 * transform, Σ_f |X(f)|² = N Σ_n |x(n)|² (common practice), and against the definition W = 1/|H|² inside the band:
 * the score of a blurred error is the energy of the error itself, whatever the blur, for frequencies the optics pass.
 * The blur here is a direct circular convolution (loops, no FFT), so the check does not lean on the code it tests.
 */
class BandScoreTest {

	/** A PSF of one voxel passes every frequency with |H| = 1: the score is N Σ r² (Parseval), odd and even sizes. */
	@Test
	void withAPointPsfTheScoreIsParsevalsEnergy() {
		for (final int[] n : new int[][] { { 9, 8, 5 }, { 16, 7, 6 }, { 12, 12, 1 } }) {
			final int len = n[0] * n[1] * n[2];
			final Random rnd = new Random(3);
			final float[] model = new float[len], held = new float[len];
			double energy = 0;
			for (int i = 0; i < len; i++) {
				model[i] = (float) rnd.nextGaussian();
				held[i] = (float) (5 * rnd.nextDouble());
				final double r = model[i] + 2.0 - held[i];
				energy += r * r;
			}
			final BandScore s = new BandScore(Volume.wrap(new float[] { 1f }, 1, 1, 1, org.parfocal.core.VoxelSize.microns(0.1, 0.1, 0.2)), n);
			assertEquals(len * energy, s.score(model, 2.0, held), 1e-4 * len * energy, java.util.Arrays.toString(n));
		}
	}

	/**
	 * A cosine error blurred by a Gaussian PSF: inside the band (|H| &gt; 0.03) the score is the cosine's own energy
	 * N Σ e² (the 1/|H|² weight undoes the blur); far outside it the frequency is left out and the score is 0.
	 */
	@Test
	void insideTheBandTheBlurIsUndoneOutsideItIsLeftOut() {
		final int[] n = { 24, 20, 10 };
		final Volume psf = Synthetic.gaussianPsf(9, 9, 7, 1.2, 1.2, 1.0);
		// frequency (2, 1, 1) cycles per box: |H| about exp(−2π²σ²f²) ≈ 0.8 for these widths; (10, 9, 4): far below 0.03
		for (final int[] k : new int[][] { { 2, 1, 1 }, { 10, 9, 4 } }) {
			final float[] e = new float[n[0] * n[1] * n[2]];
			double energy = 0;
			for (int z = 0; z < n[2]; z++)
				for (int y = 0; y < n[1]; y++)
					for (int x = 0; x < n[0]; x++) {
						final double v = Math.cos(2 * Math.PI * ((double) k[0] * x / n[0] + (double) k[1] * y / n[1] + (double) k[2] * z / n[2]));
						e[x + n[0] * (y + n[1] * z)] = (float) v;
						energy += v * v;
					}
			final float[] blurred = circularBlur(e, n, psf);
			final double score = new BandScore(psf, n).score(blurred, 0, new float[e.length]);
			final int len = e.length;
			if (k[0] == 2) assertEquals(len * energy, score, 1e-3 * len * energy, "inside the band");
			else assertTrue(score < 1e-9 * len * energy, "outside the band: " + score);
		}
	}

	/** Voxels left out of the held-out part (NaN: saturated) add nothing. */
	@Test
	void voxelsLeftOutAddNothing() {
		final int[] n = { 8, 6, 4 };
		final float[] model = new float[192], held = new float[192];
		held[5] = Float.NaN;
		model[5] = 100f;
		final BandScore s = new BandScore(Volume.wrap(new float[] { 1f }, 1, 1, 1, org.parfocal.core.VoxelSize.microns(0.1, 0.1, 0.2)), n);
		assertEquals(0, s.score(model, 0, held), 0);
		model[6] = 1f;
		assertEquals(192, s.score(model, 0, held), 1e-3);
	}

	/** Circular convolution by direct summation, the kernel's centre at index size/2. */
	static float[] circularBlur(final float[] e, final int[] n, final Volume psf) {
		final int[] k = psf.shape();
		final float[] p = psf.data(), out = new float[e.length];
		for (int z = 0; z < n[2]; z++)
			for (int y = 0; y < n[1]; y++)
				for (int x = 0; x < n[0]; x++) {
					double acc = 0;
					for (int c = 0; c < k[2]; c++)
						for (int b = 0; b < k[1]; b++)
							for (int a = 0; a < k[0]; a++) {
								final int sx = Math.floorMod(x - (a - k[0] / 2), n[0]), sy = Math.floorMod(y - (b - k[1] / 2), n[1]),
										sz = Math.floorMod(z - (c - k[2] / 2), n[2]);
								acc += p[a + k[0] * (b + k[1] * c)] * e[sx + n[0] * (sy + n[1] * sz)];
							}
					out[x + n[0] * (y + n[1] * z)] = (float) acc;
				}
		return out;
	}
}
