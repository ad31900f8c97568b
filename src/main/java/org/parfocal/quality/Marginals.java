package org.parfocal.quality;

import java.util.List;
import java.util.SplittableRandom;

import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;

/**
 * Interpretable one-dimensional properties of an image, sampled at random voxels: the intensity, the gradient
 * magnitude |∇f| and the Laplacian Δf. Their 1D Wasserstein-1 distances say in which respect a result differs
 * from the references (too dim or too bright structures; too soft or too hard edges; too smooth or too
 * spiky fine structure).
 * <p>
 * Derivatives are central differences on the common grid, in units of the x voxel size, with the edge value
 * repeated beyond the border: ∂f/∂x ≈ (f(x+1) − f(x−1)) / 2, and ∂²f/∂x² ≈ f(x+1) − 2f(x) + f(x−1); along y
 * and z the steps are divided by the voxel size ratio dy/dx, dz/dx (once for the gradient, squared for the
 * Laplacian). 2D images use x and y only.
 */
public final class Marginals {

	/** Property names, in the order of {@link #sample}'s rows. */
	public static final List<String> NAMES = List.of("intensity", "gradient magnitude", "Laplacian");

	private Marginals() {}

	/**
	 * {@code count} samples of each property, as [property][sample]; voxels are drawn (seeded, before any
	 * parallel work) from all {@code images} with probability proportional to their size.
	 *
	 * @param spacing voxel size ratios {1, dy/dx, dz/dx} of the common grid
	 */
	public static double[][] sample(final List<Volume> images, final double[] spacing, final int count, final long seed) {
		if (images.isEmpty()) throw new IllegalArgumentException("No images to sample");
		if (count < 1) throw new IllegalArgumentException("The number of samples must be at least 1, got " + count);
		final long[] cumulative = new long[images.size()];
		long total = 0;
		for (int i = 0; i < images.size(); i++) cumulative[i] = total += images.get(i).size();
		final SplittableRandom rnd = new SplittableRandom(seed);
		final int[] img = new int[count], idx = new int[count];
		for (int i = 0; i < count; i++) {
			final long t = rnd.nextLong(total);
			int im = 0;
			while (cumulative[im] <= t) im++;
			img[i] = im;
			idx[i] = (int) (t - (im == 0 ? 0 : cumulative[im - 1]));
		}
		final double[][] out = new double[3][count];
		final double sy = spacing[1], sz = spacing[2];
		Parallel.forRange(count, i -> {
			final Volume v = images.get(img[i]);
			final float[] d = v.data();
			final int nx = v.nx(), ny = v.ny(), nz = v.nz(), k = idx[i];
			final int x = k % nx, y = (k / nx) % ny, z = k / (nx * ny);
			final double c = d[k];
			final double xm = d[k - x + Math.max(x - 1, 0)], xp = d[k - x + Math.min(x + 1, nx - 1)];
			final double ym = d[k + nx * (Math.max(y - 1, 0) - y)], yp = d[k + nx * (Math.min(y + 1, ny - 1) - y)];
			double gx = (xp - xm) / 2, gy = (yp - ym) / (2 * sy);
			double g2 = gx * gx + gy * gy;
			double lap = (xp - 2 * c + xm) + (yp - 2 * c + ym) / (sy * sy);
			if (nz > 1) {
				final int plane = nx * ny;
				final double zm = d[k + plane * (Math.max(z - 1, 0) - z)], zp = d[k + plane * (Math.min(z + 1, nz - 1) - z)];
				final double gz = (zp - zm) / (2 * sz);
				g2 += gz * gz;
				lap += (zp - 2 * c + zm) / (sz * sz);
			}
			out[0][i] = c;
			out[1][i] = Math.sqrt(g2);
			out[2][i] = lap;
		});
		return out;
	}
}
