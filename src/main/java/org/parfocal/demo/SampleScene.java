package org.parfocal.demo;

import java.util.Random;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * The invented scene of Parfocal's sample stacks: a "quillwort cell" (an invented cell type) seen on the
 * invented "Halden W-60" widefield microscope (60×/1.2 water immersion, 520 nm emission, 80 nm pixels,
 * 200 nm steps). Each cell has a faint ellipsoidal cytoplasm, a few curved filaments ("threadlets", ~100 nm
 * thick) and bright point-like puncta. Everything is drawn from one seed, so the stacks rebuild exactly.
 * <p>
 * No ImageJ here: {@link SampleStacks} writes the TIFFs.
 */
public final class SampleScene {

	/** Voxel size of the invented microscope, µm. */
	public static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);
	public static final double NA = 1.2, IMMERSION_INDEX = 1.333, EMISSION_UM = 0.52;

	private SampleScene() {}

	/** The sharp object: intensities in arbitrary units, cytoplasm ~20, filaments ~3000, puncta ~20000 (integrated photons at 1 photon per unit). */
	public static Volume cell(final int nx, final int ny, final int nz, final long seed) {
		final Volume v = Volume.zeros(nx, ny, nz, VOXEL);
		final Random r = new Random(seed);
		// Cytoplasm: a soft-edged ellipsoid.
		final double cx = nx * (0.45 + 0.1 * r.nextDouble()), cy = ny * (0.45 + 0.1 * r.nextDouble()), cz = nz / 2.0;
		final double ax = nx * 0.38, ay = ny * 0.3, az = nz * 0.3;
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++) {
					final double q = sq((x - cx) / ax) + sq((y - cy) / ay) + sq((z - cz) / az);
					v.set(x, y, z, (float) (20.0 / (1 + Math.exp((q - 1) * 8))));
				}
		// Filaments: smooth random walks drawn as Gaussian tubes (sigma 0.6 px laterally, 0.3 slices axially).
		for (int f = 0; f < 6; f++) {
			double x = cx + (r.nextDouble() - 0.5) * ax, y = cy + (r.nextDouble() - 0.5) * ay, z = cz + (r.nextDouble() - 0.5) * az;
			double theta = r.nextDouble() * 2 * Math.PI, phi = (r.nextDouble() - 0.5) * 0.4;
			final int steps = (int) (nx * 1.2);
			for (int s = 0; s < steps; s++) {
				splat(v, x, y, z, 0.6, 0.3, 3000.0 / 3);
				theta += r.nextGaussian() * 0.08;
				phi = Math.max(-0.5, Math.min(0.5, phi + r.nextGaussian() * 0.05));
				x += 0.5 * Math.cos(theta) * Math.cos(phi);
				y += 0.5 * Math.sin(theta) * Math.cos(phi);
				z += 0.5 * Math.sin(phi) * VOXEL.dx() / VOXEL.dz();
			}
		}
		// Puncta: sub-resolution points.
		for (int p = 0; p < 25; p++) {
			final double x = cx + (r.nextDouble() - 0.5) * 1.6 * ax, y = cy + (r.nextDouble() - 0.5) * 1.6 * ay, z = cz + (r.nextDouble() - 0.5) * 1.6 * az;
			splat(v, x, y, z, 0.5, 0.3, 20000);
		}
		return v;
	}

	/** Refractive index of the quillwort cytoplasm (invented), and the depth of the imaged cell below the coverslip, µm. */
	public static final double SAMPLE_INDEX = 1.38, DEPTH_UM = 4;
	/** Size of the sample PSF, voxels. */
	public static final int PSF_XY = 31, PSF_Z = 21;

	/**
	 * The invented microscope's widefield PSF: Gibson &amp; Lanni, water immersion (design and actual 1.333) into
	 * cytoplasm of index 1.38 at 4 µm depth, 520 nm, on the sample grid; unit sum. The same as
	 * {@code PSF from Optics...} with these values.
	 */
	public static Volume psf() {
		return psf(EMISSION_UM, DEPTH_UM);
	}

	/** The invented microscope's widefield PSF (as {@link #psf()}) for another emission wavelength and depth, µm. */
	public static Volume psf(final double emission, final double depth) {
		final Optics o = Optics.builder().na(NA).immersionIndex(IMMERSION_INDEX).sampleIndex(SAMPLE_INDEX).depth(depth)
				.emissionWavelength(emission).build();
		return PsfModels.get("gibson-lanni").compute(o, new PsfGrid(PSF_XY, PSF_XY, PSF_Z, VOXEL.dx(), VOXEL.dy(), VOXEL.dz()));
	}

	/** Emission of the second channel (the invented red "ambersome" label), µm. */
	public static final double RED_EMISSION_UM = 0.61;
	/** Depth of the bead layer of the bead recording below the coverslip, µm. */
	public static final double BEAD_DEPTH_UM = 2;

	/**
	 * Sub-resolution beads (100 nm, invented calibration slide for the Halden W-60) in one layer near the middle
	 * plane (±2 planes), at least 16 voxels from the lateral edges and 30 voxels (2.4 µm) from each other,
	 * each of about {@code photons} integrated intensity (±20 %).
	 */
	public static Volume beads(final int nx, final int ny, final int nz, final int count, final double photons, final long seed) {
		final Volume v = Volume.zeros(nx, ny, nz, VOXEL);
		final Random r = new Random(seed);
		final java.util.List<double[]> placed = new java.util.ArrayList<>();
		for (int tries = 0; placed.size() < count && tries < 10000; tries++) {
			final double x = 16 + r.nextDouble() * (nx - 32), y = 16 + r.nextDouble() * (ny - 32), z = nz / 2.0 - 2 + 4 * r.nextDouble();
			boolean free = true;
			for (final double[] q : placed) free &= sq(q[0] - x) + sq(q[1] - y) >= 30 * 30;
			if (!free) continue;
			placed.add(new double[] { x, y, z });
			splat(v, x, y, z, 0.45, 0.25, photons * (0.8 + 0.4 * r.nextDouble()));
		}
		return v;
	}

	/**
	 * The second channel of the two-channel sample: invented "ambersomes", a few bright soft-edged ellipsoidal
	 * bodies (radius 2–4 voxels laterally) inside the same cell as {@link #cell} with the same seed, on a faint
	 * cytoplasm.
	 */
	public static Volume ambersomes(final int nx, final int ny, final int nz, final long seed) {
		final Volume v = Volume.zeros(nx, ny, nz, VOXEL);
		final Random r = new Random(seed);
		final double cx = nx * (0.45 + 0.1 * r.nextDouble()), cy = ny * (0.45 + 0.1 * r.nextDouble()), cz = nz / 2.0;
		final double ax = nx * 0.38, ay = ny * 0.3, az = nz * 0.3;
		final Random b = new Random(seed ^ 0x5eed);
		final double[][] bodies = new double[9][];
		for (int i = 0; i < bodies.length; i++)
			bodies[i] = new double[] { cx + (b.nextDouble() - 0.5) * 1.2 * ax, cy + (b.nextDouble() - 0.5) * 1.2 * ay, cz + (b.nextDouble() - 0.5) * 1.0 * az,
					2 + 2 * b.nextDouble(), 150 + 150 * b.nextDouble() };
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++) {
					final double q = sq((x - cx) / ax) + sq((y - cy) / ay) + sq((z - cz) / az);
					double a = 5.0 / (1 + Math.exp((q - 1) * 8));
					for (final double[] o : bodies) {
						final double d = Math.sqrt(sq(x - o[0]) + sq(y - o[1]) + sq((z - o[2]) * VOXEL.dz() / VOXEL.dx())) / o[3];
						a += o[4] / (1 + Math.exp((d - 1) * 6));
					}
					v.set(x, y, z, (float) a);
				}
		return v;
	}

	/**
	 * A Gaussian approximation of the invented microscope's widefield PSF (σ_xy = 0.21·λ/NA, σ_z = 0.66·λ·n/NA²,
	 * the paraxial fits of Zhang, Zerubia & Olivo-Marin, Appl. Opt. 2007), sampled at the voxel centres,
	 * odd-sized, unit sum.
	 */
	public static Volume gaussianPsf(final int kx, final int ky, final int kz) {
		final double sxy = 0.21 * EMISSION_UM / NA / VOXEL.dx();
		final double sz = 0.66 * EMISSION_UM * IMMERSION_INDEX / (NA * NA) / VOXEL.dz();
		final Volume h = Volume.zeros(kx, ky, kz, VOXEL);
		double sum = 0;
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < ky; y++)
				for (int x = 0; x < kx; x++) {
					final double v = Math.exp(-0.5 * (sq((x - (kx - 1) / 2) / sxy) + sq((y - (ky - 1) / 2) / sxy) + sq((z - (kz - 1) / 2) / sz)));
					h.set(x, y, z, (float) v);
					sum += v;
				}
		final float[] d = h.data();
		for (int i = 0; i < d.length; i++) d[i] /= sum;
		return h;
	}

	/** Adds a small anisotropic Gaussian blob of total weight {@code w} at (x, y, z). */
	private static void splat(final Volume v, final double x, final double y, final double z, final double sxy, final double sz, final double w) {
		final int r = 3, rz = 2;
		final double norm = w / (Math.pow(2 * Math.PI, 1.5) * sxy * sxy * sz);
		for (int k = (int) Math.floor(z) - rz; k <= (int) Math.floor(z) + rz; k++) {
			if (k < 0 || k >= v.nz()) continue;
			for (int j = (int) Math.floor(y) - r; j <= (int) Math.floor(y) + r; j++) {
				if (j < 0 || j >= v.ny()) continue;
				for (int i = (int) Math.floor(x) - r; i <= (int) Math.floor(x) + r; i++) {
					if (i < 0 || i >= v.nx()) continue;
					final double g = norm * Math.exp(-0.5 * (sq((i - x) / sxy) + sq((j - y) / sxy) + sq((k - z) / sz)));
					v.set(i, j, k, (float) (v.get(i, j, k) + g));
				}
			}
		}
	}

	private static double sq(final double a) { return a * a; }
}
