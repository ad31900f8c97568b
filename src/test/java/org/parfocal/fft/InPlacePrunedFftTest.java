package org.parfocal.fft;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;
import java.util.concurrent.atomic.AtomicIntegerArray;
import java.util.stream.Stream;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.Arguments;
import org.junit.jupiter.params.provider.CsvSource;
import org.junit.jupiter.params.provider.MethodSource;
import org.junit.jupiter.api.Test;

/**
 * The in-place layout and the pruned transforms of {@link RealFft} against its plain path (itself checked
 * against the DFT definition in {@link RealFftTest}) and against circular convolution by direct summation.
 * Sizes cover even, odd and prime lengths (primes go through JTransforms' Bluestein path), 1D, 2D, 3D and
 * the degenerate axes (nx = 1, ny = 1).
 */
class InPlacePrunedFftTest {

	/** Even, odd and prime lengths; 1D, 2D, 3D; nx = 1 and ny = 1 with nz > 1. */
	static Stream<Arguments> sizes() {
		return Stream.of(new int[][] { { 8, 1, 1 }, { 7, 1, 1 }, { 6, 5, 1 }, { 9, 7, 1 }, { 11, 13, 1 }, { 10, 7, 3 }, { 13, 11, 7 }, { 12, 9, 6 },
				{ 1, 4, 3 }, { 5, 1, 6 }, { 16, 10, 5 }, { 96, 48, 80 }, { 20, 96, 1 } }).map(s -> Arguments.of(s[0], s[1], s[2]));
	}

	private static float[] random(final long seed, final int n) {
		final Random r = new Random(seed);
		final float[] a = new float[n];
		for (int i = 0; i < n; i++) a[i] = r.nextFloat() - 0.5f;
		return a;
	}

	/** Copies real values (nx per row) into an in-place grid; every other float of the grid is set to {@code fill}. */
	private static float[] toGrid(final RealFft f, final float[] real, final float fill) {
		final float[] g = new float[f.gridLength()];
		java.util.Arrays.fill(g, fill);
		for (int r = 0; r < f.ny() * f.nz(); r++) System.arraycopy(real, r * f.nx(), g, r * f.rowStride(), f.nx());
		return g;
	}

	private static boolean inBox(final RealFft.Rows b, final int row, final int ny) {
		final int y = row % ny, z = row / ny;
		return y >= b.y0() && y < b.y1() && z >= b.z0() && z < b.z1();
	}

	/** A non-empty box of rows from the seed: a strict sub-box where the axis allows it. */
	private static RealFft.Rows box(final RealFft f, final long seed) {
		final Random r = new Random(seed);
		final int y0 = f.ny() > 2 ? 1 + r.nextInt(f.ny() / 2) : 0, y1 = f.ny() > 2 ? y0 + 1 + r.nextInt(f.ny() - y0 - 1) : f.ny();
		final int z0 = f.nz() > 2 ? r.nextInt(f.nz() / 2) : 0, z1 = f.nz() > 2 ? f.nz() - r.nextInt(f.nz() - z0) : f.nz();
		return f.rows(y0, y1, z0, Math.max(z1, z0 + 1));
	}

	private static double maxAbs(final float[] a) {
		double m = 0;
		for (final float v : a) m = Math.max(m, Math.abs(v));
		return m;
	}

	/** Unpruned in-place convolution equals {@link RealFft#convolve} within 1e-6 relative, for both directions. */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@MethodSource("sizes")
	void inPlaceConvolutionEqualsPlainPath(final int nx, final int ny, final int nz) {
		final RealFft f = new RealFft(nx, ny, nz);
		final float[] x = random(nx * 31 + ny * 7 + nz, f.realLength()), k = random(5 + nx, f.realLength());
		final float[] t = f.transferFunction(k);
		final float[] tg = toGrid(f, k, 0f);
		f.transferFunctionInPlace(tg);
		assertArrayEquals(t, tg, "transfer function from the in-place grid");
		for (final boolean conj : new boolean[] { false, true }) {
			final float[] plain = x.clone();
			f.convolve(plain, t, conj, f.newSpectrum());
			final float[] grid = toGrid(f, x, 7f);
			f.convolveInPlace(grid, t, conj, f.allRows(), f.allRows(), null);
			final double tol = 1e-6 * maxAbs(plain);
			for (int r = 0; r < ny * nz; r++)
				for (int i = 0; i < nx; i++)
					assertEquals(plain[r * nx + i], grid[r * f.rowStride() + i], tol, "row " + r + " x " + i + " conj " + conj);
		}
	}

	/**
	 * Pruned convolution: rows outside the input box hold NaN (so reading them would show), and the output rows
	 * equal the plain path on the data with those rows zeroed, within 1e-6 relative.
	 */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@MethodSource("sizes")
	void prunedConvolutionEqualsPlainPathOnZeroedRows(final int nx, final int ny, final int nz) {
		final RealFft f = new RealFft(nx, ny, nz);
		final float[] t = f.transferFunction(random(9 + ny, f.realLength()));
		for (int trial = 0; trial < 3; trial++) {
			final RealFft.Rows in = box(f, 100 * trial + nx), out = box(f, 100 * trial + ny + 50);
			final float[] x = random(trial + nz, f.realLength());
			for (int r = 0; r < ny * nz; r++)
				if (!inBox(in, r, ny)) java.util.Arrays.fill(x, r * nx, (r + 1) * nx, 0f);
			final boolean conj = trial == 1;
			final float[] plain = x.clone();
			f.convolve(plain, t, conj, f.newSpectrum());
			final float[] grid = toGrid(f, x, Float.NaN);
			for (int r = 0; r < ny * nz; r++)
				if (inBox(in, r, ny)) java.util.Arrays.fill(grid, r * f.rowStride() + nx, (r + 1) * f.rowStride(), Float.NaN);
			f.convolveInPlace(grid, t, conj, in, out, null);
			final double tol = 1e-6 * maxAbs(plain);
			for (int r = 0; r < ny * nz; r++) {
				if (!inBox(out, r, ny)) continue;
				for (int i = 0; i < nx; i++)
					assertEquals(plain[r * nx + i], grid[r * f.rowStride() + i], tol, "in " + in + " out " + out + " row " + r + " x " + i);
			}
		}
	}

	/** Pruned forward equals the plain forward of the zeroed data; pruned inverse gives the plain rows back. */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@MethodSource("sizes")
	void prunedForwardAndInverseEqualPlainPath(final int nx, final int ny, final int nz) {
		final RealFft f = new RealFft(nx, ny, nz);
		final RealFft.Rows in = box(f, 3 + nx), out = box(f, 4 + nz);
		final float[] x = random(17, f.realLength());
		for (int r = 0; r < ny * nz; r++)
			if (!inBox(in, r, ny)) java.util.Arrays.fill(x, r * nx, (r + 1) * nx, 0f);
		final float[] spec = f.newSpectrum();
		f.forward(x, spec);
		final float[] grid = toGrid(f, x, Float.NaN);
		f.forwardInPlace(grid, in);
		final double tol = 1e-6 * maxAbs(spec);
		for (int i = 0; i < spec.length; i++) assertEquals(spec[i], grid[i], tol, "spectrum float " + i);
		final float[] back = new float[f.realLength()];
		f.inverse(spec, back);
		f.inverseInPlace(grid, out);
		for (int r = 0; r < ny * nz; r++) {
			if (!inBox(out, r, ny)) continue;
			for (int i = 0; i < nx; i++) {
				assertEquals(back[r * nx + i], grid[r * f.rowStride() + i], 1e-6 * maxAbs(back), "row " + r + " x " + i);
				assertEquals(x[r * nx + i], grid[r * f.rowStride() + i], 2e-6, "round trip, row " + r + " x " + i);
			}
		}
	}

	/**
	 * Outside reference: circular convolution by direct summation in double, (h ⊛ x)(i) = Σ_j h(j) x(i − j mod n),
	 * against the pruned in-place path with a strict input box (prime and even sizes).
	 */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@CsvSource({ "7,11,5", "10,8,6", "9,1,1", "4,48,3", "3,5,80", "5,96,1", "96,3,2", "64,1,1" })
	void prunedConvolutionEqualsDirectSummation(final int nx, final int ny, final int nz) {
		final RealFft f = new RealFft(nx, ny, nz);
		final float[] h = random(41, f.realLength()), x = random(43, f.realLength());
		final RealFft.Rows in = f.rows(ny > 2 ? 1 : 0, ny > 2 ? ny - 1 : ny, nz > 2 ? 2 : 0, nz), out = f.rows(0, ny > 1 ? ny / 2 + 1 : 1, 0, nz > 1 ? nz - 1 : 1);
		for (int r = 0; r < ny * nz; r++)
			if (!inBox(in, r, ny)) java.util.Arrays.fill(x, r * nx, (r + 1) * nx, 0f);
		final float[] grid = toGrid(f, x, Float.NaN);
		f.convolveInPlace(grid, f.transferFunction(h), false, in, out, null);
		double scale = 0;
		for (final float v : x) scale += Math.abs(v);
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < ny; y++) {
				if (!inBox(out, y + ny * z, ny)) continue;
				for (int i = 0; i < nx; i++) {
					double s = 0;
					for (int jz = 0; jz < nz; jz++)
						for (int jy = 0; jy < ny; jy++)
							for (int jx = 0; jx < nx; jx++)
								s += (double) h[jx + nx * (jy + ny * jz)]
										* x[Math.floorMod(i - jx, nx) + nx * (Math.floorMod(y - jy, ny) + ny * Math.floorMod(z - jz, nz))];
					assertEquals(s, grid[f.gridIndex(i, y, z)], 1e-6 * scale, "at " + i + "," + y + "," + z);
				}
			}
	}

	/**
	 * A transfer function rearranged line by line ({@link RealFft#lineTransfer}) gives the same pruned
	 * convolution, bit for bit, as the spectrum it came from (itself checked against the plain path and direct
	 * summation above), both directions, and leaves that spectrum unchanged.
	 */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@MethodSource("sizes")
	void lineTransferGivesTheSameConvolutionBitForBit(final int nx, final int ny, final int nz) {
		final RealFft f = new RealFft(nx, ny, nz);
		final float[] t = f.transferFunction(random(17 + nx, f.realLength())), tCopy = t.clone();
		final RealFft.LineTransfer lt = f.lineTransfer(t, f.newSpectrum());
		assertArrayEquals(tCopy, t, "spectrum-layout transfer function unchanged");
		for (int trial = 0; trial < 2; trial++) {
			final RealFft.Rows in = box(f, 7 * trial + nz), out = box(f, 11 * trial + nx);
			final float[] x = toGrid(f, random(trial + 3, f.realLength()), 0f);
			final boolean conj = trial == 1;
			final float[] a = x.clone(), b = x.clone();
			f.convolveInPlace(a, t, conj, in, null, out, null);
			f.convolveInPlace(b, lt, conj, in, null, out, null);
			for (int r = 0; r < ny * nz; r++)
				if (inBox(out, r, ny))
					for (int i = 0; i < nx; i++)
						assertEquals(Float.floatToIntBits(a[r * f.rowStride() + i]), Float.floatToIntBits(b[r * f.rowStride() + i]),
								"row " + r + " x " + i + " conj " + conj);
		}
	}

	@Test
	void lineTransferNeedsItsOwnArrayAndItsOwnSize() {
		final RealFft f = new RealFft(8, 6, 4), g = new RealFft(8, 6, 5);
		final float[] t = f.transferFunction(random(1, f.realLength()));
		assertThrows(IllegalArgumentException.class, () -> f.lineTransfer(t, t));
		assertThrows(IllegalArgumentException.class, () -> f.lineTransfer(t, new float[t.length - 2]));
		final RealFft.LineTransfer lt = f.lineTransfer(t, f.newSpectrum());
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
				() -> g.convolveInPlace(g.newGrid(), lt, false, g.allRows(), null, g.allRows(), null));
		assertTrue(e.getMessage().contains("another transform size"), e.getMessage());
	}

	/** 1 and 2 threads give bitwise identical pruned convolutions, and the row action sees every output row once. */
	@Test
	void oneAndTwoThreadsAreBitwiseIdentical() {
		final RealFft f = new RealFft(60, 45, 18);
		final float[] t = f.transferFunction(random(1, f.realLength()));
		final RealFft.Rows in = f.rows(3, 40, 2, 15), out = f.rows(5, 44, 0, 12);
		final float[] x = toGrid(f, random(2, f.realLength()), 0f);
		final float[][] results = new float[2][];
		for (final int threads : new int[] { 1, 2 }) {
			final AtomicIntegerArray seen = new AtomicIntegerArray(f.ny() * f.nz());
			results[threads - 1] = Parallelization.runWithNumThreads(threads, () -> {
				final float[] g = x.clone();
				f.convolveInPlace(g, t, true, in, out, (row, offset) -> {
					assertEquals(row * f.rowStride(), offset);
					seen.incrementAndGet(row);
				});
				return g;
			});
			for (int r = 0; r < f.ny() * f.nz(); r++) assertEquals(inBox(out, r, f.ny()) ? 1 : 0, seen.get(r), "row action calls for row " + r);
		}
		for (int r = 0; r < f.ny() * f.nz(); r++)
			if (inBox(out, r, f.ny()))
				for (int i = 0; i < f.nx(); i++) {
					final int j = r * f.rowStride() + i;
					assertEquals(Float.floatToIntBits(results[0][j]), Float.floatToIntBits(results[1][j]), "1 vs 2 threads at row " + r + " x " + i);
				}
		assertTrue(maxAbs(results[0]) > 0);
	}

	/** Rows produced by the {@code before} action, just in time, give the same result as rows written beforehand. */
	@ParameterizedTest(name = "{0} x {1} x {2}")
	@MethodSource("sizes")
	void rowsMadeByTheBeforeActionEqualRowsWrittenBeforehand(final int nx, final int ny, final int nz) {
		final RealFft f = new RealFft(nx, ny, nz);
		final float[] t = f.transferFunction(random(21, f.realLength()));
		final RealFft.Rows in = box(f, 7 + nx), out = box(f, 8 + ny);
		final float[] x = random(22, f.realLength());
		final float[] ready = toGrid(f, x, 0f);
		f.convolveInPlace(ready, t, false, in, out, null);
		final float[] lazy = new float[f.gridLength()];
		java.util.Arrays.fill(lazy, Float.NaN);
		final AtomicIntegerArray made = new AtomicIntegerArray(ny * nz);
		f.convolveInPlace(lazy, t, false, in, (row, offset) -> {
			made.incrementAndGet(row);
			java.util.Arrays.fill(lazy, offset, offset + f.rowStride(), 0f);
			System.arraycopy(x, row * nx, lazy, offset, nx);
		}, out, null);
		for (int r = 0; r < ny * nz; r++) {
			assertEquals(inBox(in, r, ny) ? 1 : 0, made.get(r), "before-action calls for row " + r);
			if (inBox(out, r, ny))
				for (int i = 0; i < nx; i++)
					assertEquals(Float.floatToIntBits(ready[r * f.rowStride() + i]), Float.floatToIntBits(lazy[r * f.rowStride() + i]), "row " + r + " x " + i);
		}
	}

	@Test
	void badBoxesAndArraysAreRefusedWithAMessage() {
		final RealFft f = new RealFft(8, 6, 4);
		assertThrows(IllegalArgumentException.class, () -> f.rows(0, 7, 0, 4));
		assertThrows(IllegalArgumentException.class, () -> f.rows(3, 3, 0, 4));
		assertThrows(IllegalArgumentException.class, () -> f.rows(0, 6, -1, 2));
		final float[] t = f.newSpectrum();
		assertThrows(IllegalArgumentException.class, () -> f.convolveInPlace(new float[f.realLength()], t, false, f.allRows(), f.allRows(), null));
		assertThrows(IllegalArgumentException.class, () -> f.convolveInPlace(f.newGrid(), t, false, new RealFft.Rows(0, 9, 0, 4), f.allRows(), null));
		final String m = assertThrows(IllegalArgumentException.class, () -> f.forwardInPlace(new float[3], f.allRows())).getMessage();
		assertTrue(m.contains("expected " + f.gridLength()), m);
	}
}
