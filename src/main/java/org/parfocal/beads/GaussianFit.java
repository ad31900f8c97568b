package org.parfocal.beads;

import org.apache.commons.math3.fitting.leastsquares.LeastSquaresBuilder;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresOptimizer;
import org.apache.commons.math3.fitting.leastsquares.LeastSquaresProblem;
import org.apache.commons.math3.fitting.leastsquares.LevenbergMarquardtOptimizer;
import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.RealVector;
import org.apache.commons.math3.util.Pair;
import org.parfocal.core.Volume;

/**
 * Least-squares fit of an axis-aligned Gaussian plus a constant, b + A·exp(−½ Σ (x_d − c_d)²/σ_d²), to the voxels of a
 * window, by Levenberg–Marquardt (Commons Math). For a symmetric PSF the fitted centre is unbiased whatever the PSF's
 * true shape, which is what sub-voxel alignment needs; the widths summarise the core of the PSF. Coordinates are
 * voxel indices.
 */
final class GaussianFit {

	/** b, A, centre (3) and σ (3); for a 2D image the z centre is 0 and σz NaN. */
	record Fit(double background, double amplitude, double cx, double cy, double cz, double sx, double sy, double sz) {}

	private GaussianFit() {}

	/**
	 * Fits the window of half-sizes {@code w} around voxel {@code c} (clipped to the image), starting from σ
	 * {@code s0}. Returns null when the optimiser fails.
	 */
	static Fit fit(final Volume v, final int[] c, final int[] w, final double[] s0) {
		final boolean is3D = v.nz() > 1;
		final int x0 = Math.max(0, c[0] - w[0]), x1 = Math.min(v.nx() - 1, c[0] + w[0]);
		final int y0 = Math.max(0, c[1] - w[1]), y1 = Math.min(v.ny() - 1, c[1] + w[1]);
		final int z0 = is3D ? Math.max(0, c[2] - w[2]) : 0, z1 = is3D ? Math.min(v.nz() - 1, c[2] + w[2]) : 0;
		final int m = (x1 - x0 + 1) * (y1 - y0 + 1) * (z1 - z0 + 1);
		final double[][] pos = new double[m][];
		final double[] obs = new double[m];
		double lo = Double.POSITIVE_INFINITY, hi = Double.NEGATIVE_INFINITY;
		int i = 0;
		for (int z = z0; z <= z1; z++)
			for (int y = y0; y <= y1; y++)
				for (int x = x0; x <= x1; x++) {
					pos[i] = new double[] { x, y, z };
					obs[i] = v.get(x, y, z);
					lo = Math.min(lo, obs[i]);
					hi = Math.max(hi, obs[i]);
					i++;
				}
		final int np = is3D ? 8 : 6;
		final double[] start = is3D ? new double[] { lo, hi - lo, c[0], c[1], c[2], s0[0], s0[1], s0[2] }
				: new double[] { lo, hi - lo, c[0], c[1], s0[0], s0[1] };
		final LeastSquaresProblem problem = new LeastSquaresBuilder().start(start).target(obs).maxEvaluations(2000).maxIterations(400)
				.parameterValidator(p -> {
					// widths stay positive and not absurdly small; the sign of σ is irrelevant to the model
					for (int k = is3D ? 5 : 4; k < np; k++) p.setEntry(k, Math.max(0.2, Math.abs(p.getEntry(k))));
					return p;
				}).model(point -> {
					final double[] p = point.toArray();
					final double[] val = new double[m];
					final double[][] jac = new double[m][np];
					for (int j = 0; j < m; j++) {
						final double dx = pos[j][0] - p[2], dy = pos[j][1] - p[3];
						final double sx = is3D ? p[5] : p[4], sy = is3D ? p[6] : p[5];
						double q = dx * dx / (sx * sx) + dy * dy / (sy * sy);
						double dz = 0, sz = 1;
						if (is3D) {
							dz = pos[j][2] - p[4];
							sz = p[7];
							q += dz * dz / (sz * sz);
						}
						final double e = Math.exp(-0.5 * q), ae = p[1] * e;
						val[j] = p[0] + ae;
						final double[] r = jac[j];
						r[0] = 1;
						r[1] = e;
						r[2] = ae * dx / (sx * sx);
						r[3] = ae * dy / (sy * sy);
						if (is3D) {
							r[4] = ae * dz / (sz * sz);
							r[5] = ae * dx * dx / (sx * sx * sx);
							r[6] = ae * dy * dy / (sy * sy * sy);
							r[7] = ae * dz * dz / (sz * sz * sz);
						} else {
							r[4] = ae * dx * dx / (sx * sx * sx);
							r[5] = ae * dy * dy / (sy * sy * sy);
						}
					}
					return new Pair<RealVector, org.apache.commons.math3.linear.RealMatrix>(new ArrayRealVector(val, false),
							new Array2DRowRealMatrix(jac, false));
				}).build();
		try {
			final LeastSquaresOptimizer.Optimum opt = new LevenbergMarquardtOptimizer().optimize(problem);
			final double[] p = opt.getPoint().toArray();
			for (final double d : p) if (!Double.isFinite(d)) return null;
			return is3D ? new Fit(p[0], p[1], p[2], p[3], p[4], p[5], p[6], p[7]) : new Fit(p[0], p[1], p[2], p[3], 0, p[4], p[5], Double.NaN);
		} catch (final RuntimeException e) {
			// TooManyEvaluations/ConvergenceException: reported as "fit failed" for this bead
			return null;
		}
	}
}
