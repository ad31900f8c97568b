package org.parfocal.blocks;

import java.util.Random;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Noise;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.testing.TestVolumes;

/**
 * Seeded synthetic recordings of an invented specimen for the block tests: a dim cytoplasm with bright
 * granules and a few curved fibres, blurred by an anisotropic Gaussian PSF, Poisson noise and a camera offset.
 */
final class BlockScenes {

	static final VoxelSize VOXEL = VoxelSize.microns(0.12, 0.12, 0.3);
	static final float OFFSET = 100;

	private BlockScenes() {}

	/** Sampled Gaussian PSF ({@link TestVolumes#gaussianPsf}), sigmas in voxels, calibrated like the scenes. */
	static Volume psf(final int kxy, final int kz, final double sxy, final double sz) {
		return TestVolumes.gaussianPsf(kxy, kxy, kz, sxy, sxy, sz).withVoxelSize(VOXEL);
	}

	/** The object: level 5, granules (+50…150) and fibres (+40). */
	static Volume object(final long seed, final int nx, final int ny, final int nz) {
		final Random r = new Random(seed);
		final Volume v = Volume.zeros(nx, ny, nz, VOXEL);
		java.util.Arrays.fill(v.data(), 5f);
		final int granules = Math.max(4, nx * ny * nz / 2000);
		for (int i = 0; i < granules; i++) {
			final int x = r.nextInt(nx), y = r.nextInt(ny), z = r.nextInt(nz);
			v.set(x, y, z, v.get(x, y, z) + 50 + 100 * r.nextFloat());
		}
		for (int f = 0; f < 4; f++) {
			final double x0 = r.nextDouble() * nx, y0 = r.nextDouble() * ny, z0 = r.nextDouble() * nz, a = r.nextDouble() * Math.PI;
			final double bend = (r.nextDouble() - 0.5) * 0.02;
			for (int s = -2 * nx; s < 2 * nx; s++) {
				final double t = a + bend * s;
				final int x = (int) Math.round(x0 + 0.5 * s * Math.cos(t)), y = (int) Math.round(y0 + 0.5 * s * Math.sin(t));
				final int z = (int) Math.round(z0 + 0.05 * s);
				if (x >= 0 && y >= 0 && z >= 0 && x < nx && y < ny && z < nz) v.set(x, y, z, 45f);
			}
		}
		return v;
	}

	/** Recording of {@link #object}: blurred (mirror edges), Poisson noise (seeded), plus {@link #OFFSET}. */
	static Volume recording(final long seed, final int nx, final int ny, final int nz, final Volume psf) {
		final Volume o = object(seed, nx, ny, nz);
		final Volume b = ConvolutionOperator.create(psf, o, Boundary.MIRROR).apply(o);
		final Volume n = Noise.poisson(b, 1, seed + 1);
		final float[] d = n.data();
		for (int i = 0; i < d.length; i++) d[i] += OFFSET;
		return n.withVoxelSize(VOXEL);
	}
}
