package org.parfocal.quality;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import net.imglib2.parallel.Parallelization;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;

/**
 * Benchmark (not a unit test): one distribution check on a 64 × 256 × 256 result against 4 references of the
 * same size (default options), against a proxy of one Richardson–Lucy iteration on the same stack measured in
 * the same run: H x and Hᵀ(y / Hx) (two convolutions with ConvolutionOperator, 9 × 9 × 5 PSF, mirror boundary)
 * plus the element-wise passes (ratio, multiplicative update). Target: a check below ~3 iterations.
 * <p>
 * Three check costs are printed: the full check (prepare the references, floor included, then compare), the
 * comparison alone with prepared references (what a watch mode pays per evaluation) and the bare patch distance.
 * Arguments: {@code [threads] [repetitions]} (default 2 and 3). Prints medians.
 */
public final class QualityBenchmark {

	public static void main(final String[] args) {
		final int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2;
		final int reps = args.length > 1 ? Integer.parseInt(args[1]) : 3;
		System.out.printf(Locale.ROOT, "Parfocal quality benchmark: %d thread(s), median of %d, Java %s, %d cores%n", threads, reps,
				System.getProperty("java.version"), Runtime.getRuntime().availableProcessors());
		Parallelization.runWithNumThreads(threads, () -> run(reps));
	}

	private static void run(final int reps) {
		final int nx = 256, ny = 256, nz = 64;
		final Volume result = SharpScenes.cell(1, nx, ny, nz, 1);
		final List<Volume> refs = new ArrayList<>();
		for (int i = 0; i < 4; i++) refs.add(SharpScenes.cell(10 + i, nx, ny, nz, 1));
		final Volume input = SharpScenes.blur(result, 2, 1.5);
		final ReferenceComparison.Options o = ReferenceComparison.Options.defaults();

		final Volume psf = SharpScenes.gaussian(1.5, 1.2, true);
		final Volume psfSmall = Volume.zeros(9, 9, 5, null);
		for (int z = 0; z < 5; z++)
			for (int y = 0; y < 9; y++)
				for (int x = 0; x < 9; x++) psfSmall.set(x, y, z, psf.get(x + (psf.nx() - 9) / 2, y + (psf.ny() - 9) / 2, z + (psf.nz() - 5) / 2));
		final ConvolutionOperator op = ConvolutionOperator.create(psfSmall, result, Boundary.MIRROR);
		final ConvolutionOperator.Workspace ws = op.newWorkspace();
		final float[] x = result.data().clone(), y = input.data(), hx = new float[x.length], corr = new float[x.length];

		final double[] rl = new double[reps], full = new double[reps], cmp = new double[reps], patch = new double[reps];
		ReferenceComparison.References prepared = null;
		for (int w = 0; w < 1; w++) { // warm-up
			rlIteration(op, ws, x, y, hx, corr);
			prepared = ReferenceComparison.prepare(refs, result, o, Monitor.NONE);
			ReferenceComparison.compare(prepared, result, input, Monitor.NONE);
		}
		for (int i = 0; i < reps; i++) { // interleaved, so drifts of the shared machine hit all alike
			long t = System.nanoTime();
			rlIteration(op, ws, x, y, hx, corr);
			rl[i] = ms(t);
			t = System.nanoTime();
			prepared = ReferenceComparison.prepare(refs, result, o, Monitor.NONE);
			ReferenceComparison.compare(prepared, result, null, Monitor.NONE);
			full[i] = ms(t);
			t = System.nanoTime();
			ReferenceComparison.compare(prepared, result, null, Monitor.NONE);
			cmp[i] = ms(t);
			t = System.nanoTime();
			ReferenceComparison.patchDistance(prepared, result);
			patch[i] = ms(t);
		}
		final double r = median(rl);
		System.out.printf(Locale.ROOT, "stack %d x %d x %d, 4 references, default options (%d patches of %d values, %d directions, %d voxel samples, %d bootstrap)%n",
				nz, ny, nx, o.patchCount(), o.patches().dimension(true), o.directions(), o.marginalSamples(), o.bootstrap());
		System.out.printf(Locale.ROOT, "RL iteration proxy (2 convolutions + element-wise): %.0f ms%n", r);
		System.out.printf(Locale.ROOT, "full check (prepare references + compare): %.0f ms = %.2f iterations%n", median(full), median(full) / r);
		System.out.printf(Locale.ROOT, "compare with prepared references:          %.0f ms = %.2f iterations%n", median(cmp), median(cmp) / r);
		System.out.printf(Locale.ROOT, "patch distance only:                        %.0f ms = %.2f iterations%n", median(patch), median(patch) / r);
	}

	/** x ← x · Hᵀ(y / Hx): the work of one plain Richardson–Lucy step. */
	private static void rlIteration(final ConvolutionOperator op, final ConvolutionOperator.Workspace ws, final float[] x, final float[] y, final float[] hx,
			final float[] corr) {
		op.apply(x, hx, ws);
		Parallel.forRange(hx.length, i -> hx[i] = hx[i] > 0 ? y[i] / hx[i] : 0);
		op.adjoint(hx, corr, ws);
		Parallel.forRange(x.length, i -> x[i] *= corr[i]);
	}

	private static double ms(final long t0) {
		return (System.nanoTime() - t0) / 1e6;
	}

	static double median(final double[] a) {
		final double[] s = a.clone();
		Arrays.sort(s);
		return s.length % 2 == 1 ? s[s.length / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]);
	}
}
