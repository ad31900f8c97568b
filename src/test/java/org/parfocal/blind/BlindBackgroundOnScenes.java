package org.parfocal.blind;

import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.List;
import java.util.Locale;

import net.imglib2.parallel.Parallelization;

import org.parfocal.core.Monitor;
import org.parfocal.deconv.Level;
import org.parfocal.psf.Fwhm;
import org.parfocal.scenes.Scene;
import org.parfocal.scenes.SceneBenchmark;
import org.parfocal.scenes.Score;

/**
 * Benchmark (not a unit test): which background level Blind Deconvolve should assume by default, judged on the
 * independent scenes ({@code tools/scenes/make_scenes.py}). Each scene (cropped laterally as in
 * {@link BlindSceneBenchmark}) is deconvolved blind, free-form, from a Gaussian start of the true PSF's widths,
 * the command's other defaults (object TV, band limit off: no optics given), with the true offset and three
 * backgrounds: {@code auto} (sigma-clipped median after the offset), {@code dark} (the darkest region) and the
 * true level (its mean). Reported: the object's PSNR gain over the input and the difference to the true level.
 * <pre>
 * bin/parfocal-bench blind-background [folder] [iterations] [crop] [threads]
 * </pre>
 */
public final class BlindBackgroundOnScenes {

	private BlindBackgroundOnScenes() {}

	public static void main(final String[] a) throws Exception {
		final Path dir = Paths.get(a.length > 0 ? a[0] : "target/scenes");
		SceneBenchmark.ensure(dir);
		final int iters = a.length > 1 ? Integer.parseInt(a[1]) : 30, crop = a.length > 2 ? Integer.parseInt(a[2]) : 64;
		final int threads = a.length > 3 ? Integer.parseInt(a[3]) : 2;
		System.out.printf(Locale.ROOT, "Blind Deconvolve's background on the independent scenes: crop %d x %d, all planes; free-form, %d iterations, Gaussian start of the true widths; %d threads%n",
				crop, crop, iters, threads);
		System.out.println("| scene | true b (ADU) | auto: b, gain (Δ true) | dark: b, gain (Δ true) | true b: gain |");
		System.out.println("| --- | --- | --- | --- | --- |");
		final String only = System.getenv("PARFOCAL_SCENES");
		for (final String name : SceneBenchmark.scenes(dir)) {
			if (only != null && !List.of(only.split(",")).contains(name)) continue;
			final Scene s = BlindSceneBenchmark.crop(Scene.load(dir, name), crop);
			final double input = Score.inputPsnr(s);
			final BlindOptions base = BlindOptions.of(PsfStart.gaussian(Fwhm.lateral(s.psf()), Fwhm.axial(s.psf())), null).withOffset(Level.of(s.offset()))
					.withIterations(iters).withSnapshotInterval(iters);
			final double[] gain = new double[3], level = new double[3];
			final Level[] levels = { Level.ESTIMATED, Level.DARK, SceneBenchmark.trueBackground(s) };
			for (int i = 0; i < 3; i++) {
				final BlindOptions o = base.withBackground(levels[i]);
				final BlindResult r = Parallelization.runWithNumThreads(threads, () -> BlindDeconvolution.run(s.recording(), o, Monitor.NONE));
				gain[i] = Score.psnr(r.estimate(), s) - input;
				level[i] = r.background();
			}
			System.out.printf(Locale.ROOT, "| %s | %.1f | %.1f, %+.2f (%+.2f) | %.1f, %+.2f (%+.2f) | %+.2f |%n", name, level[2], level[0], gain[0], gain[0] - gain[2], level[1],
					gain[1], gain[1] - gain[2], gain[2]);
		}
	}
}
