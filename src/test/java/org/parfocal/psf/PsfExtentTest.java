package org.parfocal.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;

/**
 * The box of a widefield PSF for a stack, and the warnings about a given PSF. Outside facts: a widefield PSF
 * carries the same light in every plane through focus (conservation of energy; for a pupil-integrated model,
 * Parseval's theorem applied to each defocused pupil function), and its light at defocus z lies inside the
 * geometric cone of radius |z|·tan α (Born &amp; Wolf §8.8, from memory); Nyquist interval λ/(4·NA) laterally
 * (the widefield OTF's cut-off 2·NA/λ, common practice).
 */
class PsfExtentTest {

	private static Optics airObjective() {
		return Optics.builder().na(0.8).immersionIndex(1.0).sampleIndex(1.0).emissionWavelength(0.52).build();
	}

	private static double spread(final double[] s) {
		final double max = Arrays.stream(s).max().orElse(0), min = Arrays.stream(s).min().orElse(0);
		return (max - min) / max;
	}

	/**
	 * A Born &amp; Wolf widefield PSF on the box for a 31-plane stack (0.1 × 0.1 × 0.25 µm voxels, NA 0.8 in air):
	 * it spans the stack's 31 planes and every plane carries the same light within 5 %. On the box the optics
	 * alone gave before (lateral radius 4.5·λ/NA = 2.9 µm) with the same 31 planes, the outer planes lost more than
	 * a fifth of their light (0.026 against 0.034 at focus) and the warning says so.
	 */
	@Test
	void widefieldBoxForAStackHoldsTheConeOverItsDepth() {
		final Optics o = airObjective();
		final PsfGrid g = PsfExtent.forStack(o, 0.1, 0.1, 0.25, 400, 400, 31);
		assertEquals(31, g.nz(), g.toString());
		final double cone = 15 * 0.25 * Math.tan(Math.asin(0.8));
		assertTrue((g.nx() - 1) / 2 * 0.1 >= cone, g + " vs cone radius " + cone);
		final Volume v = new BornWolfModel().compute(o, g);
		final double[] s = PsfExtent.planeSums(v);
		assertTrue(spread(s) < 0.05, "plane sums " + Arrays.toString(s));
		assertTrue(PsfExtent.warnings(v, new int[] { 400, 400, 31 }, new double[] { 0.1, 0.1, 0.25 }, o).isEmpty(),
				PsfExtent.warnings(v, new int[] { 400, 400, 31 }, new double[] { 0.1, 0.1, 0.25 }, o).toString());
		final int old = 2 * (int) Math.ceil(4.5 * 0.52 / 0.8 / 0.1) + 1;
		final Volume cut = new BornWolfModel().compute(o, new PsfGrid(old, old, 31, 0.1, 0.1, 0.25));
		final double[] c = PsfExtent.planeSums(cut);
		assertTrue(c[0] < 0.8 * c[15], "cut box: plane sums " + Arrays.toString(c));
		final List<String> w = PsfExtent.warnings(cut, new int[] { 400, 400, 31 }, new double[] { 0.1, 0.1, 0.25 }, o);
		assertTrue(w.stream().anyMatch(x -> x.contains("cut off laterally")), w.toString());
	}

	/** The box of the optics alone (no stack) also holds the cone over its own axial extent: plane sums within 5 %. */
	@Test
	void widefieldBoxFromTheOpticsHoldsItsOwnCone() {
		final Optics o = airObjective();
		final PsfGrid g = PsfGrid.forOptics(o, 0.1, 0.1, 0.25);
		final double[] s = PsfExtent.planeSums(new BornWolfModel().compute(o, g));
		assertTrue(spread(s) < 0.05, g + ": plane sums " + Arrays.toString(s));
	}

	/** The box is capped at the image (the engine refuses larger PSFs), and confocal boxes keep the optics' size. */
	@Test
	void boxIsCappedAtTheImageAndConfocalKeepsTheOpticsSize() {
		final Optics o = airObjective();
		final PsfGrid g = PsfExtent.forStack(o, 0.1, 0.1, 0.25, 64, 50, 20);
		assertEquals(63, g.nx());
		assertEquals(49, g.ny());
		assertEquals(19, g.nz());
		final Optics c = Optics.builder().modality(Modality.CONFOCAL).na(0.8).immersionIndex(1.0).sampleIndex(1.0).emissionWavelength(0.52)
				.excitationWavelength(0.488).pinholeAiryUnits(1).build();
		final PsfGrid base = PsfGrid.forOptics(c, 0.1, 0.1, 0.25), fc = PsfExtent.forStack(c, 0.1, 0.1, 0.25, 400, 400, 201);
		assertEquals(base, fc);
	}

	/**
	 * A shallow PSF (9 planes) for a 31-plane stack whose outer planes still carry most of the light is flagged as
	 * cut off axially; a stack at 0.3 µm pixels for NA 0.8 at 520 nm (Nyquist interval 0.1625 µm) as undersampled;
	 * without optics, a PSF whose lateral FWHM spans less than 1.5 voxels likewise.
	 */
	@Test
	void warnsAboutAShallowPsfAndAnUndersampledStack() {
		final Optics o = airObjective();
		final PsfGrid g = PsfExtent.forStack(o, 0.1, 0.1, 0.25, 400, 400, 9);
		final Volume v = new BornWolfModel().compute(o, g);
		final List<String> w = PsfExtent.warnings(v, new int[] { 400, 400, 31 }, new double[] { 0.1, 0.1, 0.25 }, o);
		assertTrue(w.stream().anyMatch(x -> x.contains("cut off axially") && x.contains("9 of the stack's 31")), w.toString());
		final List<String> u = PsfExtent.warnings(v, new int[] { 400, 400, 31 }, new double[] { 0.3, 0.3, 0.25 }, o);
		assertTrue(u.stream().anyMatch(x -> x.contains("undersampled laterally") && x.contains("0.163")), u.toString());
		final Volume narrow = Volume.zeros(9, 9, 1, v.voxelSize());
		narrow.data()[40] = 1;
		narrow.data()[39] = narrow.data()[41] = narrow.data()[31] = narrow.data()[49] = 0.3f;
		final List<String> n = PsfExtent.warnings(narrow, new int[] { 64, 64, 1 }, null, null);
		assertTrue(n.stream().anyMatch(x -> x.contains("looks undersampled")), n.toString());
	}
}
