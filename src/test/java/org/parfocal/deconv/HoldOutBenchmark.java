package org.parfocal.deconv;

import java.util.Locale;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;

/**
 * Benchmark (not a unit test) of what the held-out stop ({@link HoldOutStop}) costs, every figure measured in the
 * same run and printed as a ratio to one full-data iteration of the same method: the seconds per evaluated
 * iteration of the split runs for the default rule (band criterion, two folds) and for the likelihood criterion
 * with one fold (the rule before it), and the whole default run (split runs plus the full-data run) against the
 * full-data run alone. Scene: an invented cell on a 32×160×160 stack, Gaussian PSF 15×15×11, Poisson noise,
 * integer counts (so the camera noise model is estimated as in a real run). Run with
 * {@code bin/parfocal-bench held-out [repeats]}.
 */
public final class HoldOutBenchmark {

	public static void main(final String[] args) {
		final int repeats = args.length > 0 ? Integer.parseInt(args[0]) : 3;
		final Volume truth = Synthetic.smoothCell(32, 160, 160, 30, 1f, 11);
		final float[] t = truth.data();
		float max = 0;
		for (final float v : t) max = Math.max(max, v);
		for (int i = 0; i < t.length; i++) t[i] *= 300f / max;
		final Volume psf = Synthetic.gaussianPsf(15, 15, 11, 1.8, 1.8, 1.6);
		final Volume rec = new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.ZERO, true, 4, 1, 7, 100)).record(truth, Monitor.NONE);
		final DeconvolutionOptions fixed = new DeconvolutionOptions(DeconvolutionMethod.RL_ACCELERATED, 30, 0, Stopping.FIXED, 0, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.of(4));
		final DeconvolutionOptions held = new DeconvolutionOptions(DeconvolutionMethod.RL_ACCELERATED, DefaultRun.CAP, 0, Stopping.HELD_OUT, 0, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.of(4));
		final HoldOutStop.Rule old = HoldOutStop.Rule.likelihood(1, 1);
		double full = Double.MAX_VALUE, band = Double.MAX_VALUE, lik = Double.MAX_VALUE, whole = Double.MAX_VALUE;
		HoldOutStop.Result hb = null, hl = null;
		for (int r = 0; r <= repeats; r++) { // the first pass warms the JIT and is not counted
			long t0 = System.nanoTime();
			Deconvolution.run(rec, psf, fixed, Monitor.NONE);
			final double f = (System.nanoTime() - t0) * 1e-9 / fixed.iterations();
			t0 = System.nanoTime();
			hb = HoldOutStop.suggest(rec, psf, held, Monitor.NONE);
			final double b = (System.nanoTime() - t0) * 1e-9 / hb.evaluated();
			t0 = System.nanoTime();
			hl = HoldOutStop.suggest(rec, psf, held, Monitor.NONE, old);
			final double l = (System.nanoTime() - t0) * 1e-9 / hl.evaluated();
			t0 = System.nanoTime();
			final DeconvolutionResult d = Deconvolution.run(rec, psf, held, Monitor.NONE);
			final double w = (System.nanoTime() - t0) * 1e-9 / d.iterations();
			if (r == 0) continue;
			full = Math.min(full, f);
			band = Math.min(band, b);
			lik = Math.min(lik, l);
			whole = Math.min(whole, w);
		}
		System.out.printf(Locale.ROOT, "Held-out stop cost, accelerated RL, 32x160x160, %d cores, best of %d%n", Runtime.getRuntime().availableProcessors(), repeats);
		System.out.printf(Locale.ROOT, "  one full-data iteration                        %.4f s (baseline)%n", full);
		System.out.printf(Locale.ROOT, "  split iteration, band criterion, two folds     %.2f x  (k* %d of %d evaluated)%n", band / full, hb.peak(), hb.evaluated());
		System.out.printf(Locale.ROOT, "  split iteration, likelihood, one fold          %.2f x  (k* %d of %d evaluated)%n", lik / full, hl.peak(), hl.evaluated());
		System.out.printf(Locale.ROOT, "  default run (split runs + full run) per full-data iteration  %.2f x%n", whole / full);
	}
}
