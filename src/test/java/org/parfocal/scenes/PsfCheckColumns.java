package org.parfocal.scenes;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.parfocal.conv.Psfs;
import org.parfocal.core.Monitor;
import org.parfocal.core.Trilinear;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.quality.ReferenceComparison;

/**
 * Column of the scene table for issue 14's item 8: can the reference check tell a result made with the true PSF
 * from results made with the true PSF stretched to 0.8× and 1.2× its size along every axis, by its own 95 %
 * intervals? Same method for each (accelerated RL, {@link #ITERATIONS} iterations, true background), the
 * family's references ({@link ReferenceStopColumns#references}) with the default comparison options (50 bootstrap
 * resamples). The simulation's truth (PSNR) says which result is best. Cell: PSNR gains 0.8 / 1 / 1.2, patch
 * distances with intervals, and the verdict: which of the wrong PSFs the intervals separate from the true one,
 * and whether the check's best is the PSNR's best.
 */
final class PsfCheckColumns {

	private PsfCheckColumns() {}

	static final int ITERATIONS = 30;
	static final double[] SCALES = { 0.8, 1.0, 1.2 };

	static List<SceneBenchmark.Column> columns() {
		final List<SceneBenchmark.Column> cols = new ArrayList<>();
		cols.add(SceneBenchmark.column("psf check (acc. RL 30 it; PSF x0.8 / x1 / x1.2)", (s, r) -> check(s)));
		return cols;
	}

	/** The PSF stretched by f about its centre voxel (linear interpolation, zero outside, unit sum), on the same box. */
	static Volume stretched(final Volume psf, final double f) {
		return Psfs.normalized(Trilinear.sample(psf, axis(psf.nx(), f), axis(psf.ny(), f), axis(psf.nz(), f), psf.voxelSize()));
	}

	/** Output i of n samples input index c + (i − c)/f, c the centre. */
	private static Trilinear.Axis axis(final int n, final double f) {
		final double c = (n - 1) / 2.0;
		final double[] at = new double[n];
		for (int i = 0; i < n; i++) at[i] = c + (i - c) / f;
		return Trilinear.Axis.zeroOutside(at, n);
	}

	static String check(final Scene s) {
		final DeconvolutionOptions o = SceneBenchmark.options(s, DeconvolutionMethod.RL_ACCELERATED, ITERATIONS, 0, SceneBenchmark.trueBackground(s));
		final ReferenceComparison.References refs = ReferenceComparison.prepare(ReferenceStopColumns.references(s), s.recording(),
				ReferenceComparison.Options.defaults(), Monitor.NONE);
		final double[] gain = new double[3];
		final ReferenceComparison.Row[] row = new ReferenceComparison.Row[3];
		for (int k = 0; k < 3; k++) {
			final Volume psf = SCALES[k] == 1 ? s.psf() : stretched(s.psf(), SCALES[k]);
			final Volume x = Deconvolution.run(s.recording(), psf, o, Monitor.NONE).estimate();
			gain[k] = Score.psnr(x, s) - Score.inputPsnr(s);
			row[k] = ReferenceComparison.compare(refs, x.withVoxelSize(s.recording().voxelSize()), null, Monitor.NONE).row(ReferenceComparison.PATCHES);
		}
		final boolean narrow = row[0].low() > row[1].high() || row[0].high() < row[1].low();
		final boolean wide = row[2].low() > row[1].high() || row[2].high() < row[1].low();
		int bestPsnr = 0, bestCheck = 0;
		for (int k = 1; k < 3; k++) {
			if (gain[k] > gain[bestPsnr]) bestPsnr = k;
			if (row[k].distance() < row[bestCheck].distance()) bestCheck = k;
		}
		final StringBuilder b = new StringBuilder();
		for (int k = 0; k < 3; k++)
			b.append(k == 0 ? "" : " / ").append(SceneBenchmark.db(gain[k]));
		b.append(" dB; d ");
		for (int k = 0; k < 3; k++)
			b.append(k == 0 ? "" : " / ").append(String.format(Locale.ROOT, "%.4f [%.4f, %.4f]", row[k].distance(), row[k].low(), row[k].high()));
		b.append("; separates ").append(narrow && wide ? "both" : narrow ? "x0.8 only" : wide ? "x1.2 only" : "neither");
		b.append("; check's best x").append(SCALES[bestCheck]).append(bestCheck == bestPsnr ? " = PSNR's" : ", PSNR's x" + SCALES[bestPsnr]);
		return b.toString();
	}
}
