package org.parfocal.deconv;

import java.io.IOException;
import java.io.PrintWriter;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;

import org.parfocal.core.CameraNoise;
import org.parfocal.core.Monitor;
import org.parfocal.core.PoissonThinning;
import org.parfocal.scenes.Scene;
import org.parfocal.scenes.SceneBenchmark;
import org.parfocal.scenes.SceneRuns;

/**
 * Experiment (not a unit test): for every scene, the held-out log-likelihood of every iterate of accelerated RL
 * on half the photons (no patience: all iterations up to the cap), per image row, beside the full data's PSNR
 * curve, written as CSV for an offline look at stopping rules. Usage: {@code StopCurves <scene dir> <out dir> [seeds]}.
 */
public final class StopCurves {

	public static void main(final String[] args) throws IOException {
		final Path dir = Path.of(args[0]), out = Path.of(args[1]);
		final int seeds = args.length > 2 ? Integer.parseInt(args[2]) : 1;
		Files.createDirectories(out);
		final String only = System.getenv("PARFOCAL_SCENES");
		final SceneRuns runs = new SceneRuns();
		try (var names = Files.list(dir)) {
			for (final String name : names.map(p -> p.getFileName().toString()).filter(f -> f.endsWith(".json")).map(f -> f.substring(0, f.length() - 5))
					.sorted().toList()) {
				if (only != null && !List.of(only.split(",")).contains(name)) continue;
				final Scene s = Scene.load(dir, name);
				for (final String bg : List.of("true", "dark")) {
					final Level b = bg.equals("true") ? SceneBenchmark.trueBackground(s) : SceneBenchmark.darkBackground(s);
					final DeconvolutionOptions o = SceneBenchmark.options(s, DeconvolutionMethod.RL_ACCELERATED, 100, 0, b);
					final SceneRuns.Curve c = runs.curve(s, o);
					for (int seed = 0; seed < seeds; seed++) write(out.resolve(name + "-" + bg + "-" + seed + ".csv"), s, o, c, seed);
					System.out.println(name + " " + bg + " done");
				}
				runs.forget(s);
			}
		}
	}

	private static void write(final Path f, final Scene s, final DeconvolutionOptions o, final SceneRuns.Curve c, final int seed) throws IOException {
		final int[] n = s.recording().shape();
		final Preprocessing.Psf p = Preprocessing.psf(s.psf(), n);
		final Preprocessing.Data d = Preprocessing.data(s.recording(), o.offset(), o.background());
		final float[] y = d.y();
		final CameraNoise cn = CameraNoise.estimate(s.recording(), d.offset());
		final double ph = cn.photonsPerUnit(), shift = cn.readNoise() > 0 ? cn.readNoise() * cn.readNoise() / cn.gain() : 0;
		final float[] shifted = new float[y.length];
		for (int i = 0; i < y.length; i++) shifted[i] = (float) (y[i] + shift);
		final float[][] halves = PoissonThinning.split(shifted, ph, HoldOutStop.SEED + seed, 1);
		final double bh = (d.background() + shift) * 0.5;
		final RichardsonLucySolver run = new RichardsonLucySolver(p.psf(), n, o.edges(), halves[0], bh, o.method(), o.regularization(), null);
		try (PrintWriter w = new PrintWriter(Files.newBufferedWriter(f))) {
			w.println("# input PSNR " + org.parfocal.scenes.Score.inputPsnr(s) + "; iteration, full-data PSNR (NaN at 0), held-out LL, then held-out LL per image row");
			for (int it = 0; it <= o.iterations(); it++) {
				if (it > 0) run.iterate(() -> {});
				final double ll = run.logLikelihoodOf(halves[1], bh);
				final double[] rows = run.rowLogLikelihoods();
				final StringBuilder sb = new StringBuilder();
				sb.append(it).append(',').append(it == 0 ? "NaN" : String.format(Locale.ROOT, "%.5f", c.at(it))).append(',')
						.append(String.format(Locale.ROOT, "%.6f", ll));
				for (final double r : rows) sb.append(',').append(String.format(Locale.ROOT, "%.5f", r));
				w.println(sb);
			}
		}
		Monitor.NONE.checkCancelled();
	}
}
