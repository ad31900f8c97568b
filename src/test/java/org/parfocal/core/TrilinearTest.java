package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Random;

import org.junit.jupiter.api.Test;

/**
 * {@link Trilinear} against the textbook definition of trilinear interpolation, f(x, y, z) = Σ over the 8
 * corners of the cell of (1 − |x − x_i|)(1 − |y − y_j|)(1 − |z − z_k|)·f(x_i, y_j, z_k), evaluated point by point
 * in double, with the two edge rules applied to the corners: repeated edge value (coordinates clamped first) and
 * zero beyond the ends (corners outside contribute nothing).
 */
class TrilinearTest {

	private static double definition(final Volume v, final double x, final double y, final double z) {
		final int x0 = (int) Math.floor(x), y0 = (int) Math.floor(y), z0 = (int) Math.floor(z);
		double s = 0;
		for (int k = z0; k <= z0 + 1; k++)
			for (int j = y0; j <= y0 + 1; j++)
				for (int i = x0; i <= x0 + 1; i++) {
					if (i < 0 || j < 0 || k < 0 || i >= v.nx() || j >= v.ny() || k >= v.nz()) continue;
					s += (1 - Math.abs(x - i)) * (1 - Math.abs(y - j)) * (1 - Math.abs(z - k)) * v.get(i, j, k);
				}
		return s;
	}

	private static double[] coordinates(final Random r, final int m, final int n) {
		final double[] c = new double[m];
		for (int i = 0; i < m; i++) c[i] = -2.5 + (n + 4) * r.nextDouble();
		c[0] = -1; // on the edges of the extension and on grid points
		if (m > 3) {
			c[1] = n - 1;
			c[2] = 0;
			c[3] = -0.25;
		}
		return c;
	}

	private static double clamp(final double c, final int n) {
		return Math.min(Math.max(c, 0), n - 1);
	}

	@Test
	void bothEdgeRulesEqualTheDefinition() {
		final Random r = new Random(16);
		for (final int[] n : new int[][] { { 7, 5, 4 }, { 6, 3, 1 }, { 1, 4, 3 }, { 2, 2, 2 } }) {
			final float[] f = new float[n[0] * n[1] * n[2]];
			for (int i = 0; i < f.length; i++) f[i] = r.nextFloat() + 0.1f;
			final Volume v = Volume.wrap(f, n[0], n[1], n[2], null);
			final double[][] c = new double[3][];
			for (int d = 0; d < 3; d++) c[d] = coordinates(r, 9, n[d]);
			final Volume zero = Trilinear.sample(v, Trilinear.Axis.zeroOutside(c[0], n[0]), Trilinear.Axis.zeroOutside(c[1], n[1]),
					Trilinear.Axis.zeroOutside(c[2], n[2]), VoxelSize.UNCALIBRATED);
			final Volume edge = Trilinear.sample(v, Trilinear.Axis.clamped(c[0], n[0]), Trilinear.Axis.clamped(c[1], n[1]),
					Trilinear.Axis.clamped(c[2], n[2]), VoxelSize.UNCALIBRATED);
			for (int z = 0; z < 9; z++)
				for (int y = 0; y < 9; y++)
					for (int x = 0; x < 9; x++) {
						final String at = java.util.Arrays.toString(n) + " at " + c[0][x] + ", " + c[1][y] + ", " + c[2][z];
						assertEquals(definition(v, c[0][x], c[1][y], c[2][z]), zero.get(x, y, z), 1e-6, "zero outside " + at);
						assertEquals(definition(v, clamp(c[0][x], n[0]), clamp(c[1][y], n[1]), clamp(c[2][z], n[2])), edge.get(x, y, z), 1e-6,
								"edge repeated " + at);
					}
		}
	}

	@Test
	void oneAndTwoThreadsAgreeBitwise() {
		final Random r = new Random(3);
		final float[] f = new float[20 * 17 * 6];
		for (int i = 0; i < f.length; i++) f[i] = r.nextFloat();
		final Volume v = Volume.wrap(f, 20, 17, 6, null);
		final Trilinear.Axis ax = Trilinear.Axis.clamped(coordinates(r, 31, 20), 20), ay = Trilinear.Axis.zeroOutside(coordinates(r, 25, 17), 17),
				az = Trilinear.Axis.clamped(coordinates(r, 8, 6), 6);
		final Volume[] out = new Volume[2];
		for (final int t : new int[] { 1, 2 })
			net.imglib2.parallel.Parallelization.runWithNumThreads(t, () -> out[t - 1] = Trilinear.sample(v, ax, ay, az, VoxelSize.UNCALIBRATED));
		assertEquals(out[0], out[1]);
	}
}
