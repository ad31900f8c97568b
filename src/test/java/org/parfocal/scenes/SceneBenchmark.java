package org.parfocal.scenes;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;

import net.imglib2.parallel.Parallelization;

import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;

/**
 * The scene table (issue 14): every scene of {@code tools/scenes/make_scenes.py} deconvolved with several
 * settings, PSNR gains over the input against the simulation's truth.
 * <pre>
 * bin/parfocal-bench scenes [folder] ["column;column;…"]    (default folder target/scenes, made if missing)
 * </pre>
 * A column is a {@link Column}: a header and a cell computed from the scene and the shared runs
 * ({@link SceneRuns}, each run made once). Add one to {@link #COLUMNS}; the command line can pick columns by
 * header (the header itself, else every header it begins; separated by ';', since headers hold commas).
 */
public final class SceneBenchmark {

	/** One column of the table. Cells are text (a gain in dB, a setting, an estimate). */
	public interface Column {
		String header();

		String cell(Scene s, SceneRuns runs);
	}

	/** Most iterations any column runs. */
	public static final int MAX_ITERATIONS = 100;
	/** TV weights of the grid. */
	public static final double[] TV_WEIGHTS = { 0.001, 0.002, 0.005 };

	/** Options with the scene's true offset and the given background, non-circulant edges, fixed iterations. */
	public static DeconvolutionOptions options(final Scene s, final DeconvolutionMethod m, final int iterations, final double weight, final Level background) {
		return new DeconvolutionOptions(m, iterations, weight, Stopping.FIXED, 0, EdgeMode.NON_CIRCULANT, Level.of(s.offset()), background);
	}

	/** The true background as a constant (its mean, ADU after offset). */
	public static Level trueBackground(final Scene s) {
		return Level.of(s.meanBackgroundAdu());
	}

	/** The settings grid of "best": methods × TV weights, true background, iterations up to the cap. */
	public static List<DeconvolutionOptions> grid(final Scene s) {
		final List<DeconvolutionOptions> g = new ArrayList<>();
		final Level b = trueBackground(s);
		g.add(options(s, DeconvolutionMethod.RL, MAX_ITERATIONS, 0, b));
		g.add(options(s, DeconvolutionMethod.RL_ACCELERATED, MAX_ITERATIONS / 3, 0, b));
		for (final double w : TV_WEIGHTS) g.add(options(s, DeconvolutionMethod.RL_TV, MAX_ITERATIONS, w, b));
		return g;
	}

	static String db(final double v) {
		return String.format(Locale.ROOT, "%+.2f", v);
	}

	static String setting(final SceneRuns.Curve c, final DeconvolutionOptions o) {
		return o.method().key() + (o.method() == DeconvolutionMethod.RL_TV ? " " + o.regularization() : "") + " @" + (c.bestIndex() + 1);
	}

	/** Columns of the table, in order. */
	public static final List<Column> COLUMNS = new ArrayList<>(List.of(
			column("input dB", (s, r) -> String.format(Locale.ROOT, "%.2f", Score.inputPsnr(s))),
			column("default (rl-tv 0.002, 30 it, bg auto)", (s, r) -> db(r.curve(s, options(s, DeconvolutionMethod.RL_TV, 30, 0.002, Level.ESTIMATED)).last()
					- Score.inputPsnr(s))),
			column("best", (s, r) -> {
				final List<DeconvolutionOptions> g = grid(s);
				SceneRuns.Curve best = null;
				DeconvolutionOptions bo = null;
				for (final DeconvolutionOptions o : g) {
					final SceneRuns.Curve c = r.curve(s, o);
					if (best == null || c.best() > best.best()) { best = c; bo = o; }
				}
				return db(best.best() - Score.inputPsnr(s)) + " (" + setting(best, bo) + ")";
			})));

	/** The darkest-region background of a scene's recording after its true offset (ADU). */
	public static Level darkBackground(final Scene s) {
		final float[] r = s.recording().data();
		final float[] y = new float[r.length];
		for (int i = 0; i < r.length; i++) y[i] = (float) Math.max(0, r[i] - s.offset());
		return Level.of(org.parfocal.deconv.Preprocessing.estimateDarkBackground(y, s.recording().nx(), s.recording().ny(), s.recording().nz()));
	}

	/** Gain of RL-TV 0.002 at 30 iterations with background b, against the input. */
	static String defaultWith(final Scene s, final SceneRuns r, final Level b) {
		return db(r.curve(s, options(s, DeconvolutionMethod.RL_TV, 30, 0.002, b)).last() - Score.inputPsnr(s));
	}

	static {
		COLUMNS.add(column("b true", (s, r) -> String.format(Locale.ROOT, "%.1f", s.meanBackgroundAdu())));
		COLUMNS.add(column("b auto", (s, r) -> String.format(Locale.ROOT, "%.1f",
				org.parfocal.deconv.Preprocessing.data(s.recording(), Level.of(s.offset()), Level.ESTIMATED).background())));
		COLUMNS.add(column("b dark", (s, r) -> String.format(Locale.ROOT, "%.1f", darkBackground(s).value())));
		COLUMNS.add(column("30 it, b true", (s, r) -> defaultWith(s, r, trueBackground(s))));
		COLUMNS.add(column("30 it, b 0", (s, r) -> defaultWith(s, r, Level.NONE)));
		COLUMNS.add(column("30 it, b dark", (s, r) -> defaultWith(s, r, darkBackground(s))));
		COLUMNS.add(column("chi2 truth, photons=1", (s, r) -> String.format(Locale.ROOT, "%.2f", truthChiSquare(s, 1, 0))));
		COLUMNS.add(column("chi2 truth, estimated noise", (s, r) -> {
			final org.parfocal.core.CameraNoise c = org.parfocal.core.CameraNoise.estimate(s.recording(), s.offset());
			final org.parfocal.quality.ReblurConsistency.NoiseModel m = org.parfocal.quality.ReblurConsistency.NoiseModel.fromCamera(c, 0, s.offset());
			return String.format(Locale.ROOT, "%.3f", truthChiSquare(s, m.photonsPerUnit(), m.readNoise()));
		}));
		COLUMNS.add(column("chi2 truth, true noise", (s, r) -> String.format(Locale.ROOT, "%.3f",
				truthChiSquare(s, 1 / s.gain(), Math.sqrt(s.readNoise() * s.readNoise() + 1.0 / 12)))));
		for (final boolean estimated : new boolean[] { false, true })
			COLUMNS.add(column("chi2 stop, " + (estimated ? "estimated noise" : "photons=1") + " (RL-TV 100 it, b true: it, dB vs best)",
					(s, r) -> chiSquareStop(s, estimated)));
		COLUMNS.add(column("30 it, b fit", (s, r) -> defaultWith(s, r, Level.FIT)));
		COLUMNS.add(column("30 it, b fit-smooth", (s, r) -> defaultWith(s, r, Level.FIT_SMOOTH)));
		for (final Level b : new Level[] { null, Level.FIT })
			COLUMNS.add(column("acc 15 it, b " + (b == null ? "true" : "fit"), (s, r) -> db(r.curve(s, options(s, DeconvolutionMethod.RL_ACCELERATED, 15, 0,
					b == null ? trueBackground(s) : b)).last() - Score.inputPsnr(s))));
		COLUMNS.add(column("b fit", (s, r) -> String.format(Locale.ROOT, "%.1f",
				r.curve(s, options(s, DeconvolutionMethod.RL_TV, 30, 0.002, Level.FIT)).result().background())));
	}

	/**
	 * Mean re-blur χ² of the true object (the watch's check: mirrored edges, half a PSF left out at each edge)
	 * with the noise model given: photons per ADU and read noise in ADU. The object is the truth plus the true
	 * background map, both in ADU, with no constant background: the slowly varying background is smooth enough
	 * that blurring leaves it as it is.
	 */
	static double truthChiSquare(final Scene s, final double photonsPerUnit, final double readNoise) {
		final float[] t = s.truth().data(), bg = s.background().data();
		final float[] x = new float[t.length];
		for (int i = 0; i < t.length; i++) x[i] = (float) ((t[i] + bg[i]) * s.gain());
		final org.parfocal.core.Volume xv = org.parfocal.core.Volume.wrap(x, s.truth().nx(), s.truth().ny(), s.truth().nz(), s.recording().voxelSize());
		final org.parfocal.quality.QualityWatch.Consistency c = org.parfocal.quality.QualityWatch.Consistency.forDeconvolution(s.recording(), s.psf(), false,
				s.offset(), 0, photonsPerUnit, readNoise);
		return new org.parfocal.quality.QualityWatch(null, c, 1, false, s.recording().voxelSize()).consistency(xv).meanChiSquare();
	}

	/**
	 * The watch without references (the discrepancy rule on the re-blur χ², every 5 iterations) on RL-TV 0.002,
	 * 100 iterations, true background: the suggested iteration (flagged "edge" when not interior) and the PSNR
	 * at it against the best iterate's, with the noise model estimated from the recording or photons=1.
	 */
	static String chiSquareStop(final Scene s, final boolean estimated) {
		final DeconvolutionOptions o = options(s, DeconvolutionMethod.RL_TV, MAX_ITERATIONS, 0.002, trueBackground(s));
		double ppu = 1, read = 0;
		if (estimated) {
			final org.parfocal.quality.ReblurConsistency.NoiseModel m = org.parfocal.quality.ReblurConsistency.NoiseModel
					.fromCamera(org.parfocal.core.CameraNoise.estimate(s.recording(), s.offset()), 0, s.offset());
			ppu = m.photonsPerUnit();
			read = m.readNoise();
		}
		final org.parfocal.quality.QualityWatch w = new org.parfocal.quality.QualityWatch(null, org.parfocal.quality.QualityWatch.Consistency
				.forDeconvolution(s.recording(), s.psf(), false, s.offset(), s.meanBackgroundAdu(), ppu, read), 5, false, s.recording().voxelSize());
		final double[] psnr = new double[MAX_ITERATIONS];
		final float[] buf = new float[s.truth().data().length];
		org.parfocal.deconv.Deconvolution.run(s.recording(), s.psf(), o, null, org.parfocal.core.Monitor.NONE, (rep, est) -> {
			est.copyTo(buf);
			psnr[rep.iteration() - 1] = Score.psnr(buf, s);
			w.iterationDone(rep, est);
		});
		double best = Double.NEGATIVE_INFINITY;
		for (final double v : psnr) best = Math.max(best, v);
		final org.parfocal.quality.StoppingRule.Suggestion sg = w.suggestion();
		return sg.iteration() + (sg.interior() ? "" : " edge") + " " + db(psnr[sg.iteration() - 1] - best);
	}

	static {
		COLUMNS.addAll(StopColumns.columns()); // issue 14: stopping, default run, TV weight
		COLUMNS.addAll(ReferenceStopColumns.columns()); // issue 14: the stop with references
		COLUMNS.addAll(PsfCheckColumns.columns()); // issue 14: the reference check against wrong PSFs
	}

	public static Column column(final String header, final java.util.function.BiFunction<Scene, SceneRuns, String> cell) {
		return new Column() {
			@Override
			public String header() { return header; }

			@Override
			public String cell(final Scene s, final SceneRuns runs) { return cell.apply(s, runs); }
		};
	}

	/** Names of the scenes in {@code dir} (from their JSON sidecars), sorted. */
	public static List<String> scenes(final Path dir) throws IOException {
		try (Stream<Path> files = Files.list(dir)) {
			return files.map(p -> p.getFileName().toString()).filter(f -> f.endsWith(".json")).map(f -> f.substring(0, f.length() - 5)).sorted().toList();
		}
	}

	private static volatile Path folder = Paths.get("target/scenes");

	/** The folder of the scenes of this run (their references are in its {@code references} folder). */
	static Path folder() { return folder; }

	/** Makes the scenes with the Python generator if {@code dir} holds none (or no references). */
	public static void ensure(final Path dir) throws IOException, InterruptedException {
		folder = dir;
		if (Files.isDirectory(dir) && !scenes(dir).isEmpty() && Files.isDirectory(dir.resolve("references"))) return;
		System.err.println("Making the scenes in " + dir + " (tools/scenes/make_scenes.py)");
		final Process p = new ProcessBuilder("/usr/bin/python3", "tools/scenes/make_scenes.py", dir.toString()).inheritIO().start();
		if (p.waitFor() != 0) throw new IllegalStateException("make_scenes.py failed");
	}

	public static void main(final String[] args) throws Exception {
		final Path dir = Paths.get(args.length > 0 ? args[0] : "target/scenes");
		ensure(dir);
		final List<Column> cols = new ArrayList<>();
		if (args.length > 1) {
			for (final String h : args[1].split(";")) {
				final List<Column> exact = COLUMNS.stream().filter(c -> c.header().equals(h.trim())).toList();
				(exact.isEmpty() ? COLUMNS.stream().filter(c -> c.header().startsWith(h.trim())).toList() : exact).forEach(cols::add);
			}
		} else cols.addAll(COLUMNS);
		final String only = System.getenv("PARFOCAL_SCENES");
		final StringBuilder head = new StringBuilder("| scene |");
		final StringBuilder rule = new StringBuilder("| --- |");
		for (final Column c : cols) { head.append(' ').append(c.header()).append(" |"); rule.append(" --- |"); }
		System.out.println(head);
		System.out.println(rule);
		final SceneRuns runs = new SceneRuns();
		final long t0 = System.nanoTime();
		for (final String name : scenes(dir)) {
			if (only != null && !List.of(only.split(",")).contains(name)) continue;
			final Scene s = Scene.load(dir, name);
			final StringBuilder row = new StringBuilder("| ").append(name).append(" |");
			Parallelization.runWithNumThreads(Integer.getInteger("parfocal.threads", 2), () -> {
				for (final Column c : cols) row.append(' ').append(c.cell(s, runs)).append(" |");
			});
			System.out.println(row);
			runs.forget(s);
		}
		System.err.printf(Locale.ROOT, "%d runs, %.0f s%n", runs.count(), (System.nanoTime() - t0) / 1e9);
	}
}
