package org.parfocal.scenes;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.parfocal.core.Monitor;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.HoldOutStop;
import org.parfocal.deconv.Level;

/**
 * Columns of the scene table for issue 14's stopping and default-run items: the best iterate of each method
 * (cap {@link #CAP}), the held-out stop's suggestion ({@link HoldOutStop}) against it, the default run
 * (accelerated RL, held-out stop, cap {@link #CAP}, background {@code auto}), and the TV weight grid.
 * A held-out suggestion costs no extra full run: a fixed run of N iterations is the first N iterates of the
 * cap's run, so its PSNR is read off the cap's curve at the suggested count.
 */
final class StopColumns {

	private StopColumns() {}

	/** Cap of iterations of the default run and of the per-method curves. */
	static final int CAP = 100;
	/** TV weights of the weight grid. */
	static final double[] WEIGHTS = { 0.0005, 0.001, 0.002, 0.005, 0.01 };

	private static final Map<String, HoldOutStop.Result> SUGGESTIONS = new HashMap<>();

	static DeconvolutionOptions opts(final Scene s, final DeconvolutionMethod m, final double w, final Level b) {
		return SceneBenchmark.options(s, m, CAP, w, b);
	}

	/** The default rule's split run ({@link HoldOutStop#RULE}); its full-data count is {@link #defaultIterations}. */
	static HoldOutStop.Result held(final Scene s, final DeconvolutionOptions o) {
		return held(s, o, HoldOutStop.RULE);
	}

	/** Iterations the default rule gives the full data. */
	static int defaultIterations(final HoldOutStop.Result h) {
		return Math.max(1, Math.min(CAP, (int) Math.round(HoldOutStop.RULE.factor() * h.peak())));
	}

	static HoldOutStop.Result held(final Scene s, final DeconvolutionOptions o, final int folds) {
		return held(s, o, folds, HoldOutStop.SPLIT_BITS);
	}

	/** The held-out stop with a split of 1 − 2^−bits / 2^−bits (made once per scene and options). */
	static HoldOutStop.Result held(final Scene s, final DeconvolutionOptions o, final int folds, final int bits) {
		return held(s, o, HoldOutStop.Rule.likelihood(folds, bits));
	}

	/** The held-out stop with any rule (made once per scene, rule and options). */
	static HoldOutStop.Result held(final Scene s, final DeconvolutionOptions o, final HoldOutStop.Rule rule) {
		// the factor does not change the split runs: one run per criterion, folds and split
		final HoldOutStop.Rule run = new HoldOutStop.Rule(rule.criterion(), rule.folds(), rule.bits(), 1);
		return SUGGESTIONS.computeIfAbsent(s.name() + " " + run + " " + o, k -> HoldOutStop.suggest(s.recording(), s.psf(), o, Monitor.NONE, run));
	}

	/** The suggestion of a rule at its own factor: gain, distance to the curve's best, k* and an edge flag. */
	static String heldOut(final Scene s, final SceneRuns r, final DeconvolutionOptions o, final HoldOutStop.Rule rule) {
		final HoldOutStop.Result h = held(s, o, rule);
		final SceneRuns.Curve c = r.curve(s, o);
		final int n = Math.max(1, Math.min(CAP, (int) Math.round(rule.factor() * h.peak())));
		return SceneBenchmark.db(gain(s, c.at(n))) + " (" + SceneBenchmark.db(c.at(n) - c.best()) + ", k*=" + h.peak() + (h.interior() ? "" : " edge") + ")";
	}

	static double gain(final Scene s, final double psnr) {
		return psnr - Score.inputPsnr(s);
	}

	/** "+g @k" of the best iterate of a curve. */
	static String best(final Scene s, final SceneRuns.Curve c) {
		return SceneBenchmark.db(gain(s, c.best())) + " @" + (c.bestIndex() + 1);
	}

	/**
	 * The likelihood criterion's suggestion of options o with one fold (the held-out rule before the band
	 * criterion): gain at round(f·k*) and its distance to the curve's best; "k*" and an edge flag.
	 */
	static String heldOut(final Scene s, final SceneRuns r, final DeconvolutionOptions o, final double factor) {
		return heldOut(s, r, o, factor, 1);
	}

	static String heldOut(final Scene s, final SceneRuns r, final DeconvolutionOptions o, final double factor, final int folds) {
		return heldOut(s, r, o, factor, folds, HoldOutStop.SPLIT_BITS);
	}

	static String heldOut(final Scene s, final SceneRuns r, final DeconvolutionOptions o, final double factor, final int folds, final int bits) {
		final HoldOutStop.Result h = held(s, o, folds, bits);
		final SceneRuns.Curve c = r.curve(s, o);
		final int n = Math.max(1, Math.min(CAP, (int) Math.round(factor * h.peak())));
		return SceneBenchmark.db(gain(s, c.at(n))) + " (" + SceneBenchmark.db(c.at(n) - c.best()) + ", k*=" + h.peak() + (h.interior() ? "" : " edge") + ")";
	}

	static List<SceneBenchmark.Column> columns() {
		final List<SceneBenchmark.Column> cols = new ArrayList<>();
		final DeconvolutionMethod acc = DeconvolutionMethod.RL_ACCELERATED, rl = DeconvolutionMethod.RL, tv = DeconvolutionMethod.RL_TV;
		cols.add(SceneBenchmark.column("default run (acc. RL, held-out, cap 100, bg auto)", (s, r) -> {
			final DeconvolutionOptions o = opts(s, acc, 0, Level.ESTIMATED);
			final HoldOutStop.Result h = held(s, o);
			final SceneRuns.Curve c = r.curve(s, o);
			return SceneBenchmark.db(gain(s, c.at(defaultIterations(h)))) + " @" + defaultIterations(h) + (h.interior() ? "" : " edge");
		}));
		cols.add(SceneBenchmark.column("default run, bg true", (s, r) -> {
			final DeconvolutionOptions o = opts(s, acc, 0, SceneBenchmark.trueBackground(s));
			final HoldOutStop.Result h = held(s, o);
			return SceneBenchmark.db(gain(s, r.curve(s, o).at(defaultIterations(h)))) + " @" + defaultIterations(h);
		}));
		for (final String bg : List.of("dark", "fit", "fit-smooth"))
			cols.add(SceneBenchmark.column("default run, bg " + bg, (s, r) -> {
				final Level b = bg.equals("dark") ? SceneBenchmark.darkBackground(s) : bg.equals("fit") ? Level.FIT : Level.FIT_SMOOTH;
				final DeconvolutionOptions o = opts(s, acc, 0, b);
				final HoldOutStop.Result h = held(s, o);
				return SceneBenchmark.db(gain(s, r.curve(s, o).at(defaultIterations(h)))) + " @" + defaultIterations(h) + (h.interior() ? "" : " edge");
			}));
		// the background by the PSF: dark where the PSF's outer planes keep its light (widefield haze), the larger of dark
		// and the sigma-clipped median where they do not (confocal-like); "auto on confocal" for comparison
		for (final String rule : List.of("by-psf", "auto on confocal"))
			cols.add(SceneBenchmark.column("default run, bg " + rule, (s, r) -> {
				final double[] sums = org.parfocal.psf.PsfExtent.planeSums(s.psf());
				double max = 0;
				for (final double v : sums) max = Math.max(max, v);
				final boolean confocal = Math.min(sums[0], sums[sums.length - 1]) / max < 0.25;
				final double dark = SceneBenchmark.darkBackground(s).value();
				final double auto = org.parfocal.deconv.Preprocessing.data(s.recording(), Level.of(s.offset()), Level.ESTIMATED).background();
				// by-psf through Deconvolve's own resolution (Preprocessing.forPsf); the emulation above must agree with it
				final Level b = rule.equals("by-psf") ? Level.BY_PSF : !confocal ? Level.of(dark) : Level.of(auto);
				final double shown = rule.equals("by-psf") ? (confocal ? Math.max(dark, auto) : dark) : b.value();
				final DeconvolutionOptions o = opts(s, acc, 0, b);
				final HoldOutStop.Result h = held(s, o);
				final SceneRuns.Curve c = r.curve(s, o);
				return SceneBenchmark.db(gain(s, c.at(defaultIterations(h)))) + " @" + defaultIterations(h) + (h.interior() ? "" : " edge") + " (own best "
						+ best(s, c) + ", b " + String.format(Locale.ROOT, "%.1f", shown) + ")";
			}));
		cols.add(SceneBenchmark.column("best iterate (methods x TV weights, bg true)", (s, r) -> {
			SceneRuns.Curve bc = null;
			String what = null;
			for (final DeconvolutionMethod m : List.of(rl, acc)) {
				final SceneRuns.Curve c = r.curve(s, opts(s, m, 0, SceneBenchmark.trueBackground(s)));
				if (bc == null || c.best() > bc.best()) { bc = c; what = m.key(); }
			}
			for (final double w : WEIGHTS) {
				final SceneRuns.Curve c = r.curve(s, opts(s, tv, w, SceneBenchmark.trueBackground(s)));
				if (c.best() > bc.best()) { bc = c; what = "tv " + w; }
			}
			return best(s, bc) + " " + what;
		}));
		for (final DeconvolutionMethod m : List.of(acc, rl)) {
			final String name = m == acc ? "acc" : "rl";
			cols.add(SceneBenchmark.column(name + " best", (s, r) -> best(s, r.curve(s, opts(s, m, 0, SceneBenchmark.trueBackground(s))))));
			for (final double f : m == acc ? new double[] { 1, 1.25, 1.5, 2 } : new double[] { 1, 1.5 })
				cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "%s held-out x%.2f", name, f),
						(s, r) -> heldOut(s, r, opts(s, m, 0, SceneBenchmark.trueBackground(s)), f)));
		}
		for (final int folds : new int[] { 1, 2 })
			for (final double f : folds == 1 ? new double[] { 1 } : new double[] { 1, 1.25, 1.5 })
				cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "fold%d acc held-out x%.2f", folds, f),
						(s, r) -> heldOut(s, r, opts(s, acc, 0, SceneBenchmark.trueBackground(s)), f, folds)));
		for (final int folds : new int[] { 1, 2 })
			for (final double f : new double[] { 1, 1.17, 1.25 }) {
				final HoldOutStop.Rule rule = new HoldOutStop.Rule(HoldOutStop.Criterion.BAND, folds, 1, f);
				cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "band fold%d acc x%.2f", folds, f),
						(s, r) -> heldOut(s, r, opts(s, acc, 0, SceneBenchmark.trueBackground(s)), rule)));
				cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "band fold%d tv 0.002 x%.2f", folds, f),
						(s, r) -> heldOut(s, r, opts(s, tv, 0.002, SceneBenchmark.trueBackground(s)), rule)));
				cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "band fold%d acc bg auto x%.2f", folds, f),
						(s, r) -> heldOut(s, r, opts(s, acc, 0, Level.ESTIMATED), rule)));
				cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "band fold%d acc bg dark x%.2f", folds, f),
						(s, r) -> heldOut(s, r, opts(s, acc, 0, SceneBenchmark.darkBackground(s)), rule)));
			}
		for (final String bg : List.of("true", "dark"))
			for (final int bits : new int[] { 1, 2, 3, 4 })
				for (final double f : new double[] { 1, 1 / (1 - Math.pow(2, -bits)) })
					cols.add(SceneBenchmark.column(String.format(Locale.ROOT, "split %d bg %s x%.2f", bits, bg, f), (s, r) -> heldOut(s, r,
							opts(s, acc, 0, bg.equals("true") ? SceneBenchmark.trueBackground(s) : SceneBenchmark.darkBackground(s)), f, 1, bits)));
		for (final String bg : List.of("true", "dark", "fit", "fit-smooth", "by-psf"))
			cols.add(SceneBenchmark.column("bgbest " + bg, (s, r) -> {
				final Level b = bg.equals("true") ? SceneBenchmark.trueBackground(s) : bg.equals("dark") ? SceneBenchmark.darkBackground(s)
						: bg.equals("fit") ? Level.FIT : bg.equals("by-psf") ? Level.BY_PSF : Level.FIT_SMOOTH;
				return best(s, r.curve(s, opts(s, acc, 0, b)));
			}));
		cols.add(SceneBenchmark.column("tv 0.002 best", (s, r) -> best(s, r.curve(s, opts(s, tv, 0.002, SceneBenchmark.trueBackground(s))))));
		cols.add(SceneBenchmark.column("tv 0.002 held-out x1.0", (s, r) -> heldOut(s, r, opts(s, tv, 0.002, SceneBenchmark.trueBackground(s)), 1)));
		cols.add(SceneBenchmark.column("tv weights (best iterate each)", (s, r) -> {
			final StringBuilder sb = new StringBuilder();
			for (final double w : WEIGHTS) {
				if (sb.length() > 0) sb.append(' ');
				sb.append(w).append(':').append(SceneBenchmark.db(gain(s, r.curve(s, opts(s, tv, w, SceneBenchmark.trueBackground(s))).best())));
			}
			return sb.toString();
		}));
		cols.add(SceneBenchmark.column("photons/voxel", (s, r) -> String.format(Locale.ROOT, "%.3g", photonsPerVoxel(s))));
		return cols;
	}

	/** Mean photons per voxel of the recording after the true offset (true gain): the noise level a TV rule may scale with. */
	static double photonsPerVoxel(final Scene s) {
		double sum = 0;
		for (final float v : s.recording().data()) sum += Math.max(0, v - s.offset());
		return sum / s.recording().data().length / s.gain();
	}
}
