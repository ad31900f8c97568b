package org.parfocal.conv;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.stream.Stream;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.MethodSource;
import org.parfocal.core.Boundary;
import org.parfocal.core.Sums;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

class ConvolutionOperatorTest {

	static Volume random(final long seed, final int nx, final int ny, final int nz) {
		final Random r = new Random(seed);
		final Volume v = Volume.zeros(nx, ny, nz, VoxelSize.microns(0.1, 0.1, 0.3));
		final float[] d = v.data();
		for (int i = 0; i < d.length; i++) d[i] = r.nextFloat();
		return v;
	}

	/**
	 * Oracle: the defining sum out(i) = Σ_j h(j)·ext(x)(i − j + c), evaluated directly in double, with the
	 * extension written out here from its textbook definition (NumPy pad modes constant/symmetric/wrap), not
	 * through the code under test.
	 */
	static double[] direct(final Volume x, final Volume h, final Boundary b) {
		final int[] n = x.shape(), k = h.shape();
		final double[] out = new double[x.size()];
		for (int z = 0; z < n[2]; z++)
			for (int y = 0; y < n[1]; y++)
				for (int xx = 0; xx < n[0]; xx++) {
					double s = 0;
					for (int jz = 0; jz < k[2]; jz++)
						for (int jy = 0; jy < k[1]; jy++)
							for (int jx = 0; jx < k[0]; jx++) {
								final int sx = ext(xx - jx + (k[0] - 1) / 2, n[0], b);
								final int sy = ext(y - jy + (k[1] - 1) / 2, n[1], b);
								final int sz = ext(z - jz + (k[2] - 1) / 2, n[2], b);
								if (sx < 0 || sy < 0 || sz < 0) continue;
								s += (double) h.get(jx, jy, jz) * x.get(sx, sy, sz);
							}
					out[xx + n[0] * (y + n[1] * z)] = s;
				}
		return out;
	}

	private static int ext(int i, final int n, final Boundary b) {
		if (i >= 0 && i < n) return i;
		switch (b) {
		case ZERO:
			return -1;
		case PERIODIC:
			while (i < 0) i += n;
			return i % n;
		default: // reflect about the half-sample point, edge repeated: -1 -> 0, -2 -> 1, n -> n-1
			while (i < 0 || i >= n) i = i < 0 ? -1 - i : 2 * n - 1 - i;
			return i;
		}
	}

	static Stream<Arguments> shapes() {
		final List<Arguments> a = new ArrayList<>();
		final int[][][] cases = { { { 9, 7, 1 }, { 3, 5, 1 } }, { { 8, 6, 1 }, { 4, 2, 1 } }, { { 13, 11, 1 }, { 7, 7, 1 } },
				{ { 5, 6, 7 }, { 3, 2, 3 } }, { { 7, 5, 4 }, { 4, 3, 4 } }, { { 11, 3, 5 }, { 5, 3, 5 } }, { { 6, 6, 6 }, { 6, 6, 6 } } };
		for (final int[][] c : cases)
			for (final Boundary b : Boundary.values()) a.add(Arguments.of(c[0], c[1], b));
		return a.stream();
	}

	@ParameterizedTest(name = "image {0}, psf {1}, {2}")
	@MethodSource("shapes")
	void equalsDirectConvolution(final int[] n, final int[] k, final Boundary b) {
		final Volume x = random(1, n[0], n[1], n[2]);
		final Volume h = random(2, k[0], k[1], k[2]);
		final double[] ref = direct(x, h, b);
		final Volume out = ConvolutionOperator.create(h, x, b).apply(x);
		assertClose(ref, out.data(), 1e-5, "direct sum");
	}

	@ParameterizedTest(name = "image {0}, psf {1}, {2}")
	@MethodSource("shapes")
	void adjointIdentity(final int[] n, final int[] k, final Boundary b) {
		final Volume x = random(3, n[0], n[1], n[2]);
		final Volume y = random(4, n[0], n[1], n[2]);
		final Volume h = random(5, k[0], k[1], k[2]);
		final ConvolutionOperator op = ConvolutionOperator.create(h, x, b);
		final double lhs = Sums.dot(op.apply(x).data(), y.data());
		final double rhs = Sums.dot(x.data(), op.adjoint(y).data());
		assertEquals(lhs, rhs, 1e-5 * Math.abs(lhs), "<Hx,y> = <x,H^T y>");
	}

	/** Golden files from scipy.signal.fftconvolve (python3-scipy 1.10.1), tools/golden/gen_fftconvolve.py. */
	@Test
	void matchesScipyFftconvolve() {
		final List<String> lines = resourceLines("/golden/fftconvolve/manifest.tsv");
		int cases = 0;
		for (final String line : lines) {
			if (line.startsWith("#") || line.isBlank()) continue;
			final String[] f = line.split("\t");
			final int[] n = { Integer.parseInt(f[2]), Integer.parseInt(f[3]), Integer.parseInt(f[4]) };
			final int[] k = { Integer.parseInt(f[5]), Integer.parseInt(f[6]), Integer.parseInt(f[7]) };
			final Volume x = Volume.wrap(readF32("/golden/fftconvolve/" + f[0] + ".image.f32"), n[0], n[1], n[2], null);
			final Volume h = Volume.wrap(readF32("/golden/fftconvolve/" + f[0] + ".psf.f32"), k[0], k[1], k[2], null);
			final float[] ref = readF32("/golden/fftconvolve/" + f[0] + ".out.f32");
			final Volume out = ConvolutionOperator.create(h, x, Boundary.parse(f[1])).apply(x);
			final double[] refD = new double[ref.length];
			for (int i = 0; i < ref.length; i++) refD[i] = ref[i];
			assertClose(refD, out.data(), 1e-5, f[0]);
			cases++;
		}
		assertEquals(15, cases, "every golden case must be checked");
	}

	@Test
	void oneAndTwoThreadsAgree() {
		final Volume x = random(6, 40, 33, 17), h = random(7, 9, 9, 5);
		for (final Boundary b : Boundary.values()) {
			final ConvolutionOperator op = ConvolutionOperator.create(h, x, b);
			final Volume a1 = Parallelization.runSingleThreaded(() -> op.apply(x));
			final Volume a2 = Parallelization.runWithNumThreads(2, () -> op.apply(x));
			final Volume t1 = Parallelization.runSingleThreaded(() -> op.adjoint(x));
			final Volume t2 = Parallelization.runWithNumThreads(2, () -> op.adjoint(x));
			assertClose(toDouble(a1.data()), a2.data(), 1e-5, "apply " + b);
			assertClose(toDouble(t1.data()), t2.data(), 1e-5, "adjoint " + b);
		}
	}

	@Test
	void concurrentCallersShareOneOperator() throws Exception {
		final Volume h = Psfs.normalized(random(8, 7, 7, 3));
		final Volume x = random(9, 32, 30, 12);
		final ConvolutionOperator op = ConvolutionOperator.create(h, x, Boundary.MIRROR);
		final Volume ref = op.apply(x);
		final List<Thread> threads = new ArrayList<>();
		final List<Throwable> errors = java.util.Collections.synchronizedList(new ArrayList<>());
		for (int t = 0; t < 4; t++) {
			final Thread th = new Thread(() -> {
				try {
					for (int i = 0; i < 5; i++) assertArrayEquals(ref.data(), op.apply(x).data());
				} catch (final Throwable e) {
					errors.add(e);
				}
			});
			threads.add(th);
			th.start();
		}
		for (final Thread th : threads) th.join();
		assertTrue(errors.isEmpty(), () -> "concurrent use failed: " + errors);
	}

	@Test
	void unitSumPsfKeepsFluxWithPeriodicAndMirror() {
		// Common practice: a unit-sum kernel conserves the total for circulant (periodic) and
		// symmetric-reflection boundaries (each reflected voxel is counted once per copy).
		final Volume x = random(10, 24, 20, 9), h = Psfs.normalized(random(11, 5, 5, 3));
		final double s = x.sum();
		assertEquals(s, ConvolutionOperator.create(h, x, Boundary.PERIODIC).apply(x).sum(), 1e-5 * s);
		assertEquals(s, ConvolutionOperator.create(h, x, Boundary.PERIODIC).adjoint(x).sum(), 1e-5 * s);
	}

	@Test
	void inputIsNotModified() {
		final Volume x = random(12, 16, 16, 4), h = random(13, 3, 3, 3);
		final Volume copy = x.copy(), hCopy = h.copy();
		final ConvolutionOperator op = ConvolutionOperator.create(h, x, Boundary.MIRROR);
		op.apply(x);
		op.adjoint(x);
		assertEquals(copy, x);
		assertEquals(hCopy, h);
	}

	@Test
	void badPsfsAreRejectedWithOneLineMessages() {
		final Volume img3 = random(1, 10, 10, 5), img2 = random(1, 10, 10, 1);
		assertMessage("larger than the image", () -> ConvolutionOperator.create(random(1, 11, 3, 3), img3, Boundary.ZERO));
		assertMessage("2D but the image is 3D", () -> ConvolutionOperator.create(random(1, 3, 3, 1), img3, Boundary.ZERO));
		assertMessage("3D (3 slices) but the image is 2D", () -> ConvolutionOperator.create(random(1, 3, 3, 3), img2, Boundary.ZERO));
		final Volume nan = random(1, 3, 3, 3);
		nan.set(1, 2, 0, Float.NaN);
		assertMessage("non-finite value (NaN) at (1, 2, 0)", () -> ConvolutionOperator.create(nan, img3, Boundary.ZERO));
		assertMessage("Not enough memory", () -> ConvolutionOperator.create(random(1, 3, 3, 3), new int[] { 4000, 4000, 2000 }, Boundary.ZERO));
	}

	@Test
	void resizeCenteredKeepsTheOrigin() {
		final Volume h = Volume.zeros(7, 5, 3, null);
		h.set(3, 2, 1, 1f);
		final Volume big = Psfs.resizeCentered(h, 10, 9, 5);
		assertEquals(1f, big.get((10 - 1) / 2, (9 - 1) / 2, (5 - 1) / 2));
		assertEquals(1.0, big.sum(), 0);
		final Volume small = Psfs.resizeCentered(h, 3, 3, 1);
		assertEquals(1f, small.get(1, 1, 0));
		final Volume shifted = Volume.zeros(7, 5, 3, null);
		shifted.set(0, 4, 2, 5f);
		assertEquals(5f, Psfs.centerOnPeak(shifted).get(3, 2, 1));
	}

	static void assertMessage(final String expected, final org.junit.jupiter.api.function.Executable call) {
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
		assertTrue(e.getMessage().contains(expected), () -> "message '" + e.getMessage() + "' should contain '" + expected + "'");
		assertTrue(!e.getMessage().contains("\n"), "one line");
	}

	static double[] toDouble(final float[] a) {
		final double[] d = new double[a.length];
		for (int i = 0; i < a.length; i++) d[i] = a[i];
		return d;
	}

	/** Max |ref − got| ≤ tol · max |ref|; the failure names the worst voxel. */
	static void assertClose(final double[] ref, final float[] got, final double tol, final String what) {
		assertEquals(ref.length, got.length, what + ": length");
		double scale = 0;
		for (final double v : ref) scale = Math.max(scale, Math.abs(v));
		int worst = 0;
		double err = 0;
		for (int i = 0; i < ref.length; i++) {
			final double e = Math.abs(ref[i] - got[i]);
			if (e > err) {
				err = e;
				worst = i;
			}
		}
		final double rel = err / scale;
		final int w = worst;
		assertTrue(rel <= tol, () -> what + ": relative error " + rel + " at index " + w + " (ref " + ref[w] + ", got " + got[w] + ")");
	}

	static float[] readF32(final String resource) {
		try (InputStream in = ConvolutionOperatorTest.class.getResourceAsStream(resource)) {
			if (in == null) throw new IllegalStateException("missing test resource " + resource);
			final ByteBuffer bb = ByteBuffer.wrap(in.readAllBytes()).order(ByteOrder.LITTLE_ENDIAN);
			final float[] f = new float[bb.remaining() / 4];
			bb.asFloatBuffer().get(f);
			return f;
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
	}

	static List<String> resourceLines(final String resource) {
		try (InputStream in = ConvolutionOperatorTest.class.getResourceAsStream(resource)) {
			if (in == null) throw new IllegalStateException("missing test resource " + resource);
			return List.of(new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n"));
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
	}
}
