package org.parfocal.beads;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;
import org.parfocal.psf.Sampling;

/**
 * Synthetic bead recordings made with the project's optics model (Born &amp; Wolf, widefield): the PSF is computed
 * once, point-sampled on a grid {@code k} times finer laterally and {@code kz} times finer axially; a bead at a
 * sub-voxel position that is a multiple of 1/k (1/kz axially) is then the mean of k × k fine samples per camera pixel
 * (the midpoint rule the models use for pixel integration) at its own fine-grid phase, point-sampled in z. This needs
 * no interpolation and no Fourier shift, so it is independent of the code under test.
 */
final class SyntheticBeads {

	/** Widefield, water immersion: NA 1.2, n 1.333, emission 0.52 µm (an invented green-dye setup). */
	static final Optics OPTICS = Optics.builder().na(1.2).immersionIndex(1.333).emissionWavelength(0.52).build();

	final int k, kz, h, hz;
	final double dx, dz;
	private final Volume fine;
	private final double scale;

	/**
	 * @param h lateral half-size (voxels) of the region each bead is drawn in; {@code hz} axial (0 for 2D)
	 */
	SyntheticBeads(final double dx, final double dz, final int k, final int kz, final int h, final int hz) {
		this.dx = dx;
		this.dz = dz;
		this.k = k;
		this.kz = kz;
		this.h = h;
		this.hz = hz;
		final int fh = k * (h + 1), fhz = kz * (hz + 1);
		fine = PsfModels.get("born-wolf").compute(OPTICS, new PsfGrid(2 * fh + 1, 2 * fh + 1, 2 * fhz + 1, dx / k, dx / k, hz == 0 ? dz : dz / kz),
				Sampling.POINT);
		// unit sum of a bead at offset 0 over its drawing region
		final Volume v = Volume.zeros(2 * h + 1, 2 * h + 1, 2 * hz + 1, VoxelSize.microns(dx, dx, dz));
		draw(v, h, h, hz, 1, false);
		scale = 1 / v.sum();
	}

	/** Empty stack of the given size, calibrated in µm. */
	Volume stack(final int nx, final int ny, final int nz) {
		return Volume.zeros(nx, ny, nz, VoxelSize.microns(dx, dx, dz));
	}

	/** The generating PSF on a box of half-sizes (bh, bhz) centred on a bead at a whole voxel, unit sum. */
	Volume psf(final int bh, final int bhz) {
		final Volume v = Volume.zeros(2 * bh + 1, 2 * bh + 1, 2 * bhz + 1, VoxelSize.microns(dx, dx, dz));
		draw(v, bh, bh, bhz, 1, true);
		final double s = v.sum();
		final float[] d = v.data();
		for (int i = 0; i < d.length; i++) d[i] /= s;
		return v;
	}

	/** Adds a bead of {@code photons} total (over its drawing region) at (x, y, z) voxels; fractions must be multiples of 1/k, 1/kz. */
	void add(final Volume v, final double x, final double y, final double z, final double photons) {
		draw(v, x, y, z, photons * scale, false);
	}

	private void draw(final Volume v, final double x, final double y, final double z, final double amp, final boolean clipToVolume) {
		final long mx = Math.round(x * k), my = Math.round(y * k), mz = Math.round(z * kz);
		if (Math.abs(mx - x * k) > 1e-6 || Math.abs(my - y * k) > 1e-6 || Math.abs(mz - z * kz) > 1e-6)
			throw new IllegalArgumentException("bead position must be a multiple of 1/" + k + " (1/" + kz + " in z): " + x + ", " + y + ", " + z);
		final int cx = (int) Math.round(x), cy = (int) Math.round(y), cz = (int) Math.round(z);
		final int fc = (fine.nx() - 1) / 2, fcz = (fine.nz() - 1) / 2, half = (k - 1) / 2;
		for (int l = cz - hz; l <= cz + hz; l++) {
			if (l < 0 || l >= v.nz()) continue;
			final int fz = (int) (fcz + (long) l * kz - mz);
			if (fz < 0 || fz >= fine.nz()) continue;
			for (int j = cy - h; j <= cy + h; j++) {
				if (j < 0 || j >= v.ny()) continue;
				for (int i = cx - h; i <= cx + h; i++) {
					if (i < 0 || i >= v.nx()) continue;
					double s = 0;
					for (int b = 0; b < k; b++)
						for (int a = 0; a < k; a++) {
							final int fx = (int) (fc + (long) i * k - mx + a - half), fy = (int) (fc + (long) j * k - my + b - half);
							if (fx >= 0 && fy >= 0 && fx < fine.nx() && fy < fine.ny()) s += fine.get(fx, fy, fz);
						}
					v.set(i, j, l, (float) (v.get(i, j, l) + amp * s / (k * k)));
				}
			}
		}
	}

	/**
	 * Adds a constant background (photons per voxel) and draws Poisson counts, seeded. Exact Poisson sampling by Knuth's
	 * product-of-uniforms method (TAOCP vol. 2, §3.4.1) on chunks of mean ≤ 16 (a sum of independent Poisson variables is
	 * Poisson with the summed mean). Not {@code core.Noise}: Commons Math builds a distribution object per voxel there,
	 * which takes seconds for the million-voxel stacks of these tests.
	 */
	static Volume record(final Volume clean, final double background, final long seed) {
		final Volume v = Volume.zeros(clean.nx(), clean.ny(), clean.nz(), clean.voxelSize());
		final int plane = v.nx() * v.ny();
		for (int z = 0; z < v.nz(); z++) {
			final java.util.SplittableRandom rng = new java.util.SplittableRandom(seed * 1_000_003L + z);
			for (int i = z * plane; i < (z + 1) * plane; i++) {
				double mean = clean.data()[i] + background;
				long count = 0;
				while (mean > 0) {
					final double m = Math.min(16, mean);
					mean -= m;
					final double limit = Math.exp(-m);
					double p = rng.nextDouble();
					while (p > limit) {
						count++;
						p *= rng.nextDouble();
					}
				}
				v.data()[i] = count;
			}
		}
		return v;
	}
}
