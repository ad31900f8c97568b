package org.parfocal.beads;

import java.util.HashMap;
import java.util.Map;

import org.parfocal.core.Volume;

/**
 * Radial symmetrisation of a PSF box around its centre column, plane by plane: each voxel becomes the mean of all
 * voxels of its plane at exactly the same distance from the axis (in µm, so anisotropic pixels are handled). On a
 * square grid these are the voxel's images under the grid's 8 symmetries plus equal-radius coincidences (3² + 4² =
 * 5² + 0²). No interpolation in the radius: an interpolated ring profile would blur along r and narrow the sampled
 * peak. For an aberration-free objective the PSF is rotationally symmetric about the optical axis, so this removes
 * noise and residual asymmetry; with astigmatism or coma it also removes real structure.
 */
final class Symmetry {

	private Symmetry() {}

	/** New volume: each plane of {@code v} (odd sizes, centre voxel on the axis) replaced by its equal-radius averages. */
	static Volume radial(final Volume v) {
		final int nx = v.nx(), ny = v.ny(), nz = v.nz();
		final double dx = v.voxelSize().dx(), dy = v.voxelSize().dy(), unit = Math.min(dx, dy) * Math.min(dx, dy);
		final int cx = (nx - 1) / 2, cy = (ny - 1) / 2;
		// ring number of each voxel: equal r² (to 1e-9 of a voxel²) share a ring
		final int[] ring = new int[nx * ny];
		final Map<Long, Integer> ids = new HashMap<>();
		for (int y = 0; y < ny; y++)
			for (int x = 0; x < nx; x++) {
				final double r2 = ((x - cx) * dx) * ((x - cx) * dx) + ((y - cy) * dy) * ((y - cy) * dy);
				ring[x + nx * y] = ids.computeIfAbsent(Math.round(r2 / unit * 1e9), k -> ids.size());
			}
		final Volume out = Volume.zeros(nx, ny, nz, v.voxelSize());
		final double[] sum = new double[ids.size()];
		final int[] count = new int[ids.size()];
		for (int z = 0; z < nz; z++) {
			java.util.Arrays.fill(sum, 0);
			java.util.Arrays.fill(count, 0);
			for (int i = 0; i < nx * ny; i++) {
				sum[ring[i]] += v.data()[z * nx * ny + i];
				count[ring[i]]++;
			}
			for (int i = 0; i < nx * ny; i++) out.data()[z * nx * ny + i] = (float) (sum[ring[i]] / count[ring[i]]);
		}
		return out;
	}
}
