package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockSource;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * {@code background=by-psf}: the level follows the PSF's shape. The physical facts it rests on (common practice):
 * every defocus plane of a widefield PSF carries the same light (the whole pupil's light, spread wider), while a
 * confocal PSF's plane sums fall off with defocus (the pinhole rejects out-of-focus light). So a widefield PSF in a box
 * that holds its cone gives {@code dark}, a confocal one {@code dark-or-median}, and a widefield PSF cut by too small
 * a box (which also loses its outer planes' light) still {@code dark}.
 */
class BackgroundByPsfTest {

	static final Optics WIDEFIELD = Optics.builder().na(1.4).immersionIndex(1.518).sampleIndex(1.518).emissionWavelength(0.52).build();
	static final Optics CONFOCAL = WIDEFIELD.toBuilder().modality(Modality.CONFOCAL).excitationWavelength(0.488).pinholeAiryUnits(1).build();

	static Volume psf(final Optics o, final int nxy, final int nz) {
		return PsfModels.get("born-wolf").compute(o, new PsfGrid(nxy, nxy, nz, 0.1, 0.1, 0.2));
	}

	@Test
	void thePsfsShapeChoosesTheLevel() {
		// ±1 µm of defocus at NA 1.4 in oil: a cone of about 2.4 µm radius, held by a 7.7 µm box
		// a widefield PSF of ±2 µm in a 1.1 µm box: the box cuts the cone, so its outer planes keep little light
		final Volume wide = psf(WIDEFIELD, 77, 11), conf = psf(CONFOCAL, 77, 11), cut = psf(WIDEFIELD, 11, 21);
		final double[] sums = org.parfocal.psf.PsfExtent.planeSums(cut);
		assertTrue(sums[0] < 0.25 * sums[10], "the cut PSF's outer planes look faded: only the lateral edge tells it from a confocal one");
		assertFalse(Preprocessing.fadesOutOfFocus(wide), "widefield, cone held");
		assertTrue(Preprocessing.fadesOutOfFocus(conf), "confocal");
		assertFalse(Preprocessing.fadesOutOfFocus(cut), "widefield cut laterally");
		assertSame(Level.DARK, Preprocessing.forPsf(Level.BY_PSF, wide));
		assertSame(Level.DARK_OR_MEDIAN, Preprocessing.forPsf(Level.BY_PSF, conf));
		assertSame(Level.DARK, Preprocessing.forPsf(Level.BY_PSF, cut));
		assertSame(Level.DARK, Preprocessing.forPsf(Level.BY_PSF, psf(CONFOCAL, 77, 1)), "a 2D PSF cannot tell");
		assertSame(Level.ESTIMATED, Preprocessing.forPsf(Level.ESTIMATED, conf), "other levels as given");
	}

	@Test
	void macroWordsReadBack() {
		for (final Level l : new Level[] { Level.BY_PSF, Level.DARK_OR_MEDIAN }) assertEquals(l, Level.parse("background", l.macroValue(), true));
		assertEquals("by-psf", DefaultRun.BACKGROUND);
		assertEquals(Level.BY_PSF, Level.parse("background", DefaultRun.BACKGROUND, true));
	}

	/**
	 * A confocal recording on a background sloping from 4 to 16 photons: dark-or-median is the larger of the two
	 * estimates (the darkest region sits near the slope's low end); the whole-stack run and the block-wise levels agree.
	 */
	@Test
	void darkOrMedianIsTheLargerAndBlocksAgree() throws Exception {
		final int nx = 48, ny = 48, nz = 16;
		final Volume truth = Synthetic.smoothCell(5, nx, ny, nz, 0f, 12);
		final float[] t = truth.data();
		float max = 0;
		for (final float v : t) max = Math.max(max, v);
		// a floor of 0.01 photons keeps the FFT's rounding of the blurred object (about 1e-5 below 0) non-negative
		for (int i = 0; i < t.length; i++) t[i] = t[i] * 200f / max + 0.01f;
		final Volume psf = psf(CONFOCAL, 31, 11);
		final Volume rec0 = new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.ZERO, true, 0, 1, 9, 100)).record(truth, Monitor.NONE);
		final float[] r = rec0.data();
		final java.util.Random rnd = new java.util.Random(4);
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++) {
					final double b = 4 + 12.0 * x / (nx - 1);
					// Poisson background by inversion of the cumulative distribution (small means)
					double u = rnd.nextDouble(), p = Math.exp(-b), c = p;
					int k = 0;
					while (u > c) { k++; p *= b / k; c += p; }
					r[x + nx * (y + ny * z)] += k;
				}
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 1).withOffset(Level.of(100));
		final double dark = Deconvolution.run(rec0, psf, o.withBackground(Level.DARK), Monitor.NONE).background();
		final double median = Deconvolution.run(rec0, psf, o.withBackground(Level.ESTIMATED), Monitor.NONE).background();
		final DeconvolutionResult by = Deconvolution.run(rec0, psf, o.withBackground(Level.BY_PSF), Monitor.NONE);
		assertTrue(median > dark, "on a slope the darkest region sits below the median: " + dark + " vs " + median);
		assertEquals(Math.max(dark, median), by.background(), 0);
		assertTrue(by.notes().stream().anyMatch(n -> n.contains("the larger of the darkest region") && n.contains("sigma-clipped median,")), by.notes().toString());
		assertTrue(by.notes().stream().anyMatch(n -> n.startsWith("Background by the PSF: its light fades")), "the Log says why: " + by.notes());
		final BlockDeconvolution.Levels l = BlockDeconvolution.levels(BlockSource.of(rec0), psf, o.withBackground(Level.BY_PSF), null);
		assertEquals(by.background(), l.background(), 1e-9 * by.background(), "block-wise levels");
		assertTrue(l.notes().stream().anyMatch(n -> n.startsWith("Background by the PSF: its light fades")), "block-wise Log says why: " + l.notes());
	}
}
