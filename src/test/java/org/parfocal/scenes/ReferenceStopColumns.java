package org.parfocal.scenes;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

import ij.IJ;
import ij.ImagePlus;

import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.ij1.ImageBridge;
import org.parfocal.quality.MatchedResolution;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.quality.StoppingRule;

/**
 * Columns of the scene table for the stop with references (issue 14, item 7): watch mode's rule, the minimum of
 * the patch distance to unmatched sharp references ({@link StoppingRule}), evaluated every {@link #EVERY}
 * iterations up to {@link StopColumns#CAP}, true PSF and background, on the scene's own object family's
 * references ({@code references/FAMILY/} beside the scenes: other seeds of the generator's object model, no blur,
 * no noise, the recording's grid). The references are prepared as Deconvolve's watch prepares them (default
 * comparison options; with matched resolution, the dialog's default, blurred to the PSF's FWHM / 2). Each cell:
 * the suggested iteration ("edge" when the rule found no interior minimum), its PSNR gain, and its distance to
 * the best iterate of the same run (goal: within 0.2 dB).
 */
final class ReferenceStopColumns {

	private ReferenceStopColumns() {}

	/** Evaluate every this many iterations (the watch dialog's default). */
	static final int EVERY = 5;

	static List<SceneBenchmark.Column> columns() {
		final List<SceneBenchmark.Column> cols = new ArrayList<>();
		for (final boolean matched : new boolean[] { true, false }) {
			final String res = matched ? "matched resolution" : "own resolution";
			cols.add(SceneBenchmark.column("ref stop, acc. RL, " + res, (s, r) -> stop(s, DeconvolutionMethod.RL_ACCELERATED, 0, matched)));
			cols.add(SceneBenchmark.column("ref stop, RL-TV 0.002, " + res, (s, r) -> stop(s, DeconvolutionMethod.RL_TV, 0.002, matched)));
		}
		// the deconvolution gain that matched resolution assumes (MatchedResolution.DECONVOLUTION_GAIN = 2) against larger ones
		for (final double g : new double[] { 3, 4 })
			cols.add(SceneBenchmark.column("ref stop, acc. RL, matched at FWHM / " + (int) g, (s, r) -> stop(s, DeconvolutionMethod.RL_ACCELERATED, 0, g)));
		return cols;
	}

	/** The family's references, in file name order. */
	static List<Volume> references(final Scene s) {
		final Path dir = SceneBenchmark.folder().resolve("references").resolve(s.meta().get("object").getAsString());
		try (Stream<Path> files = Files.list(dir)) {
			final List<Volume> refs = new ArrayList<>();
			for (final Path f : files.filter(p -> p.toString().endsWith(".tif")).sorted().toList()) {
				final ImagePlus imp = IJ.openImage(f.toString());
				if (imp == null) throw new IllegalStateException("Cannot open " + f);
				refs.add(ImageBridge.toVolume(imp, f.getFileName().toString()));
			}
			if (refs.isEmpty()) throw new IllegalStateException("No references in " + dir);
			return refs;
		} catch (final IOException e) {
			throw new IllegalStateException("No references in " + dir + " (rerun tools/scenes/make_scenes.py): " + e.getMessage());
		}
	}

	static String stop(final Scene s, final DeconvolutionMethod m, final double weight, final boolean matched) {
		return stop(s, m, weight, matched ? MatchedResolution.DECONVOLUTION_GAIN : 0);
	}

	/** The stop with references blurred to the PSF's FWHM / gain (gain 0: at their own resolution). */
	static String stop(final Scene s, final DeconvolutionMethod m, final double weight, final double gain) {
		final DeconvolutionOptions o = SceneBenchmark.options(s, m, StopColumns.CAP, weight, SceneBenchmark.trueBackground(s));
		MatchedResolution res = null;
		if (gain > 0) {
			final MatchedResolution two = MatchedResolution.expectedFromPsf(s.psf(), s.recording().voxelSize());
			final double f = MatchedResolution.DECONVOLUTION_GAIN / gain;
			res = new MatchedResolution(two.lateral() * f, two.axial() * f);
		}
		final ReferenceComparison.Options co = ReferenceComparison.Options.defaults().withResolution(res);
		final ReferenceComparison.References refs = ReferenceComparison.prepare(references(s), s.recording(), co, Monitor.NONE);
		final QualityWatch w = new QualityWatch(refs, null, EVERY, false, s.recording().voxelSize());
		final double[] psnr = new double[StopColumns.CAP];
		final float[] buf = new float[s.truth().data().length];
		Deconvolution.run(s.recording(), s.psf(), o, null, Monitor.NONE, (rep, est) -> {
			est.copyTo(buf);
			psnr[rep.iteration() - 1] = Score.psnr(buf, s);
			w.iterationDone(rep, est);
		});
		int best = 0;
		for (int i = 1; i < psnr.length; i++) if (psnr[i] > psnr[best]) best = i;
		final StoppingRule.Suggestion sg = w.suggestion();
		final int k = sg.iteration();
		return k + (sg.interior() ? "" : " edge") + ": " + SceneBenchmark.db(StopColumns.gain(s, psnr[k - 1])) + " ("
				+ SceneBenchmark.db(psnr[k - 1] - psnr[best]) + " vs best @" + (best + 1) + ")";
	}
}
