package org.parfocal.blind;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.apache.commons.math3.stat.inference.TTest;
import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Level;
import org.parfocal.demo.SampleScene;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;

/**
 * The widefield shape of a Gaussian start, the model choice between it and the Gaussian, and the paired test of
 * the refinement. References: the Airy pattern's FWHM (0.5145·λ/NA, Born &amp; Wolf §8.5.2, from memory), the
 * widefield formulas the shape is defined by (algebra), Commons Math's {@link TTest#pairedT}, and the truth of
 * small simulations of our own (the invented cell, Poisson noise).
 */
class ModelChoiceTest {

	static final VoxelSize V = SampleScene.VOXEL;

	/**
	 * The optics of a widefield shape reproduce its nominal widths by the two formulas it is defined by, and the
	 * Born &amp; Wolf PSF made from them has the Airy disc's lateral FWHM, 0.5145·λ/NA (within 4 % at 80 nm
	 * voxels; the formula's 0.51 is 0.9 % below it).
	 */
	@Test
	void widefieldShapeHasTheNominalWidths() {
		for (final double[] w : new double[][] { { 0.22, 0.7 }, { 0.3, 1.4 }, { 0.18, 0.45 } }) {
			final Optics o = ModelFit.widefieldOptics(w[0], w[1]);
			final double lambda = o.emissionWavelength(), na = o.na(), n = o.immersionIndex();
			assertEquals(w[0], 0.51 * lambda / na, 1e-9 * w[0], "lateral formula");
			assertEquals(w[1], 0.88 * lambda / (n - Math.sqrt(n * n - na * na)), 1e-9 * w[1], "axial formula");
		}
		final ModelFit.Space s = ModelFit.widefieldShape(0.25, 0.8, true);
		final Volume p = s.psf(s.start(), new PsfGrid(41, 41, 31, V.dx(), V.dy(), V.dz()));
		final Optics o = s.optics(s.start());
		assertEquals(0.5145 * o.emissionWavelength() / o.na(), Fwhm.lateral(p.withVoxelSize(V)), 0.04 * 0.25, "Airy FWHM");
		assertEquals(1, p.sum(), 1e-5);
	}

	/** The per-row held-out log-likelihoods of the paired test add up to the score they belong to (direct summation). */
	@Test
	void heldOutRowsAddUpToTheScore() {
		final int[] box = { 9, 9, 7 };
		final Volume truth = SampleScene.cell(24, 24, 10, 3);
		final Volume psf = BlindDeconvolution.gaussian(box, new double[] { V.dx(), V.dy(), V.dz() }, 0.3, 0.8).withVoxelSize(V);
		final Volume rec = record(psf, truth);
		final float[] y = rec.data().clone();
		for (int i = 0; i < y.length; i++) y[i] = Math.max(0, y[i]);
		final float[][] halves = ModelFit.split(y, 1);
		final ModelFit.Score sc = ModelFit.peakHeldOutRows(ModelFit.solver(psf, rec.shape(), org.parfocal.deconv.EdgeMode.NON_CIRCULANT, halves, 3, 0), 60, () -> {});
		assertEquals(24 * 10, sc.rows().length);
		double sum = 0;
		for (final double v : sc.rows()) sum += v;
		assertEquals(sc.value(), sum, 1e-9 * Math.abs(sum));
		assertEquals(0, ModelFit.pairedT(sc.rows(), sc.rows()), 0, "no difference, t = 0");
	}

	/** The paired t over blocks of rows equals Commons Math's paired t of the block sums. */
	@Test
	void pairedTestMatchesCommonsMath() {
		final SplittableRandom r = new SplittableRandom(5);
		final int rows = 203;
		final double[] a = new double[rows], b = new double[rows];
		for (int i = 0; i < rows; i++) {
			a[i] = -100 + 10 * r.nextDouble();
			b[i] = a[i] + 0.3 + r.nextGaussian();
		}
		final int nb = (rows + ModelFit.TEST_BLOCK_ROWS - 1) / ModelFit.TEST_BLOCK_ROWS;
		final double[] sa = new double[nb], sb = new double[nb];
		for (int i = 0; i < rows; i++) {
			sa[i / ModelFit.TEST_BLOCK_ROWS] += a[i];
			sb[i / ModelFit.TEST_BLOCK_ROWS] += b[i];
		}
		assertEquals(new TTest().pairedT(sb, sa), ModelFit.pairedT(a, b), 1e-9);
		assertTrue(ModelFit.pairedT(a, b) > 2, "a steady gain is significant");
		assertTrue(ModelFit.pairedT(b, a) < -2);
	}

	/**
	 * On a recording through a widefield PSF (the project's Born &amp; Wolf model of the invented water objective,
	 * 1.2 NA, 520 nm), a Gaussian start 20 % too narrow fits the widefield shape by default, whose PSF comes
	 * within 10 % laterally and 12 % axially of the true PSF's FWHM (the simulation's truth; measured −8 % / −9 %
	 * on this small dim scene, the search converged: 40 candidates give the same widths). On a recording
	 * through a Gaussian PSF, choosing by the held-out likelihood keeps the Gaussian.
	 */
	@Test
	void gaussianStartFitsTheWidefieldShapeAndTheChoiceKeepsAGaussianForAGaussianRecording() {
		final int[] box = { 15, 15, 11 };
		final Volume truth = SampleScene.cell(32, 32, 12, 7);
		final Optics water = BlindScenes.optics().toBuilder().immersionIndex(1.333).sampleIndex(1.333).depth(0).build();
		final Volume wide = org.parfocal.psf.PsfModels.get("born-wolf").compute(water, new PsfGrid(box[0], box[1], box[2], V.dx(), V.dy(), V.dz())).withVoxelSize(V);
		final double fx = Fwhm.lateral(wide), fz = Fwhm.axial(wide);
		final ModelFit.Settings fast = new ModelFit.Settings(100, 20, 0, false);
		final BlindOptions o = BlindOptions.of(PsfStart.gaussian(0.8 * fx, 0.8 * fz), null).withBackground(Level.of(3)).withRegularization(0, 0).withIterations(5)
				.withSnapshotInterval(5).withSupport(new SupportBox(box[0], box[1], box[2]));
		final BlindResult r = BlindDeconvolution.run(record(wide, truth), o, FitPlan.model().withSettings(fast), Monitor.NONE, null);
		System.out.printf(java.util.Locale.ROOT, "%s FWHM %.4f x %.4f (true %.4f x %.4f)%n", r.fit().summary(), Fwhm.lateral(r.psf()), Fwhm.axial(r.psf()), fx, fz);
		assertEquals(ModelFit.WIDEFIELD_SHAPE, r.fit().model());
		assertEquals(fx, Fwhm.lateral(r.psf()), 0.10 * fx, "lateral FWHM of the widefield shape's fit");
		assertEquals(fz, Fwhm.axial(r.psf()), 0.12 * fz, "axial FWHM of the widefield shape's fit");

		final Volume gauss = BlindDeconvolution.gaussian(box, new double[] { V.dx(), V.dy(), V.dz() }, fx, fz).withVoxelSize(V);
		final BlindResult c = BlindDeconvolution.run(record(gauss, truth), o.withStart(PsfStart.gaussian(fx, fz)),
				FitPlan.model().withSettings(new ModelFit.Settings(100, 8, 0, false)).withGaussianStart(FitPlan.GaussianStart.BY_HELD_OUT), Monitor.NONE, null);
		System.out.println(c.notes().stream().filter(s -> s.startsWith("Model choice")).findFirst().orElse("?"));
		assertEquals("gaussian", c.fit().model(), "model kept for a Gaussian recording");
	}

	private static Volume record(final Volume psf, final Volume truth) {
		return new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.ZERO, true, 3, 1, 13, 0)).record(truth, Monitor.NONE);
	}
}
