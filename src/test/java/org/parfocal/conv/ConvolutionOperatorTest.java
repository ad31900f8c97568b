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
import org.parfocal.testing.TestVolumes;

class ConvolutionOperatorTest {


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
		final Volume x = TestVolumes.random(1, n[0], n[1], n[2]);
		final Volume h = TestVolumes.random(2, k[0], k[1], k[2]);
		final double[] ref = direct(x, h, b);
		final Volume out = ConvolutionOperator.create(h, x, b).apply(x);
		TestVolumes.assertClose(ref, out.data(), 1e-5, "direct sum");
	}

	@ParameterizedTest(name = "image {0}, psf {1}, {2}")
	@MethodSource("shapes")
	void adjointIdentity(final int[] n, final int[] k, final Boundary b) {
		final Volume x = TestVolumes.random(3, n[0], n[1], n[2]);
		final Volume y = TestVolumes.random(4, n[0], n[1], n[2]);
		final Volume h = TestVolumes.random(5, k[0], k[1], k[2]);
		final ConvolutionOperator op = ConvolutionOperator.create(h, x, b);
		final double lhs = Sums.dot(op.apply(x).data(), y.data());
		final double rhs = Sums.dot(x.data(), op.adjoint(y).data());
		assertEquals(lhs, rhs, 1e-5 * Math.abs(lhs), "<Hx,y> = <x,H^T y>");
	}

	/** Golden files from scipy.signal.fftconvolve (python3-scipy 1.10.1), tools/golden/gen_fftconvolve.py. */
	@Test
	void matchesScipyFftconvolve() {
		final List<String> lines = TestVolumes.resourceLines("/golden/fftconvolve/manifest.tsv");
		int cases = 0;
		for (final String line : lines) {
			if (line.startsWith("#") || line.isBlank()) continue;
			final String[] f = line.split("\t");
			final int[] n = { Integer.parseInt(f[2]), Integer.parseInt(f[3]), Integer.parseInt(f[4]) };
			final int[] k = { Integer.parseInt(f[5]), Integer.parseInt(f[6]), Integer.parseInt(f[7]) };
			final Volume x = Volume.wrap(TestVolumes.readF32("/golden/fftconvolve/" + f[0] + ".image.f32"), n[0], n[1], n[2], null);
			final Volume h = Volume.wrap(TestVolumes.readF32("/golden/fftconvolve/" + f[0] + ".psf.f32"), k[0], k[1], k[2], null);
			final float[] ref = TestVolumes.readF32("/golden/fftconvolve/" + f[0] + ".out.f32");
			final Volume out = ConvolutionOperator.create(h, x, Boundary.parse(f[1])).apply(x);
			final double[] refD = new double[ref.length];
			for (int i = 0; i < ref.length; i++) refD[i] = ref[i];
			TestVolumes.assertClose(refD, out.data(), 1e-5, f[0]);
			cases++;
		}
		assertEquals(15, cases, "every golden case must be checked");
	}

	@Test
	void oneAndTwoThreadsAgree() {
		final Volume x = TestVolumes.random(6, 40, 33, 17), h = TestVolumes.random(7, 9, 9, 5);
		for (final Boundary b : Boundary.values()) {
			final ConvolutionOperator op = ConvolutionOperator.create(h, x, b);
			final Volume a1 = Parallelization.runSingleThreaded(() -> op.apply(x));
			final Volume a2 = Parallelization.runWithNumThreads(2, () -> op.apply(x));
			final Volume t1 = Parallelization.runSingleThreaded(() -> op.adjoint(x));
			final Volume t2 = Parallelization.runWithNumThreads(2, () -> op.adjoint(x));
			TestVolumes.assertClose(TestVolumes.toDouble(a1.data()), a2.data(), 1e-5, "apply " + b);
			TestVolumes.assertClose(TestVolumes.toDouble(t1.data()), t2.data(), 1e-5, "adjoint " + b);
		}
	}

	@Test
	void concurrentCallersShareOneOperator() throws Exception {
		final Volume h = Psfs.normalized(TestVolumes.random(8, 7, 7, 3));
		final Volume x = TestVolumes.random(9, 32, 30, 12);
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

	/**
	 * Flux with a unit-sum kernel, from the adjoint identity Σ(Hᵀy) = ⟨1, Hᵀy⟩ = ⟨H1, y⟩ (textbook linear algebra)
	 * and ⟨1, Hx⟩ = ⟨Hᵀ1, x⟩. Periodic: H is circulant, so H1 = Hᵀ1 = 1 and both directions keep the total.
	 * Mirror: the extension of a constant is that constant, so H1 = 1 and the adjoint keeps the total (each
	 * reflected copy is folded back once), but Hᵀ1 ≠ 1 near the faces, so H itself does not in general: a shifted
	 * ramp loses exactly its end-to-start step per row (direct summation), which a periodic boundary would not.
	 */
	@Test
	void unitSumPsfKeepsFluxWithPeriodicAndMirror() {
		final Volume x = TestVolumes.random(10, 24, 20, 9), h = Psfs.normalized(TestVolumes.random(11, 5, 5, 3));
		final double s = x.sum();
		final ConvolutionOperator periodic = ConvolutionOperator.create(h, x, Boundary.PERIODIC), mirror = ConvolutionOperator.create(h, x, Boundary.MIRROR);
		assertEquals(s, periodic.apply(x).sum(), 1e-5 * s, "periodic H");
		assertEquals(s, periodic.adjoint(x).sum(), 1e-5 * s, "periodic Hᵀ");
		assertEquals(s, mirror.adjoint(x).sum(), 1e-5 * s, "mirror Hᵀ");
		final Volume one = Volume.zeros(24, 20, 9, null);
		java.util.Arrays.fill(one.data(), 1f);
		final Volume h1 = mirror.apply(one);
		for (int i = 0; i < h1.size(); i++) assertEquals(1, h1.data()[i], 1e-5, "mirror H1 = 1 at " + h1.position(i));
		// a shift by one voxel along x of a ramp 1 … 24: (Hx)(i) = (Ex)(i − 1), so each row loses x(23) − x(0) = 23 with mirror edges
		final Volume ramp = Volume.zeros(24, 20, 9, null), shift = Volume.zeros(3, 1, 3, null);
		for (int i = 0; i < ramp.size(); i++) ramp.data()[i] = 1 + i % 24;
		shift.set(2, 0, 1, 1f);
		final double r = ramp.sum();
		assertEquals(r - 23 * 20 * 9, ConvolutionOperator.create(shift, ramp, Boundary.MIRROR).apply(ramp).sum(), 1e-6 * r, "mirror H moves flux at the faces");
		assertEquals(r, ConvolutionOperator.create(shift, ramp, Boundary.PERIODIC).apply(ramp).sum(), 1e-6 * r, "periodic H does not");
	}

	@Test
	void inputIsNotModified() {
		final Volume x = TestVolumes.random(12, 16, 16, 4), h = TestVolumes.random(13, 3, 3, 3);
		final Volume copy = x.copy(), hCopy = h.copy();
		final ConvolutionOperator op = ConvolutionOperator.create(h, x, Boundary.MIRROR);
		op.apply(x);
		op.adjoint(x);
		assertEquals(copy, x);
		assertEquals(hCopy, h);
	}

	@Test
	void badPsfsAreRejectedWithOneLineMessages() {
		final Volume img3 = TestVolumes.random(1, 10, 10, 5), img2 = TestVolumes.random(1, 10, 10, 1);
		TestVolumes.assertMessage("larger than the image", () -> ConvolutionOperator.create(TestVolumes.random(1, 11, 3, 3), img3, Boundary.ZERO));
		TestVolumes.assertMessage("2D but the image is 3D", () -> ConvolutionOperator.create(TestVolumes.random(1, 3, 3, 1), img3, Boundary.ZERO));
		TestVolumes.assertMessage("3D (3 slices) but the image is 2D", () -> ConvolutionOperator.create(TestVolumes.random(1, 3, 3, 3), img2, Boundary.ZERO));
		final Volume nan = TestVolumes.random(1, 3, 3, 3);
		nan.set(1, 2, 0, Float.NaN);
		TestVolumes.assertMessage("non-finite value (NaN) at (1, 2, 0)", () -> ConvolutionOperator.create(nan, img3, Boundary.ZERO));
		TestVolumes.assertMessage("Not enough memory", () -> ConvolutionOperator.create(TestVolumes.random(1, 3, 3, 3), new int[] { 4000, 4000, 2000 }, Boundary.ZERO));
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

}
