package org.parfocal.fft;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

class RealFftTest {

	private static float[] random(final long seed, final int n) {
		final Random r = new Random(seed);
		final float[] a = new float[n];
		for (int i = 0; i < n; i++) a[i] = r.nextFloat() - 0.5f;
		return a;
	}

	/** Oracle: the DFT by its definition, X(k) = Σ x(n) exp(−2πi k·n/N), in double. */
	private static double[] naiveDft(final float[] x, final int nx, final int ny, final int nz, final int kx, final int ky, final int kz) {
		double re = 0, im = 0;
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < ny; y++)
				for (int xx = 0; xx < nx; xx++) {
					final double phase = -2 * Math.PI * ((double) kx * xx / nx + (double) ky * y / ny + (double) kz * z / nz);
					final double v = x[xx + nx * (y + ny * z)];
					re += v * Math.cos(phase);
					im += v * Math.sin(phase);
				}
		return new double[] { re, im };
	}

	@ParameterizedTest(name = "{0} x {1} x {2}")
	@CsvSource({ "1,1,1", "2,1,1", "7,1,1", "8,1,1", "5,3,1", "6,4,1", "11,13,1", "9,6,5", "10,7,3", "13,11,7", "4,1,6", "3,2,2" })
	void forwardEqualsDefinitionOfDft(final int nx, final int ny, final int nz) {
		final float[] x = random(nx * 1000 + ny * 10 + nz, nx * ny * nz);
		final RealFft fft = new RealFft(nx, ny, nz);
		final float[] s = fft.newSpectrum();
		fft.forward(x, s);
		final int h = nx / 2 + 1;
		double maxAbs = 0;
		for (final float v : x) maxAbs += Math.abs(v);
		for (int kz = 0; kz < nz; kz++)
			for (int ky = 0; ky < ny; ky++)
				for (int kx = 0; kx < h; kx++) {
					final double[] ref = naiveDft(x, nx, ny, nz, kx, ky, kz);
					final int o = 2 * (kx + h * (ky + ny * kz));
					assertEquals(ref[0], s[o], 1e-5 * maxAbs, "Re at " + kx + "," + ky + "," + kz);
					assertEquals(ref[1], s[o + 1], 1e-5 * maxAbs, "Im at " + kx + "," + ky + "," + kz);
				}
	}

	/**
	 * Round trip over every length 2..70 along each axis (cf. imglib2-algorithm-fft's FFTTest over 40..89).
	 * Lengths with a prime factor above 5 go through JTransforms' Bluestein path, which in single precision
	 * loses about one more digit (seen here: 1.4e-5 at length 53); the convolution engine pads to 5-smooth
	 * lengths and never uses it.
	 */
	@Test
	void roundTripEverySizeFrom2To70() {
		for (int n = 2; n <= 70; n++) {
			for (final int[] shape : new int[][] { { n, 1, 1 }, { n, 3, 1 }, { 3, n, 1 }, { 2, 3, n }, { n, 5, 4 } }) {
				final int len = shape[0] * shape[1] * shape[2];
				final float[] x = random(n, len);
				final RealFft fft = new RealFft(shape[0], shape[1], shape[2]);
				final float[] s = fft.newSpectrum(), back = new float[len];
				fft.forward(x, s);
				fft.inverse(s, back);
				final boolean fast = FastSizes.isFast(shape[0]) && FastSizes.isFast(shape[1]) && FastSizes.isFast(shape[2]);
				for (int i = 0; i < len; i++)
					assertEquals(x[i], back[i], fast ? 2e-6 : 5e-5, "size " + shape[0] + "x" + shape[1] + "x" + shape[2] + " at " + i);
			}
		}
	}

	@Test
	void forwardLeavesInputUntouched() {
		final float[] x = random(3, 12 * 10 * 6);
		final float[] copy = x.clone();
		final RealFft fft = new RealFft(12, 10, 6);
		fft.forward(x, fft.newSpectrum());
		assertArrayEquals(copy, x);
	}

	@Test
	void oneAndTwoThreadsGiveIdenticalSpectra() {
		final int nx = 60, ny = 45, nz = 18;
		final float[] x = random(11, nx * ny * nz);
		final RealFft fft = new RealFft(nx, ny, nz);
		final float[] s1 = Parallelization.runSingleThreaded(() -> {
			final float[] s = fft.newSpectrum();
			fft.forward(x, s);
			return s;
		});
		final float[] s2 = Parallelization.runWithNumThreads(2, () -> {
			final float[] s = fft.newSpectrum();
			fft.forward(x, s);
			return s;
		});
		assertArrayEquals(s1, s2, "1 and 2 threads must give bitwise identical spectra");
	}

	@Test
	void fastSizesAreFiveSmooth() {
		assertEquals(1, FastSizes.next(1));
		assertEquals(8, FastSizes.next(7));
		assertEquals(72, FastSizes.next(71));
		assertEquals(256, FastSizes.next(256));
		assertEquals(270, FastSizes.next(257));
		for (int n = 1; n < 3000; n++) {
			final int m = FastSizes.next(n);
			assertTrue(m >= n && FastSizes.isFast(m));
			for (int j = n; j < m; j++) assertTrue(!FastSizes.isFast(j), "skipped fast size " + j);
		}
	}
}
