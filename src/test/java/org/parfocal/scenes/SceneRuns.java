package org.parfocal.scenes;

import java.util.HashMap;
import java.util.List;
import java.util.Map;

import org.parfocal.core.Monitor;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;

/**
 * Deconvolution runs of the scene table, each made once and kept: the PSNR of every iterate against the truth
 * (so "best iteration" costs no extra run) and the run's result. Columns ask for runs by their options; two
 * columns that need the same run share it.
 */
public final class SceneRuns {

	/** PSNR (dB) of iterate i + 1 in {@code psnr[i]}, the final result and its notes. */
	public record Curve(double[] psnr, DeconvolutionResult result) {

		/** Index (0-based) of the best iterate. */
		public int bestIndex() {
			int b = 0;
			for (int i = 1; i < psnr.length; i++) if (psnr[i] > psnr[b]) b = i;
			return b;
		}

		public double best() { return psnr[bestIndex()]; }

		public double last() { return psnr[psnr.length - 1]; }

		/** PSNR after {@code n} iterations (the last if the run was shorter). */
		public double at(final int n) { return psnr[Math.min(n, psnr.length) - 1]; }
	}

	private final Map<String, Curve> cache = new HashMap<>();
	private int runs;

	/** The run of {@code options} on scene {@code s} (made on first use). */
	public Curve curve(final Scene s, final DeconvolutionOptions options) {
		return cache.computeIfAbsent(s.name() + " " + options, k -> {
			runs++;
			final double[] psnr = new double[options.iterations()];
			final int[] done = { 0 };
			final float[] buf = new float[s.truth().data().length];
			final DeconvolutionResult r = Deconvolution.run(s.recording(), s.psf(), options, null, Monitor.NONE, (rep, est) -> {
				est.copyTo(buf);
				psnr[done[0]++] = Score.psnr(buf, s);
			});
			if (done[0] == 0) return new Curve(new double[] { Score.psnr(r.estimate(), s) }, r); // Wiener: no iterations
			return new Curve(done[0] == psnr.length ? psnr : java.util.Arrays.copyOf(psnr, done[0]), r);
		});
	}

	/** The best curve among {@code options} by best iterate. */
	public Curve best(final Scene s, final List<DeconvolutionOptions> options) {
		Curve best = null;
		for (final DeconvolutionOptions o : options) {
			final Curve c = curve(s, o);
			if (best == null || c.best() > best.best()) best = c;
		}
		return best;
	}

	/** Runs made so far. */
	public int count() { return runs; }

	/** Forgets the runs of one scene (they hold images). */
	public void forget(final Scene s) {
		cache.keySet().removeIf(k -> k.startsWith(s.name() + " "));
	}
}
