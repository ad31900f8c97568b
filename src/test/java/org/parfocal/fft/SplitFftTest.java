package org.parfocal.fft;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.util.Random;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;

/**
 * {@link SplitFft} against the definition of the DFT, X(k) = Σ_j x(j)·exp(∓2πi jk/n), summed in double, and
 * {@link RealFft} on grids whose y and z lengths go through it against the same definition applied axis by axis.
 */
class SplitFftTest {

	private static double[] dft(final float[] x, final int n, final int sign) {
		final double[] out = new double[2 * n];
		for (int k = 0; k < n; k++) {
			double re = 0, im = 0;
			for (int j = 0; j < n; j++) {
				final double a = sign * 2 * Math.PI * ((long) j * k % n) / n;
				re += x[2 * j] * Math.cos(a) - x[2 * j + 1] * Math.sin(a);
				im += x[2 * j] * Math.sin(a) + x[2 * j + 1] * Math.cos(a);
			}
			out[2 * k] = re;
			out[2 * k + 1] = im;
		}
		return out;
	}

	private static float[] random(final long seed, final int n) {
		final Random r = new Random(seed);
		final float[] a = new float[n];
		for (int i = 0; i < n; i++) a[i] = r.nextFloat() - 0.5f;
		return a;
	}

	@ParameterizedTest(name = "n = {0}")
	@ValueSource(ints = { 48, 80, 96, 160, 192, 320, 640, 144, 288, 576, 720, 400 })
	void forwardAndInverseEqualTheDefinition(final int n) {
		final SplitFft f = SplitFft.forLength(n);
		assertNotNull(f, "split plan for " + n);
		final float[] x = random(n, 2 * n);
		for (final int sign : new int[] { -1, 1 }) {
			final double[] ref = dft(x, n, sign);
			final float[] line = x.clone();
			f.deinterleave(line);
			if (sign < 0) f.forward(line);
			else f.inverse(line, false);
			double scale = 0;
			for (final double v : ref) scale = Math.max(scale, Math.abs(v));
			for (int i = 0; i < 2 * n; i++) assertEquals(ref[i], line[i], 2e-6 * scale, (sign < 0 ? "forward" : "inverse") + " n " + n + " at " + i / 2);
		}
		final float[] line = x.clone();
		f.deinterleave(line);
		f.forward(line);
		f.deinterleave(line);
		f.inverse(line, true);
		for (int i = 0; i < 2 * n; i++) assertEquals(x[i], line[i], 2e-6, "round trip n " + n + " at " + i / 2);
	}

	/** Real transforms of lengths 2·3^a·5^b·2^k (one step: 96 … 640; nested: 288 = 2·3·3·16, 576) against the definition, and their inverse. */
	@ParameterizedTest(name = "n = {0}")
	@ValueSource(ints = { 96, 160, 192, 320, 640, 576, 288 })
	void realForwardAndInverseEqualTheDefinition(final int n) {
		final SplitRealFft f = SplitRealFft.forLength(n);
		assertNotNull(f, "split real plan for " + n);
		final int h = n / 2 + 1, off = 3;
		final float[] x = random(n + 1, n), a = new float[off + 2 * h + 4];
		System.arraycopy(x, 0, a, off, n);
		f.forward(a, off);
		double scale = 0;
		final double[] ref = new double[2 * h];
		for (int k = 0; k < h; k++) {
			for (int j = 0; j < n; j++) {
				final double ang = -2 * Math.PI * ((long) j * k % n) / n;
				ref[2 * k] += x[j] * Math.cos(ang);
				ref[2 * k + 1] += x[j] * Math.sin(ang);
			}
			scale = Math.max(scale, Math.hypot(ref[2 * k], ref[2 * k + 1]));
		}
		for (int i = 0; i < 2 * h; i++) assertEquals(ref[i], a[off + i], 2e-6 * scale, "forward n " + n + " at " + i / 2 + (i % 2 == 0 ? " re" : " im"));
		f.inverse(a, off);
		for (int j = 0; j < n; j++) assertEquals(x[j], a[off + j], 2e-6, "inverse n " + n + " at " + j);
		assertEquals(0f, a[0], 0f, "nothing written before the row");
	}

	@Test
	void onlyPowersOfThreeAndFiveTimesAPowerOfTwoAreSplit() {
		for (final int n : new int[] { 47, 64, 90, 100, 135, 375, 1125, 24, 40, 72 }) assertNull(SplitFft.forLength(n), "no split for " + n);
		for (final int n : new int[] { 95, 64, 180, 48, 80 }) assertNull(SplitRealFft.forLength(n), "no real split for " + n);
	}

	/** 3D forward transform with x = 96 (2·3·16), y = 48 (3·16) and z = 80 (5·16) against the definition along each axis. */
	@Test
	void realFftOnSplitLengthsEqualsTheDefinitionAxisByAxis() {
		final int nx = 96, ny = 48, nz = 80, h = nx / 2 + 1;
		final RealFft fft = new RealFft(nx, ny, nz);
		final float[] x = random(5, nx * ny * nz), spec = fft.newSpectrum();
		fft.forward(x, spec);
		// reference: complex DFT along x (keeping h frequencies), then y, then z, in double
		final double[] re = new double[h * ny * nz], im = new double[h * ny * nz];
		for (int r = 0; r < ny * nz; r++)
			for (int k = 0; k < h; k++)
				for (int j = 0; j < nx; j++) {
					final double a = -2 * Math.PI * j * k / nx;
					re[k + h * r] += x[j + nx * r] * Math.cos(a);
					im[k + h * r] += x[j + nx * r] * Math.sin(a);
				}
		axis(re, im, h, ny, nz, 1);
		axis(re, im, h, ny, nz, 2);
		double scale = 0;
		for (int i = 0; i < re.length; i++) scale = Math.max(scale, Math.hypot(re[i], im[i]));
		for (int i = 0; i < re.length; i++) {
			assertEquals(re[i], spec[2 * i], 2e-6 * scale, "re at " + i);
			assertEquals(im[i], spec[2 * i + 1], 2e-6 * scale, "im at " + i);
		}
	}

	private static void axis(final double[] re, final double[] im, final int h, final int ny, final int nz, final int axis) {
		final int n = axis == 1 ? ny : nz, stride = axis == 1 ? h : h * ny, lines = h * (axis == 1 ? nz : ny);
		final double[] lr = new double[n], li = new double[n];
		for (int line = 0; line < lines; line++) {
			final int base = axis == 1 ? line % h + h * ny * (line / h) : line % h + h * (line / h);
			for (int k = 0; k < n; k++) {
				double sr = 0, si = 0;
				for (int j = 0; j < n; j++) {
					final double a = -2 * Math.PI * ((long) j * k % n) / n, c = Math.cos(a), s = Math.sin(a);
					final double vr = re[base + j * stride], vi = im[base + j * stride];
					sr += vr * c - vi * s;
					si += vr * s + vi * c;
				}
				lr[k] = sr;
				li[k] = si;
			}
			for (int k = 0; k < n; k++) {
				re[base + k * stride] = lr[k];
				im[base + k * stride] = li[k];
			}
		}
	}
}
