package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.parfocal.blind.BlindDeconvolution;
import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.BlindResult;
import org.parfocal.blind.PsfStart;
import org.parfocal.blind.SupportBox;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.demo.SampleScene;

/**
 * The blind watch against the fixed-PSF watch ({@link QualityWatch}, itself checked in {@link QualityWatchTest})
 * and against a direct {@link ReblurConsistency} evaluation, on our own synthetic data: a small sample-scene cell
 * (32 x 32 x 8), Gaussian PSF, Poisson noise at 0.05 photons per unit, background 3, offset 100; references are
 * three other unblurred cells of the scene.
 */
class BlindQualityWatchTest {

	private static final Volume TRUTH = SampleScene.cell(32, 32, 8, 7);
	private static final Volume PSF = SampleScene.gaussianPsf(9, 9, 5);
	private static final double PHOTONS = 0.05, BACKGROUND = 3, OFFSET = 100;
	private static final Volume RECORDING = new Acquisition(PSF, TRUTH.shape(), new Acquisition.Options(Boundary.MIRROR, true, BACKGROUND, PHOTONS, 5, OFFSET))
			.record(TRUTH, Monitor.NONE);

	private static ReferenceComparison.References references() {
		final List<Volume> refs = new ArrayList<>();
		for (int i = 0; i < 3; i++) refs.add(SampleScene.cell(32, 32, 8, 100 + i));
		return ReferenceComparison.prepare(refs, TRUTH, ReferenceComparison.Options.defaults().withCounts(2048, 8192, 0), Monitor.NONE);
	}

	private static BlindQualityWatch.Recording recording() {
		return new BlindQualityWatch.Recording(RECORDING, false, OFFSET, BACKGROUND, PHOTONS, 0);
	}

	private static BlindOptions blind(final int iterations, final int psfUpdates, final PsfStart start) {
		return new BlindOptions(iterations, 1, psfUpdates, 0, 0, start, new SupportBox(9, 9, 5), false, false, false, null, 1, EdgeMode.NON_CIRCULANT,
				Level.of(OFFSET), Level.of(BACKGROUND));
	}

	/**
	 * With the PSF kept (0 PSF updates) blind deconvolution is plain Richardson–Lucy bit for bit (documented in
	 * {@link BlindDeconvolution}), so the blind watch must give the fixed-PSF watch's points and suggestion.
	 */
	@Test
	void withThePsfKeptItAgreesWithTheFixedPsfWatch() {
		final ReferenceComparison.References refs = references();
		final BlindQualityWatch bw = new BlindQualityWatch(refs, recording(), 4, false, RECORDING.voxelSize());
		BlindDeconvolution.run(RECORDING, blind(24, 0, PsfStart.given(PSF)), Monitor.NONE, bw);
		final QualityWatch qw = new QualityWatch(refs, QualityWatch.Consistency.forDeconvolution(RECORDING, PSF, false, OFFSET, BACKGROUND, PHOTONS, 0), 4,
				false, RECORDING.voxelSize());
		Deconvolution.run(RECORDING, PSF, DeconvolutionOptions.of(DeconvolutionMethod.RL, 24).withOffset(Level.of(OFFSET)).withBackground(Level.of(BACKGROUND)),
				null, Monitor.NONE, qw);
		assertEquals(6, bw.points().size());
		assertEquals(qw.points().size(), bw.points().size());
		for (int i = 0; i < qw.points().size(); i++) {
			final StoppingRule.Point a = qw.points().get(i), b = bw.points().get(i);
			assertEquals(a.iteration(), b.iteration());
			assertEquals(a.distance(), b.distance(), 1e-9 * Math.abs(a.distance()), "distance at " + a.iteration());
			assertEquals(a.chiSquare(), b.chiSquare(), 1e-6 * a.chiSquare(), "chi-square at " + a.iteration());
			assertEquals(a.whiteness(), b.whiteness(), 1e-6, "whiteness at " + a.iteration());
		}
		assertEquals(qw.suggestion().iteration(), bw.suggestion().iteration());
		System.out.println("Blind watch, PSF kept: suggested " + bw.suggestion().iteration() + " = fixed-PSF watch's " + qw.suggestion().iteration());
		assertEquals(qw.floor(), bw.floor());
	}

	/**
	 * With PSF updates the χ² is that of the object re-blurred with the PSF of the same iteration: at the last
	 * iteration it equals a direct evaluation with the run's final object and PSF, and differs from one with the
	 * starting PSF. With keepBest, the kept object and PSF are those of a run stopped at the suggested iteration.
	 */
	@Test
	void usesTheCurrentPsfAndKeepsTheSuggestedIterate() {
		final PsfStart start = PsfStart.gaussian(0.3, 0.8);
		final Volume image = RECORDING.withVoxelSize(SampleScene.VOXEL);
		final BlindQualityWatch.Recording rec = new BlindQualityWatch.Recording(image, false, OFFSET, BACKGROUND, PHOTONS, 0);
		final BlindQualityWatch w = new BlindQualityWatch(null, rec, 2, true, image.voxelSize());
		final BlindResult r = BlindDeconvolution.run(image, blind(10, 1, start), Monitor.NONE, w);
		final StoppingRule.Point last = w.points().get(w.points().size() - 1);
		assertEquals(10, last.iteration());
		final QualityWatch.Consistency withFinal = QualityWatch.Consistency.forDeconvolution(image, r.psf(), false, OFFSET, BACKGROUND, PHOTONS, 0);
		final double chi = ReblurConsistency.evaluate(image, r.estimate(), withFinal.operator(), withFinal.model(), withFinal.margin()).meanChiSquare();
		assertEquals(chi, last.chiSquare(), 1e-6 * chi, "chi-square with the current PSF");
		final Volume h0 = r.snapshots().get(0).psf();
		final QualityWatch.Consistency withStart = QualityWatch.Consistency.forDeconvolution(image, h0, false, OFFSET, BACKGROUND, PHOTONS, 0);
		final double chi0 = ReblurConsistency.evaluate(image, r.estimate(), withStart.operator(), withStart.model(), withStart.margin()).meanChiSquare();
		assertNotEquals(chi0, last.chiSquare(), 1e-3 * chi, "the starting PSF gives another chi-square");

		final int k = w.suggestion().iteration();
		System.out.println("Blind watch, chi-square only: suggested " + k + " (" + w.suggestion().reason() + "); chi2 with the final PSF " + chi + ", with the start "
				+ chi0);
		assertTrue(k >= 2 && k <= 10 && k % 2 == 0, "suggestion " + k);
		final BlindResult stopped = BlindDeconvolution.run(image, blind(k, 1, start), Monitor.NONE);
		assertArrayEquals(stopped.estimate().data(), w.best().data(), 0f, "kept object = run stopped at " + k);
		assertArrayEquals(stopped.psf().data(), w.bestPsf().data(), 0f, "kept PSF = run stopped at " + k);
	}

	@Test
	void badInputIsRefusedInOneLine() {
		assertEquals("Watch mode needs reference images or the recording (or both)",
				assertThrows(IllegalArgumentException.class, () -> new BlindQualityWatch(null, null, 1, false, RECORDING.voxelSize())).getMessage());
		assertTrue(assertThrows(IllegalArgumentException.class, () -> new BlindQualityWatch(null, recording(), 0, false, RECORDING.voxelSize())).getMessage()
				.startsWith("Evaluate every 1 to 10000 iterations"));
		assertTrue(assertThrows(IllegalArgumentException.class, () -> new BlindQualityWatch.Recording(RECORDING, false, OFFSET, BACKGROUND, 0, 0)).getMessage()
				.startsWith("Photons per unit must be positive"));
	}
}
