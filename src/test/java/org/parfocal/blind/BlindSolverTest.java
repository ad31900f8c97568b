package org.parfocal.blind;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;

/**
 * Xᵀ1 of the PSF update, made by the solver as a correlation of the object with the transform of the image
 * window's indicator, against its definition summed directly in double: for PSF offset j, the sum of the
 * object over the voxels that meet the image window through j (per axis the interval [k − 1 − j, k − 1 − j + n)
 * of the object domain for non-circulant edges, [c − j, c − j + n) clipped to the image for zero edges, the whole
 * domain for periodic edges; c = (k − 1)/2). A wrong sign of the transform, a wrong shift or scale would miss by
 * far more than the float rounding allowed (1e-5 of the largest sum). Seeded recording of {@link BlindScenes}.
 */
class BlindSolverTest {

	@Test
	void windowSumsOfTheObjectAreItsBoxSums() {
		final Volume y = BlindScenes.RECORDED;
		final int[] n = y.shape();
		for (final int[] k : new int[][] { { 15, 15, 9 }, { 31, 21, 15 } }) {
			final Volume psf = BlindScenes.truePsfOn(k);
			for (final EdgeMode edges : EdgeMode.values()) {
				final float[] data = y.data().clone();
				for (int i = 0; i < data.length; i++) data[i] = Math.max(0, data[i]);
				final PsfConstraints none = new PsfConstraints(k[0], k[1], k[2], 1, 1, 1, null, false, false, psf.data());
				final BlindSolver s = new BlindSolver(psf, n, edges, data, BlindScenes.BACKGROUND, 0, 0, none);
				s.objectUpdate(() -> {});
				s.objectUpdate(() -> {});
				final float[] x = s.objectCopy();
				final int[] m = edges.domains(n, k).object();
				s.psfUpdate(() -> {});
				final float[] got = s.lastWindowSums();
				double max = 0, worst = 0;
				final double[] want = new double[got.length];
				for (int jz = 0; jz < k[2]; jz++)
					for (int jy = 0; jy < k[1]; jy++)
						for (int jx = 0; jx < k[0]; jx++) {
							final int[] j = { jx, jy, jz }, lo = new int[3], hi = new int[3];
							for (int d = 0; d < 3; d++) {
								if (edges == EdgeMode.PERIODIC) {
									lo[d] = 0;
									hi[d] = m[d];
								} else {
									final int off = edges == EdgeMode.NON_CIRCULANT ? k[d] - 1 : (k[d] - 1) / 2;
									lo[d] = Math.max(0, off - j[d]);
									hi[d] = Math.min(m[d], off - j[d] + n[d]);
								}
							}
							double sum = 0;
							for (int z = lo[2]; z < hi[2]; z++)
								for (int yy = lo[1]; yy < hi[1]; yy++)
									for (int xx = lo[0]; xx < hi[0]; xx++) sum += x[xx + m[0] * (yy + m[1] * z)];
							final int i = jx + k[0] * (jy + k[1] * jz);
							want[i] = sum;
							max = Math.max(max, sum);
						}
				for (int i = 0; i < got.length; i++) worst = Math.max(worst, Math.abs(got[i] - want[i]));
				assertTrue(max > 0, "the object has light");
				assertEquals(0, worst / max, 1e-5, edges + ", box " + k[0] + "x" + k[1] + "x" + k[2] + ": largest difference " + worst + " of " + max);
			}
		}
	}
}
