package org.parfocal.psf;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;

/** Sampled PSF volumes: energy, symmetry, detector integration, threads, modalities. */
class SampledPsfTest {

	static final double LAMBDA = 0.52;

	static Optics.Builder oil() {
		return Optics.builder().na(1.4).immersionIndex(1.518).emissionWavelength(LAMBDA);
	}

	static List<Optics> allModalities() {
		final List<Optics> l = new ArrayList<>();
		final Optics.Builder b = oil().sampleIndex(1.38).depth(8);
		l.add(b.modality(Modality.WIDEFIELD).build());
		l.add(b.modality(Modality.CONFOCAL).excitationWavelength(0.488).pinholeAiryUnits(1).build());
		l.add(b.modality(Modality.TWO_PHOTON).excitationWavelength(0.92).build());
		l.add(b.modality(Modality.LIGHT_SHEET).sheetThickness(1.5).build());
		return l;
	}

	@Test
	void everyModelAndModalitySumsToOne() {
		// Unit sum (the convention of every operator): within 1e-6, compensated sum of the float voxels.
		final PsfGrid g = new PsfGrid(33, 33, 17, 0.08, 0.08, 0.2);
		for (final PsfModel m : PsfModels.all())
			for (final Optics o : allModalities()) {
				final Volume v = m.compute(o, g);
				assertEquals(1, v.sum(), 1e-6, m.key() + ", " + o.modality().key());
				assertEquals(-1, v.firstNonFinite(), m.key() + ", " + o.modality().key());
				assertTrue(v.voxelSize().isCalibrated() && v.voxelSize().unit().equals("µm"));
			}
	}

	@Test
	void radialSymmetry() {
		// The PSF is a function of the radius only: every point-sampled voxel equals the unsampled model at that
		// voxel's exact radius (evaluated directly, no radial table) within 1e-4 of the peak, in every plane; pixel
		// averages are also unchanged by a 90° rotation.
		final PsfGrid g = new PsfGrid(31, 31, 5, 0.05, 0.05, 0.3);
		final Optics o = oil().sampleIndex(1.33).depth(5).build();
		final int c = 15;
		final double[] r = new double[31 * 31], z = new double[5];
		for (int y = 0; y < 31; y++) for (int x = 0; x < 31; x++) r[x + 31 * y] = Math.hypot(g.x(x), g.y(y));
		for (int l = 0; l < 5; l++) z[l] = g.z(l);
		for (final PupilPsfModel m : new PupilPsfModel[] { new BornWolfModel(), new GibsonLanniModel(), new RichardsWolfModel() }) {
			final Volume v = m.compute(o, g, Sampling.POINT);
			final double[][] exact = m.intensity(o, LAMBDA, z, r);
			final int[] p = Fwhm.peak(v);
			final double s = v.get(p[0], p[1], p[2]) / exact[p[2]][p[0] + 31 * p[1]], peak = v.get(p[0], p[1], p[2]);
			double worst = 0;
			for (int l = 0; l < 5; l++) for (int i = 0; i < r.length; i++) worst = Math.max(worst, Math.abs(v.data()[i + r.length * l] - s * exact[l][i]));
			assertTrue(worst <= 1e-4 * peak, m.key() + ": max deviation from the radial model " + worst / peak + " of peak");
		}
		final Volume a = new GibsonLanniModel().compute(o, g);
		for (int l = 0; l < 5; l++) for (int y = 0; y < 31; y++) for (int x = 0; x < 31; x++) assertEquals(a.get(x, y, l), a.get(y, 2 * c - x, l), 0);
	}

	@Test
	void pixelsAreAreaAveragesOfTheContinuousPsf() {
		// Detector sampling: a voxel's value ∝ the mean of I over the pixel. Oracle: a brute-force 40 × 40 midpoint
		// average of the unsampled model, evaluated at exact radii (no radial table, no interpolation).
		final Optics o = oil().sampleIndex(1.33).depth(6).build();
		final PsfGrid g = new PsfGrid(15, 15, 3, 0.1, 0.1, 0.4);
		final GibsonLanniModel m = new GibsonLanniModel();
		final Volume v = m.compute(o, g, new Sampling(15, 1));
		final int[][] pix = { { 7, 7 }, { 8, 7 }, { 9, 8 }, { 11, 7 }, { 12, 12 } };
		final double[] brute = new double[pix.length];
		final int n = 40;
		for (int p = 0; p < pix.length; p++) {
			final double[] r = new double[n * n];
			for (int sy = 0; sy < n; sy++)
				for (int sx = 0; sx < n; sx++)
					r[sx + n * sy] = Math.hypot(g.x(pix[p][0]) + ((sx + 0.5) / n - 0.5) * g.dx(), g.y(pix[p][1]) + ((sy + 0.5) / n - 0.5) * g.dy());
			final double[] i = m.intensity(o, LAMBDA, new double[] { g.z(1) }, r)[0];
			for (final double d : i) brute[p] += d / (n * n);
		}
		final double scale = v.get(7, 7, 1) / brute[0];
		for (int p = 1; p < pix.length; p++)
			assertEquals(brute[p] * scale, v.get(pix[p][0], pix[p][1], 1), 2e-4 * v.get(7, 7, 1), "pixel " + pix[p][0] + "," + pix[p][1]);
		// and the area average differs from the point sample at the centre (it is an integral, not a sample)
		final Volume pt = m.compute(o, g, Sampling.POINT);
		assertTrue(Math.abs(pt.get(7, 7, 1) - v.get(7, 7, 1)) > 1e-3 * v.get(7, 7, 1));
	}

	@Test
	void oneAndTwoThreadsGiveTheSameBits() {
		final PsfGrid g = new PsfGrid(41, 41, 21, 0.07, 0.07, 0.15);
		for (final Optics o : allModalities())
			for (final PsfModel m : new PsfModel[] { new GibsonLanniModel(), new GaussianModel() }) {
				final Volume one = Parallelization.runSingleThreaded(() -> m.compute(o, g));
				final Volume two = Parallelization.runWithNumThreads(2, () -> m.compute(o, g));
				assertArrayEquals(one.data(), two.data(), m.key() + ", " + o.modality().key());
			}
	}

	@Test
	void originIsTheCentreVoxelAtDesignConditions() {
		// Born & Wolf: the aberration-free PSF peaks at the focus, symmetric in z (§8.8).
		final Volume v = new BornWolfModel().compute(oil().build(), new PsfGrid(21, 25, 15, 0.1, 0.08, 0.2));
		assertArrayEquals(new int[] { 10, 12, 7 }, Fwhm.peak(v));
		for (int z = 0; z < 7; z++) assertEquals(v.get(10, 12, z), v.get(10, 12, 14 - z), 1e-6 * v.get(10, 12, 7));
	}

	static double lateralFwhm(final Optics o) {
		// fine point samples: the unsampled lateral FWHM at the focal plane
		final Volume v = new BornWolfModel().compute(o, new PsfGrid(151, 151, 1, 0.004, 0.004, 0.1), Sampling.POINT);
		return Fwhm.lateral(v);
	}

	@Test
	void confocalIsNarrowerThanWidefieldByAboutOneOverRootTwo() {
		// Closed pinhole, equal wavelengths: Airy² vs Airy, FWHM ratio ≈ 1/√2 (rule of thumb, common practice)
		// within 5 %; opening the pinhole widens the PSF towards the widefield one (common practice).
		final Optics wf = oil().build();
		final Optics.Builder cf = oil().modality(Modality.CONFOCAL).excitationWavelength(LAMBDA);
		final double w = lateralFwhm(wf), c0 = lateralFwhm(cf.pinholeAiryUnits(0).build());
		assertEquals(1 / Math.sqrt(2), c0 / w, 0.05 / Math.sqrt(2), "confocal/widefield FWHM");
		final double c1 = lateralFwhm(cf.pinholeAiryUnits(1).build()), c3 = lateralFwhm(cf.pinholeAiryUnits(3).build());
		assertTrue(c0 < c1 && c1 < c3 && c3 < w * 1.02, c0 + " < " + c1 + " < " + c3 + " ≲ " + w);
		// 0.2 AU is practically closed (common practice: below ~0.25 AU the gain in resolution is nearly complete)
		assertEquals(c0, lateralFwhm(cf.pinholeAiryUnits(0.2).build()), 0.02 * c0);
	}

	@Test
	void twoPhotonIsTheSquaredExcitationPsf() {
		// Two-photon: excitation PSF at the laser wavelength, squared (Denk, Strickler & Webb, Science 1990, from memory).
		final Optics tp = oil().modality(Modality.TWO_PHOTON).excitationWavelength(0.9).build();
		final Optics one = oil().emissionWavelength(0.9).build();
		final PsfGrid g = new PsfGrid(31, 31, 11, 0.06, 0.06, 0.2);
		final Volume a = new BornWolfModel().compute(tp, g, Sampling.POINT), b = new BornWolfModel().compute(one, g, Sampling.POINT);
		final float[] sq = b.data().clone();
		double s = 0;
		for (final float f : sq) s += (double) f * f;
		for (int i = 0; i < sq.length; i++) sq[i] = (float) ((double) sq[i] * sq[i] / s);
		// within the radial interpolation error (the square of an interpolant is not the interpolant of the square)
		for (int i = 0; i < sq.length; i++) assertEquals(sq[i], a.data()[i], 1e-4 * a.get(15, 15, 5));
	}

	@Test
	void lightSheetConfinesTheAxialProfileToTheSheet() {
		// Detection PSF × exp(−z²/2σ²): a sheet much thinner than the detection depth of field sets the axial FWHM
		// (product of a broad and a narrow profile); the focal plane is unchanged laterally.
		final Optics det = Optics.builder().na(0.5).immersionIndex(1.33).emissionWavelength(LAMBDA).build();
		final Optics ls = det.toBuilder().modality(Modality.LIGHT_SHEET).sheetThickness(0.8).build();
		final PsfGrid g = new PsfGrid(11, 11, 121, 0.2, 0.2, 0.05);
		final Volume v = new BornWolfModel().compute(ls, g);
		assertEquals(0.8, Fwhm.axial(v), 0.05 * 0.8);
		final Volume d = new BornWolfModel().compute(det, g);
		assertTrue(Fwhm.axial(d) > 4 * 0.8);
		final double rl = v.get(6, 5, 60) / v.get(5, 5, 60), rd = d.get(6, 5, 60) / d.get(5, 5, 60);
		assertEquals(rd, rl, 1e-5);
	}
}
