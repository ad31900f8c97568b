package org.parfocal.fft;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.bytedeco.javacpp.Pointer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;

/**
 * The FFTW backend against the pure-Java one and against the DFT's definition: the same spectra and
 * convolutions within float rounding, bitwise thread invariance, native memory given back.
 */
class FftBackendTest {

	private static float[] random(final long seed, final int n) {
		final Random r = new Random(seed);
		final float[] a = new float[n];
		for (int i = 0; i < n; i++) a[i] = r.nextFloat() - 0.5f;
		return a;
	}

	private static double maxAbs(final float[] a) {
		double m = 0;
		for (final float v : a) m = Math.max(m, Math.abs(v));
		return m;
	}

	private static void assertClose(final float[] expected, final float[] actual, final double rel, final String what) {
		final double tol = rel * maxAbs(expected);
		for (int i = 0; i < expected.length; i++)
			if (Math.abs(expected[i] - actual[i]) > tol) throw new AssertionError(what + ": index " + i + " expected " + expected[i] + " got " + actual[i] + " (tolerance " + tol + ")");
	}

	@Test
	void fftwLoadsHereAndIsTheAutomaticChoice() {
		// the build puts FFTW's jars with linux-x86_64 natives on the test class path: if they stop loading, say so
		assumeTrue(System.getProperty("os.name").toLowerCase().contains("linux") && "amd64".equals(System.getProperty("os.arch")));
		assertTrue(FftBackend.FFTW.available(), () -> "FFTW does not load: " + FftBackend.FFTW.unavailableReason());
		final String old = System.getProperty(FftBackend.PROPERTY);
		try {
			System.clearProperty(FftBackend.PROPERTY);
			assertEquals(FftBackend.FFTW, FftBackend.selected());
			System.setProperty(FftBackend.PROPERTY, "java");
			assertEquals(FftBackend.JAVA, new RealFft(4, 4, 4).backend());
			System.setProperty(FftBackend.PROPERTY, "fftw");
			assertEquals(FftBackend.FFTW, new RealFft(4, 4, 4).backend());
			System.setProperty(FftBackend.PROPERTY, "cufft");
			final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, FftBackend::selected);
			assertTrue(e.getMessage().contains("use auto, fftw or java"), e.getMessage());
		} finally {
			if (old == null) System.clearProperty(FftBackend.PROPERTY);
			else System.setProperty(FftBackend.PROPERTY, old);
		}
		assertTrue(FftBackend.FFTW.description().startsWith("FFTW 3.3.10"), FftBackend.FFTW.description());
	}

	/** Oracle: the DFT by its definition, X(k) = Σ x(n) exp(−2πi k·n/N), in double, at a few frequencies. */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@CsvSource({ "1,1,1", "7,1,1", "8,1,1", "5,3,1", "11,13,1", "9,6,5", "13,11,7", "4,1,6", "20,18,9" })
	void fftwForwardEqualsTheDefinition(final int nx, final int ny, final int nz) {
		assumeTrue(FftBackend.FFTW.available());
		final float[] x = random(nx * 31 + ny * 7 + nz, nx * ny * nz);
		final RealFft fft = new RealFft(nx, ny, nz, FftBackend.FFTW);
		final float[] s = fft.newSpectrum();
		fft.forward(x, s);
		final int h = nx / 2 + 1;
		double sumAbs = 0;
		for (final float v : x) sumAbs += Math.abs(v);
		for (int kz = 0; kz < nz; kz++)
			for (int ky = 0; ky < ny; ky++)
				for (int kx = 0; kx < h; kx++) {
					double re = 0, im = 0;
					for (int z = 0; z < nz; z++)
						for (int y = 0; y < ny; y++)
							for (int xx = 0; xx < nx; xx++) {
								final double phase = -2 * Math.PI * ((double) kx * xx / nx + (double) ky * y / ny + (double) kz * z / nz);
								re += x[xx + nx * (y + ny * z)] * Math.cos(phase);
								im += x[xx + nx * (y + ny * z)] * Math.sin(phase);
							}
					final int o = 2 * (kx + h * (ky + ny * kz));
					assertEquals(re, s[o], 1e-5 * sumAbs);
					assertEquals(im, s[o + 1], 1e-5 * sumAbs);
				}
		final float[] back = new float[x.length];
		fft.inverse(s, back);
		assertClose(x, back, 1e-5, "round trip");
	}

	/**
	 * Both backends on the operations the engines use: spectra, inverse, the plain convolution, and the pruned
	 * in-place convolution with per-row hooks and a line-layout transfer function, agree within 1e-5 of the
	 * largest value (float rounding of two different FFT algorithms).
	 */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@CsvSource({ "16,1,1", "15,9,1", "40,36,1", "24,20,18", "25,27,11", "96,80,12", "33,1,20" })
	void backendsAgree(final int nx, final int ny, final int nz) {
		assumeTrue(FftBackend.FFTW.available());
		final RealFft java = new RealFft(nx, ny, nz, FftBackend.JAVA), fftw = new RealFft(nx, ny, nz, FftBackend.FFTW);
		final float[] x = random(nx + 100 * ny + 10000 * nz, nx * ny * nz), kernel = random(7, nx * ny * nz);
		final float[] sj = java.newSpectrum(), sf = fftw.newSpectrum();
		java.forward(x, sj);
		fftw.forward(x, sf);
		assertClose(sj, sf, 1e-5, "spectrum");
		final float[] bj = new float[x.length], bf = new float[x.length];
		java.inverse(sj.clone(), bj);
		fftw.inverse(sj.clone(), bf);
		assertClose(bj, bf, 1e-5, "inverse");

		final float[] tj = java.transferFunction(kernel), tf = fftw.transferFunction(kernel);
		assertClose(tj, tf, 1e-5, "transfer function");
		for (final boolean conj : new boolean[] { false, true }) {
			final float[] cj = x.clone(), cf = x.clone();
			java.convolve(cj, tj, conj, java.newSpectrum());
			fftw.convolve(cf, tf, conj, fftw.newSpectrum());
			assertClose(cj, cf, 1e-5, "convolution, conjugate " + conj);
		}

		// pruned in-place convolution: input rows a box, output rows another, hooks on both sides
		final RealFft.Rows in = java.rows(ny / 4, Math.max(ny / 4 + 1, 3 * ny / 4), nz / 3, Math.max(nz / 3 + 1, nz - 1));
		final RealFft.Rows out = java.rows(0, Math.max(1, ny / 2), nz / 2, nz);
		final float[][] grids = new float[2][];
		final double[][] rowSums = new double[2][ny * nz];
		final RealFft[] ffts = { java, fftw };
		final float[][] transfers = { tj, tf };
		for (int b = 0; b < 2; b++) {
			final RealFft f = ffts[b];
			final float[] g = f.newGrid();
			final float[] lineData = f.newGrid();
			final RealFft.LineTransfer lt = f.lineTransfer(transfers[b], lineData);
			final double[] sums = rowSums[b];
			f.convolveInPlace(g, lt, false, in, (row, off) -> {
				final int y = row % ny, z = row / ny;
				for (int i = 0; i < nx; i++) g[off + i] = x[i + nx * (y + ny * z)];
			}, out, (row, off) -> {
				double s = 0;
				for (int i = 0; i < nx; i++) s += g[off + i];
				sums[row] = s;
			});
			grids[b] = g;
		}
		final float[] oj = new float[out.count() * nx], of = new float[out.count() * nx];
		for (int i = 0, k = 0; i < out.count(); i++) {
			final int row = out.y0() + i % (out.y1() - out.y0()) + ny * (out.z0() + i / (out.y1() - out.y0()));
			for (int xx = 0; xx < nx; xx++, k++) {
				oj[k] = grids[0][java.rowStride() * row + xx];
				of[k] = grids[1][fftw.rowStride() * row + xx];
			}
			assertEquals(rowSums[0][row], rowSums[1][row], 1e-5 * nx * maxAbs(oj) + 1e-6, "row hook of row " + row);
		}
		assertClose(oj, of, 1e-5, "pruned in-place convolution");
	}

	/** Slices and blocks have fixed sizes, so 1 and 2 threads compute every value by the same operations. */
	@Test
	void oneAndTwoThreadsAreBitwiseIdenticalOnFftw() {
		assumeTrue(FftBackend.FFTW.available());
		final int nx = 45, ny = 40, nz = 24;
		final RealFft fft = new RealFft(nx, ny, nz, FftBackend.FFTW);
		final float[] t = fft.transferFunction(random(3, nx * ny * nz));
		final float[] x = random(4, nx * ny * nz);
		final float[] one = x.clone(), two = x.clone();
		Parallelization.runWithNumThreads(1, () -> fft.convolve(one, t, true, fft.newSpectrum()));
		Parallelization.runWithNumThreads(2, () -> fft.convolve(two, t, true, fft.newSpectrum()));
		assertArrayEquals(one, two);
	}

	/**
	 * Native buffers are given back after each step: 300 transforms of several sizes leave at most
	 * {@link FftwLibrary#IDLE_BUFFERS} slice or block buffers allocated (JavaCPP's count of its native bytes), never
	 * a native copy of a grid, and {@link FftwLibrary#releaseIdle} frees them all.
	 */
	@Test
	void nativeMemoryIsGivenBack() {
		assumeTrue(FftBackend.FFTW.available());
		FftwLibrary.releaseIdle();
		final long base = Pointer.totalBytes();
		final int[][] sizes = { { 120, 100, 36 }, { 64, 64, 1 }, { 30, 20, 10 } };
		long buffer = 4L * RealFft.BLOCK_FLOATS;
		for (final int[] s : sizes) buffer = Math.max(buffer, 4L * 2 * (s[0] / 2 + 1) * s[1]);
		buffer += FftwLibrary.ALIGN;
		long peak = 0;
		for (int run = 0; run < 100; run++)
			for (final int[] s : sizes) {
				final RealFft fft = new RealFft(s[0], s[1], s[2], FftBackend.FFTW);
				final float[] g = fft.newGrid();
				g[0] = 1;
				fft.forwardInPlace(g, fft.allRows());
				fft.inverseInPlace(g, fft.allRows());
				assertEquals(1f, g[0], 1e-5f);
				peak = Math.max(peak, Pointer.totalBytes() - base);
			}
		assertTrue(peak <= FftwLibrary.IDLE_BUFFERS * buffer, "native bytes held " + peak + ", at most " + FftwLibrary.IDLE_BUFFERS * buffer + " expected");
		FftwLibrary.releaseIdle();
		assertEquals(base, Pointer.totalBytes(), "native bytes after releasing idle buffers");
	}
}
