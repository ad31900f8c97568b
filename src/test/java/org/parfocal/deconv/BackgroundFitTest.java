package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;

import net.imglib2.parallel.Parallelization;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Noise;
import org.parfocal.core.Volume;

/**
 * {@code background=fit}: the EM step of a constant background (Shepp &amp; Vardi 1982, Lange &amp; Carson 1984)
 * against the truth of a seeded simulation y = Poisson(h∗x + b).
 */
class BackgroundFitTest {

	static final double B = 20;

	/** Sparse spots and filaments on no background, blurred, plus b, Poisson noise (1 photon per unit). */
	static Volume recording(final long seed) {
		final Volume x = Synthetic.smoothCell(seed, 48, 48, 16, 0f, 30);
		final Volume h = Synthetic.gaussianPsf(11, 11, 9, 1.5, 1.5, 1.2);
		final Volume blurred = ConvolutionOperator.create(h, x, Boundary.MIRROR).apply(x);
		final float[] d = blurred.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) Math.max(0, d[i]) + (float) B;
		return Noise.poisson(blurred, 1, seed + 1);
	}

	static Volume psf() {
		return Synthetic.gaussianPsf(11, 11, 9, 1.5, 1.5, 1.2);
	}

	@Test
	void stepIsTheEmRatio() {
		// the EM fixed point: b·mean(y/(Hx + b)); a mean ratio of 1 leaves b as it is (Shepp & Vardi 1982)
		assertEquals(12.0, BackgroundFit.step(10, 1.2 * 500, 500), 1e-12);
		// a constant fit on a grid of one node: its weight is the number of unmasked voxels
		final float[] y = { 1, Float.NaN, 3, 4 };
		final BackgroundFit one = new BackgroundFit(2, 1, 1, 1, 4, 1, 1, y);
		one.update(new double[] { 4.5 });
		assertEquals(3.0, one.value(), 1e-12);
		assertEquals(10.0, BackgroundFit.step(10, 500, 500), 1e-12);
		assertEquals(0.0, BackgroundFit.step(0, 800, 500), 0);
	}

	@Test
	void recoversAKnownConstantBackground() {
		final Volume y = recording(7);
		for (final DeconvolutionMethod m : DeconvolutionMethod.values()) {
			if (m == DeconvolutionMethod.WIENER) continue;
			final DeconvolutionOptions o = DeconvolutionOptions.of(m, 30).withBackground(Level.FIT);
			final DeconvolutionResult r = Deconvolution.run(y, psf(), o, Monitor.NONE);
			// the simulation's truth: b = 20 photons per voxel. The fit drifts low as RL fits the noise (the object,
			// kept ≥ 0, takes up the background's upward fluctuations): measured −5 to −10 % after 30 iterations here,
			// more with more iterations (see BackgroundFit)
			assertEquals(B, r.background(), 0.1 * B, m + ": fitted background");
			assertTrue(r.notes().stream().anyMatch(n -> n.startsWith("Background fitted with the object")), m + ": " + r.notes());
		}
	}

	/**
	 * fit-smooth: a background rising linearly along x from 10 to 30 photons (which the piecewise-linear grid
	 * holds exactly) is recovered node by node: the x nodes at 10, 20 and 30 (truth of the simulation), within
	 * the fit's known low drift (see BackgroundFit); a fit started from the whole image's darkest region would
	 * give about 6, 11, 15 (the object soaks up the rest), hence the local starts.
	 */
	@Test
	void recoversASlowlyVaryingBackground() {
		final Volume x = Synthetic.smoothCell(5, 48, 48, 16, 0f, 30);
		final Volume blurred = ConvolutionOperator.create(psf(), x, Boundary.MIRROR).apply(x);
		final float[] d = blurred.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) Math.max(0, d[i]) + (float) (10 + 20.0 * (i % 48) / 47);
		final Volume y = Noise.poisson(blurred, 1, 6);
		final Preprocessing.Data data = Preprocessing.data(y, Level.NONE, Level.FIT_SMOOTH);
		final BackgroundFit fit = BackgroundFit.forLevel(Level.FIT_SMOOTH, data.background(), 48, 48, 16, data.y());
		final RichardsonLucySolver s = new RichardsonLucySolver(psf(), y.shape(), EdgeMode.NON_CIRCULANT, data.y(), data.background(), DeconvolutionMethod.RL, 0,
				null, fit);
		for (int it = 0; it < 30; it++) s.iterate(() -> {});
		final double[] nodes = fit.nodes(); // 3 x 3 x 2, x fastest
		for (int cx = 0; cx < 3; cx++) {
			double mean = 0;
			for (int c = cx; c < nodes.length; c += 3) mean += nodes[c] / 6;
			// measured 8.4, 17.5, 27.2: the drift of the constant fit (about 2 photons low after 30 iterations), no tilt
			assertEquals(10 + 10 * cx - 1.5, mean, 2, "node column " + cx + " of " + java.util.Arrays.toString(nodes));
		}
		assertEquals(20, fit.value(), 0.15 * 20, "mean background");
		assertTrue(fit.describe().startsWith("Slowly varying background fitted"), fit.describe());
	}

	@Test
	void fitDoesNotDependOnTheThreadCount() {
		final Volume y = recording(11);
		for (final Level level : new Level[] { Level.FIT, Level.FIT_SMOOTH }) {
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 15).withBackground(level);
		final DeconvolutionResult one = Parallelization.runWithNumThreads(1, () -> Deconvolution.run(y, psf(), o, Monitor.NONE));
		final DeconvolutionResult two = Parallelization.runWithNumThreads(3, () -> Deconvolution.run(y, psf(), o, Monitor.NONE));
		assertEquals(one.background(), two.background(), 1e-5 * one.background());
		final float[] a = one.estimate().data(), b = two.estimate().data();
		float max = 0, diff = 0;
		for (int i = 0; i < a.length; i++) { max = Math.max(max, Math.abs(a[i])); diff = Math.max(diff, Math.abs(a[i] - b[i])); }
		assertTrue(diff <= 1e-5 * max, level + ", 1 vs 3 threads: " + diff + " of " + max);
		}
	}
}
