package org.parfocal.deconv;

import java.util.Random;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.testing.TestVolumes;

/** Test objects and PSFs of an invented specimen (bright spots and filaments on a dim cytoplasm). */
final class Synthetic {

	private Synthetic() {}

	/** {@link TestVolumes#gaussianPsf}, uncalibrated. */
	static Volume gaussianPsf(final int kx, final int ky, final int kz, final double sx, final double sy, final double sz) {
		return TestVolumes.gaussianPsf(kx, ky, kz, sx, sy, sz);
	}

	/**
	 * Invented cell: level {@code base} everywhere, {@code spots} bright points and three straight filaments,
	 * from a seeded generator.
	 */
	static Volume cell(final long seed, final int nx, final int ny, final int nz, final float base, final int spots) {
		final Random r = new Random(seed);
		final Volume v = Volume.zeros(nx, ny, nz, VoxelSize.microns(0.1, 0.1, 0.25));
		java.util.Arrays.fill(v.data(), base);
		for (int i = 0; i < spots; i++) {
			final int x = r.nextInt(nx), y = r.nextInt(ny), z = r.nextInt(nz);
			v.set(x, y, z, v.get(x, y, z) + 40 + 80 * r.nextFloat());
		}
		for (int f = 0; f < 3; f++) {
			final double x0 = r.nextDouble() * nx, y0 = r.nextDouble() * ny, z0 = r.nextDouble() * nz;
			final double a = r.nextDouble() * Math.PI, dz = (r.nextDouble() - 0.5) * 0.3;
			for (int s = 0; s < 2 * Math.max(nx, ny); s++) {
				final int x = (int) Math.round(x0 + (s - Math.max(nx, ny)) * Math.cos(a) * 0.5);
				final int y = (int) Math.round(y0 + (s - Math.max(nx, ny)) * Math.sin(a) * 0.5);
				final int z = (int) Math.round(z0 + (s - Math.max(nx, ny)) * dz * 0.5);
				if (x >= 0 && y >= 0 && z >= 0 && x < nx && y < ny && z < nz) v.set(x, y, z, base + 25);
			}
		}
		return v;
	}

	/**
	 * {@link #cell} with structure amplitudes times 8, blurred by a Gaussian of 0.8 voxel (0.8 voxel and a 1-slice
	 * kernel in 2D): spots and filaments of a finite size, which a deconvolution can resolve.
	 */
	static Volume smoothCell(final long seed, final int nx, final int ny, final int nz, final float base, final int spots) {
		final Volume raw = cell(seed, nx, ny, nz, base, spots);
		final float[] d = raw.data();
		for (int i = 0; i < d.length; i++) d[i] = base + 8 * (d[i] - base);
		final Volume g = gaussianPsf(5, 5, nz > 1 ? 5 : 1, 0.8, 0.8, 0.8);
		return ConvolutionOperator.create(g, raw, Boundary.MIRROR).apply(raw);
	}

	/** Peak signal-to-noise ratio in dB, 10 log10(max(ref)² / mean (a − ref)²). */
	static double psnr(final Volume ref, final float[] a) {
		double max = 0, se = 0;
		final float[] r = ref.data();
		for (int i = 0; i < r.length; i++) {
			max = Math.max(max, r[i]);
			final double e = a[i] - r[i];
			se += e * e;
		}
		return 10 * Math.log10(max * max / (se / r.length));
	}

	/** Isotropic total variation Σ sqrt(Σ_d (forward difference)²), zero across the far edges (Rudin, Osher & Fatemi 1992). */
	static double totalVariation(final Volume v) {
		double tv = 0;
		for (int z = 0; z < v.nz(); z++)
			for (int y = 0; y < v.ny(); y++)
				for (int x = 0; x < v.nx(); x++) {
					final double c = v.get(x, y, z);
					final double dx = x + 1 < v.nx() ? v.get(x + 1, y, z) - c : 0;
					final double dy = y + 1 < v.ny() ? v.get(x, y + 1, z) - c : 0;
					final double dz = z + 1 < v.nz() ? v.get(x, y, z + 1) - c : 0;
					tv += Math.sqrt(dx * dx + dy * dy + dz * dz);
				}
		return tv;
	}
}
