package org.parfocal.blind;

import org.parfocal.conv.Acquisition;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Synthetic test data of our own (not measured): the invented quillwort cell of {@link SampleScene} on a
 * 48 × 48 × 16 grid, seen through the invented Halden W-60 widefield optics (60×/1.2 water, 520 nm, Gibson &amp;
 * Lanni PSF 4 µm deep in n = 1.38, 80 × 80 × 200 nm voxels), recorded with Poisson noise by the project's
 * {@link Acquisition} model (background 3, 1 photon per unit, as the sample stacks).
 */
final class BlindScenes {

	static final int NX = 48, NZ = 16;
	static final double BACKGROUND = 3;
	static final VoxelSize VOXEL = SampleScene.VOXEL;

	private BlindScenes() {}

	static Optics optics() {
		return optics(SampleScene.EMISSION_UM);
	}

	/** The invented optics with another emission wavelength: every PSF width scales with λ. */
	static Optics optics(final double lambda) {
		return Optics.builder().na(SampleScene.NA).immersionIndex(SampleScene.IMMERSION_INDEX).sampleIndex(SampleScene.SAMPLE_INDEX)
				.depth(SampleScene.DEPTH_UM).emissionWavelength(lambda).build();
	}

	/** The Gibson &amp; Lanni PSF of the optics on a box, unit sum, calibrated in µm. */
	static Volume psf(final Optics o, final int kx, final int kz) {
		return PsfModels.get("gibson-lanni").compute(o, new PsfGrid(kx, kx, kz, VOXEL.dx(), VOXEL.dy(), VOXEL.dz()));
	}

	/** The true PSF used for the recording (31 × 31 × 15). */
	static final Volume TRUE_PSF = psf(optics(), 31, 15);
	static final Volume TRUTH = SampleScene.cell(NX, NX, NZ, 7);
	static final Volume RECORDED = new Acquisition(TRUE_PSF, TRUTH.shape(), new Acquisition.Options(Boundary.ZERO, true, BACKGROUND, 1, 11, 0))
			.record(TRUTH, Monitor.NONE);

	/** The true PSF cropped to a box about its origin and scaled to unit sum. */
	static Volume truePsfOn(final int[] box) {
		return Psfs.normalized(Psfs.resizeCentered(TRUE_PSF, box[0], box[1], box[2]));
	}

	/** Peak signal-to-noise ratio in dB, 10 log10(max(ref)² / mean (a − ref)²) (the usual definition). */
	static double psnr(final Volume ref, final Volume a) {
		double max = 0, se = 0;
		final float[] r = ref.data(), d = a.data();
		for (int i = 0; i < r.length; i++) {
			max = Math.max(max, r[i]);
			final double e = d[i] - r[i];
			se += e * e;
		}
		return 10 * Math.log10(max * max / (se / r.length));
	}

	static double max(final Volume v) {
		double m = 0;
		for (final float f : v.data()) m = Math.max(m, f);
		return m;
	}
}
