package org.parfocal.quality;

import java.util.Random;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Noise;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * Invented specimen for the quality tests: a cell of the imaginary "lantern" type — a dim cytoplasm with bright
 * vesicles (spots) and a few curved cables (filaments) — drawn from a seed, recorded sharp (a 0.7-voxel
 * Gaussian, like a super-resolution reference) with shot noise. Sizes in voxels of 0.1 µm (× 0.25 µm in z)
 * unless a finer grid is asked for.
 */
final class SharpScenes {

	private SharpScenes() {}

	/**
	 * A sharp recorded cell. {@code scale} > 1 renders the same kind of cell on a grid {@code scale} times finer
	 * (voxels 0.1/scale µm laterally, object sizes in µm unchanged), as from another microscope.
	 */
	static Volume cell(final long seed, final int nx, final int ny, final int nz, final double scale) {
		final Random r = new Random(seed);
		final Volume v = Volume.zeros(nx, ny, nz, VoxelSize.microns(0.1 / scale, 0.1 / scale, 0.25));
		final double area = nx * ny / (scale * scale);
		final int spots = (int) (area * nz / 600);
		for (int i = 0; i < spots; i++) {
			final int x = r.nextInt(nx), y = r.nextInt(ny), z = r.nextInt(nz);
			v.set(x, y, z, v.get(x, y, z) + (float) ((60 + 120 * r.nextDouble()) * scale * scale));
		}
		final int cables = Math.max(2, (int) (area / 3000));
		for (int f = 0; f < cables; f++) {
			double x = r.nextDouble() * nx, y = r.nextDouble() * ny, z = r.nextDouble() * nz;
			double a = r.nextDouble() * 2 * Math.PI;
			final double curvature = (r.nextDouble() - 0.5) * 0.05 / scale, step = 0.5;
			for (int s = 0; s < 4 * (nx + ny); s++) {
				final int ix = (int) x, iy = (int) y, iz = (int) z;
				if (ix >= 0 && iy >= 0 && iz >= 0 && ix < nx && iy < ny && iz < nz) v.set(ix, iy, iz, v.get(ix, iy, iz) + (float) (12 * scale));
				x += step * Math.cos(a);
				y += step * Math.sin(a);
				a += curvature;
			}
		}
		final Volume sharp = blur(v, 0.7 * scale, 0.7);
		final float[] d = sharp.data();
		for (int i = 0; i < d.length; i++) d[i] += 8;
		return Noise.poisson(sharp, 4, seed * 31 + 7);
	}

	static Volume cell2D(final long seed, final int nx, final int ny) {
		return cell(seed, nx, ny, 1, 1);
	}

	/** Unit-sum sampled Gaussian, σ in voxels (lateral, axial), odd size 2⌈3σ⌉ + 1; 2D when {@code threeD} is false. */
	static Volume gaussian(final double sxy, final double sz, final boolean threeD) {
		final int hx = Math.max(1, (int) Math.ceil(3 * sxy)), hz = threeD ? Math.max(1, (int) Math.ceil(3 * sz)) : 0;
		final Volume h = Volume.zeros(2 * hx + 1, 2 * hx + 1, 2 * hz + 1, null);
		double s = 0;
		for (int z = -hz; z <= hz; z++)
			for (int y = -hx; y <= hx; y++)
				for (int x = -hx; x <= hx; x++) {
					final double e = Math.exp(-0.5 * ((x * x + y * y) / (sxy * sxy) + (threeD ? z * z / (sz * sz) : 0)));
					h.set(x + hx, y + hx, z + hz, (float) e);
					s += e;
				}
		final float[] d = h.data();
		for (int i = 0; i < d.length; i++) d[i] /= s;
		return h;
	}

	/** {@code v} blurred by a Gaussian (σ in voxels) with ConvolutionOperator, mirror boundary; σ = 0 copies. */
	static Volume blur(final Volume v, final double sxy, final double sz) {
		if (sxy == 0) return v.copy();
		final Volume h = gaussian(sxy, sz, v.is3D());
		final int[] k = h.shape();
		if (k[0] > v.nx() || k[1] > v.ny() || k[2] > v.nz()) throw new IllegalStateException("kernel larger than image");
		return ConvolutionOperator.create(h, v, Boundary.MIRROR).apply(v);
	}
}
