package org.parfocal.blind;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.RichardsonLucyEngine;

/**
 * The blind and the non-blind solvers are one engine ({@link RichardsonLucyEngine}): with the PSF held fixed,
 * blind deconvolution is non-blind Richardson–Lucy bit for bit on every edge mode, and the blind solver's one
 * shortcut (H x from the object's spectrum kept from the PSF step) agrees with the engine's convolution. The
 * scene is the seeded recording of {@link BlindScenes} (Poisson noise, seed 11).
 */
class OneEngineTest {

	private static final Volume PSF = BlindScenes.truePsfOn(new int[] { 15, 15, 9 });

	/** psf_updates=0 runs the engine's object step only: the same floats as Deconvolution (RL and RL-TV), 1 and 2 threads. */
	@Test
	void frozenPsfIsTheNonBlindEngineOnEveryEdgeMode() {
		for (final EdgeMode edges : EdgeMode.values())
			for (final double tv : new double[] { 0, 0.002 }) {
				final BlindOptions o = BlindOptions.of(PsfStart.given(PSF), BlindScenes.optics()).withBackground(Level.of(BlindScenes.BACKGROUND))
						.withSchedule(2, 0).withIterations(3).withRegularization(tv, 0).withEdges(edges);
				final DeconvolutionOptions d = DeconvolutionOptions.of(tv > 0 ? DeconvolutionMethod.RL_TV : DeconvolutionMethod.RL, 6).withRegularization(tv)
						.withBackground(Level.of(BlindScenes.BACKGROUND)).withEdges(edges);
				final float[] ref = Deconvolution.run(BlindScenes.RECORDED, PSF, d, Monitor.NONE).estimate().data();
				for (final int threads : new int[] { 1, 2 }) {
					final float[] blind = Parallelization.runWithNumThreads(threads,
							() -> BlindDeconvolution.run(BlindScenes.RECORDED, o, Monitor.NONE).estimate().data());
					assertArrayEquals(ref, blind, edges + ", TV weight " + tv + ", " + threads + " thread(s)");
				}
			}
	}

	/**
	 * After a PSF update the blind solver makes H x from the kept spectrum of x (one inverse transform); a
	 * solver given the same PSF and object convolves instead. The two object updates differ by float rounding
	 * only (≤ 1e-5 of the largest value; a wrong spectrum, scale or row would differ by far more).
	 */
	@Test
	void keptSpectrumAgreesWithTheEngineConvolution() {
		final Volume y = BlindScenes.RECORDED;
		for (final EdgeMode edges : EdgeMode.values()) {
			final int[] n = y.shape(), k = PSF.shape();
			final float[] data = y.data().clone();
			for (int i = 0; i < data.length; i++) data[i] = Math.max(0, data[i]); // the solver takes non-negative data
			final PsfConstraints none = new PsfConstraints(k[0], k[1], k[2], 1, 1, 1, null, false, false, PSF.data());
			final BlindSolver a = new BlindSolver(PSF, n, edges, data, BlindScenes.BACKGROUND, 0.002, 0, none);
			final BlindSolver b = new BlindSolver(PSF, n, edges, data, BlindScenes.BACKGROUND, 0.002, 0, none);
			for (int i = 0; i < 3; i++) a.objectUpdate(() -> {});
			a.psfUpdate(() -> {});
			b.replacePsf(a.psf().clone());
			b.setObject(a.objectCopy());
			final RichardsonLucyEngine.Step sa = a.objectUpdate(() -> {}), sb = b.objectUpdate(() -> {});
			final float[] xa = new float[data.length], xb = new float[data.length];
			a.crop(xa);
			b.crop(xb);
			double max = 0, diff = 0;
			for (int i = 0; i < xa.length; i++) {
				max = Math.max(max, Math.abs(xb[i]));
				diff = Math.max(diff, Math.abs(xa[i] - xb[i]));
			}
			assertTrue(max > 0 && diff <= 1e-5 * max, edges + ": kept-spectrum update differs by " + diff + " of " + max);
			assertEquals(sb.logLikelihood(), sa.logLikelihood(), 1e-6 * Math.abs(sb.logLikelihood()), edges + ": log-likelihood");
			assertEquals(sb.modelSum(), sa.modelSum(), 1e-6 * Math.abs(sb.modelSum()), edges + ": Σ Hx");
		}
	}
}
