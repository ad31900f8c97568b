package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.testing.TestVolumes;

class ReblurConsistencyTest {

	private static final Volume TRUTH = SharpScenes.cell2D(21, 160, 160);
	private static final Volume PSF = SharpScenes.gaussian(2.0, 0, false);

	/**
	 * Model property (from memory: Poisson mean = variance, Gaussian read noise adds σ²): for data simulated
	 * exactly from the model (Acquisition) and the true object, r has unit variance and independent voxels, so
	 * mean χ² = 1 and the lag-1 autocorrelation is 0. With n = 25600 voxels the standard error of the mean χ² is
	 * about √(2/n) ≈ 0.009 and that of the autocorrelation 1/√n ≈ 0.006: tolerances 0.05 and 0.03.
	 */
	@Test
	void dataSimulatedFromTheModelGiveChiSquareOneAndWhiteResiduals() {
		for (final double photons : new double[] { 1, 4 }) {
			final double b = 6;
			final Volume y = new Acquisition(PSF, TRUTH.shape(), new Acquisition.Options(Boundary.MIRROR, false, b, photons, 99, 0)).record(TRUTH, Monitor.NONE);
			final ConvolutionOperator h = ConvolutionOperator.create(PSF, TRUTH, Boundary.MIRROR);
			final ReblurConsistency.Result r = ReblurConsistency.evaluate(y, TRUTH, h, new ReblurConsistency.NoiseModel(photons, 0, b, 0), 0);
			assertEquals(1, r.meanChiSquare(), 0.05, "photons " + photons + ": " + r);
			assertEquals(0, r.lag1()[0], 0.03, r.toString());
			assertEquals(0, r.lag1()[1], 0.03, r.toString());
			assertTrue(Double.isNaN(r.lag1()[2]), "2D has no z lag");
			assertEquals(160L * 160, r.voxels());
		}
	}

	/** Same with Gaussian read noise σ = 3 and a camera offset 100 added to the simulated counts. */
	@Test
	void readNoiseAndOffsetAreModelled() {
		final Volume y = new Acquisition(PSF, TRUTH.shape(), new Acquisition.Options(Boundary.MIRROR, false, 2, 1, 5, 100)).record(TRUTH, Monitor.NONE);
		final Random rnd = new Random(8);
		for (int i = 0; i < y.size(); i++) y.data()[i] += (float) (3 * rnd.nextGaussian());
		final ConvolutionOperator h = ConvolutionOperator.create(PSF, TRUTH, Boundary.MIRROR);
		final ReblurConsistency.Result r = ReblurConsistency.evaluate(y, TRUTH, h, new ReblurConsistency.NoiseModel(1, 3, 2, 100), 2);
		assertEquals(1, r.meanChiSquare(), 0.05, r.toString());
		assertEquals(0, r.whiteness(), 0.03, r.toString());
		// ignoring the read noise overstates χ² by about (mean + 9)/mean
		assertTrue(ReblurConsistency.evaluate(y, TRUTH, h, new ReblurConsistency.NoiseModel(1, 0, 2, 100), 2).meanChiSquare() > 1.2);
	}

	/**
	 * A camera (gain g = 2.5 units per photon, read noise 4 units, offset 100, values rounded to integers) whose
	 * noise model is estimated from the recording itself ({@code CameraNoise}, Foi et al. 2008): with
	 * {@link ReblurConsistency.NoiseModel#fromCamera} the true object's mean χ² is 1 within a few % (E[r²] = 1 by
	 * construction of the standardised residual; standard error about √(2/n) ≈ 0.01 here, and the gain estimate's
	 * own error; measured 1.034 with the estimated gain 2.35), while the photon-count assumption (1 photon per unit) inflates it about g-fold.
	 */
	@Test
	void noiseModelEstimatedFromACameraRecordingGivesChiSquareOne() {
		final double g = 2.5, sigma = 4, offset = 100, b = 6;
		final Volume photons = new Acquisition(PSF, TRUTH.shape(), new Acquisition.Options(Boundary.MIRROR, false, b, 1, 31, 0)).record(TRUTH, Monitor.NONE);
		final Random rnd = new Random(32);
		final float[] d = photons.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) Math.rint(g * d[i] + sigma * rnd.nextGaussian() + offset);
		final org.parfocal.core.CameraNoise camera = org.parfocal.core.CameraNoise.estimate(photons, offset);
		final Volume x = TRUTH.copy();
		for (int i = 0; i < x.data().length; i++) x.data()[i] *= (float) g;
		final ConvolutionOperator h = ConvolutionOperator.create(PSF, TRUTH, Boundary.MIRROR);
		final ReblurConsistency.Result r = ReblurConsistency.evaluate(photons, x, h, ReblurConsistency.NoiseModel.fromCamera(camera, g * b, offset), 2);
		assertEquals(1, r.meanChiSquare(), 0.05, r + " with " + camera.describe());
		final double counts = ReblurConsistency.evaluate(photons, x, h, new ReblurConsistency.NoiseModel(1, 0, g * b, offset), 2).meanChiSquare();
		assertTrue(counts > 2, "photon counts assumed: chi2 " + counts);
	}

	/**
	 * A background rising along x (5 to 45, as {@code background=fit-smooth} models one): with the map the true
	 * object's χ² is 1 (E[r²] = 1, Poisson mean = variance); with only its mean as a constant it is well above.
	 */
	@Test
	void aVaryingBackgroundMapIsModelled() {
		final ConvolutionOperator h = ConvolutionOperator.create(PSF, TRUTH, Boundary.MIRROR);
		final Volume mean = h.apply(TRUTH);
		final float[] map = new float[mean.data().length];
		for (int i = 0; i < map.length; i++) {
			map[i] = (float) (5 + 40.0 * (i % TRUTH.nx()) / (TRUTH.nx() - 1));
			mean.data()[i] = Math.max(0, mean.data()[i]) + map[i];
		}
		final Volume y = org.parfocal.core.Noise.poisson(mean, 1, 41);
		final ReblurConsistency.Result r = ReblurConsistency.evaluate(y, TRUTH, h, ReblurConsistency.NoiseModel.photonCounts(0), 2, map);
		assertEquals(1, r.meanChiSquare(), 0.05, r.toString());
		assertTrue(ReblurConsistency.evaluate(y, TRUTH, h, ReblurConsistency.NoiseModel.photonCounts(25), 2).meanChiSquare() > 1.5);
	}

	/**
	 * An estimate that is still blurred (truth convolved with a further σ = 2 Gaussian) leaves structure in the
	 * residual: χ² ≫ 1 and positively correlated neighbours (at 50 photons per unit, where the structure lost is
	 * well above the shot noise). An estimate that reproduces the data exactly (H = I, x = y) fits the noise: χ² = 0.
	 */
	@Test
	void tooBlurredEstimateIsInconsistentAndExactFitIsBelowOne() {
		final Volume y = new Acquisition(PSF, TRUTH.shape(), new Acquisition.Options(Boundary.MIRROR, false, 6, 50, 3, 0)).record(TRUTH, Monitor.NONE);
		final ConvolutionOperator h = ConvolutionOperator.create(PSF, TRUTH, Boundary.MIRROR);
		final ReblurConsistency.NoiseModel model = new ReblurConsistency.NoiseModel(50, 0, 6, 0);
		final ReblurConsistency.Result truth = ReblurConsistency.evaluate(y, TRUTH, h, model, 0);
		assertEquals(1, truth.meanChiSquare(), 0.05, truth.toString());
		final ReblurConsistency.Result blurred = ReblurConsistency.evaluate(y, SharpScenes.blur(TRUTH, 2, 0), h, model, 0);
		assertTrue(blurred.meanChiSquare() > 3, blurred.toString());
		assertTrue(blurred.whiteness() > 0.2, blurred.toString());
		final Volume delta = Volume.zeros(1, 1, 1, null);
		delta.data()[0] = 1;
		final Volume yMinusB = y.copy();
		for (int i = 0; i < yMinusB.size(); i++) yMinusB.data()[i] -= 6;
		final ReblurConsistency.Result exact = ReblurConsistency.evaluate(y, yMinusB, ConvolutionOperator.create(delta, y, Boundary.ZERO),
				ReblurConsistency.NoiseModel.photonCounts(6), 0);
		assertEquals(0, exact.meanChiSquare(), 1e-9);
	}

	/** 3D, with a margin; 1 and 2 threads agree (fixed-block sums); inputs are not modified. */
	@Test
	void threeDThreadIndependentAndInputsUnchanged() {
		final Volume truth = SharpScenes.cell(4, 48, 40, 12, 1);
		final Volume psf = SharpScenes.gaussian(1.5, 1.2, true);
		final Volume y = new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.MIRROR, false, 3, 2, 1, 0)).record(truth, Monitor.NONE);
		final Volume y0 = y.copy(), t0 = truth.copy();
		final ConvolutionOperator h = ConvolutionOperator.create(psf, truth, Boundary.MIRROR);
		final ReblurConsistency.NoiseModel m = new ReblurConsistency.NoiseModel(2, 0, 3, 0);
		final ReblurConsistency.Result[] r = new ReblurConsistency.Result[2];
		Parallelization.runWithNumThreads(1, () -> r[0] = ReblurConsistency.evaluate(y, truth, h, m, 1));
		Parallelization.runWithNumThreads(2, () -> r[1] = ReblurConsistency.evaluate(y, truth, h, m, 1));
		assertEquals(r[0].meanChiSquare(), r[1].meanChiSquare(), 0);
		assertEquals(r[0].whiteness(), r[1].whiteness(), 0);
		assertEquals(1, r[0].meanChiSquare(), 0.06, r[0].toString());
		assertEquals(0, r[0].lag1()[2], 0.04, r[0].toString());
		assertEquals(46L * 38 * 10, r[0].voxels());
		assertEquals(y0, y);
		assertEquals(t0, truth);
	}

	@Test
	void badInputGivesOneLineMessages() {
		final ConvolutionOperator h = ConvolutionOperator.create(PSF, TRUTH, Boundary.MIRROR);
		final ReblurConsistency.NoiseModel m = ReblurConsistency.NoiseModel.photonCounts(0);
		TestVolumes.assertMessage("differ in size", () -> ReblurConsistency.evaluate(TRUTH, SharpScenes.cell2D(1, 100, 100), h, m, 0));
		TestVolumes.assertMessage("leaves nothing", () -> ReblurConsistency.evaluate(TRUTH, TRUTH, h, m, 80));
		TestVolumes.assertMessage("Photons per unit must be positive", () -> new ReblurConsistency.NoiseModel(0, 0, 0, 0));
	}
}
