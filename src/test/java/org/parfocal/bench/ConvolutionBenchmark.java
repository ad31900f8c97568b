package org.parfocal.bench;

import java.util.Arrays;
import java.util.Locale;
import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Volume;
import org.parfocal.fft.RealFft;

/**
 * Benchmark (not a unit test): one convolution with a cached transfer function against the bare forward +
 * inverse real FFT pair of the same padded size (all rows, the faster of the out-of-place and in-place paths),
 * measured in the same run. The convolution prunes transforms of rows that are zero or not read, so its
 * ratio can be below 1.
 * <p>
 * Run: {@code mvn -o -q test-compile exec:java -Dexec.classpathScope=test -Dexec.mainClass=org.parfocal.bench.ConvolutionBenchmark}
 * or see DEVELOPERS.md. Arguments: {@code [threads] [repetitions]} (default 2 and 7). Prints medians.
 */
public final class ConvolutionBenchmark {

	public static void main(final String[] args) {
		final int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2;
		final int reps = args.length > 1 ? Integer.parseInt(args[1]) : 7;
		System.out.printf(Locale.ROOT, "Parfocal convolution benchmark: %d thread(s), median of %d, Java %s, %d cores%n", threads, reps,
				System.getProperty("java.version"), Runtime.getRuntime().availableProcessors());
		System.out.println("image (z x y x x) | PSF | padded | convolution ms | bare FFT pair ms | ratio");
		for (final int[] shape : new int[][] { { 256, 256, 64 }, { 512, 512, 64 } })
			Parallelization.runWithNumThreads(threads, () -> run(shape, new int[] { 9, 9, 5 }, reps));
	}

	private static void run(final int[] n, final int[] k, final int reps) {
		final Volume x = Volume.zeros(n[0], n[1], n[2], null);
		final Random r = new Random(1);
		final float[] d = x.data();
		for (int i = 0; i < d.length; i++) d[i] = r.nextFloat();
		final Volume psf = Volume.zeros(k[0], k[1], k[2], null);
		Arrays.fill(psf.data(), 1f / psf.size());
		final ConvolutionOperator op = ConvolutionOperator.create(psf, x, Boundary.ZERO);
		final ConvolutionOperator.Workspace ws = op.newWorkspace();
		final float[] out = new float[x.size()];
		final RealFft fft = op.fft();
		final float[] real = new float[fft.realLength()], spec = fft.newSpectrum(), grid = fft.newGrid();
		for (int i = 0; i < real.length; i++) real[i] = r.nextFloat();
		for (int i = 0; i < grid.length; i++) grid[i] = r.nextFloat();
		final double[] conv = new double[reps], bare = new double[reps], inPlace = new double[reps];
		for (int w = 0; w < 2; w++) { // warm-up
			op.apply(d, out, ws);
			fft.forward(real, spec);
			fft.inverse(spec, real);
			fft.forwardInPlace(grid, fft.allRows());
			fft.inverseInPlace(grid, fft.allRows());
		}
		for (int i = 0; i < reps; i++) { // interleaved, so drifts of the shared machine hit both alike
			long t = System.nanoTime();
			op.apply(d, out, ws);
			conv[i] = (System.nanoTime() - t) / 1e6;
			t = System.nanoTime();
			fft.forward(real, spec);
			fft.inverse(spec, real);
			bare[i] = (System.nanoTime() - t) / 1e6;
			t = System.nanoTime();
			fft.forwardInPlace(grid, fft.allRows());
			fft.inverseInPlace(grid, fft.allRows());
			inPlace[i] = (System.nanoTime() - t) / 1e6;
		}
		final int[] p = op.paddedShape();
		final double c = median(conv), b = Math.min(median(bare), median(inPlace));
		System.out.printf(Locale.ROOT, "%dx%dx%d | %dx%dx%d | %dx%dx%d | %.1f | %.1f | %.3f%n", n[2], n[1], n[0], k[2], k[1], k[0], p[2], p[1], p[0], c, b, c / b);
	}

	static double median(final double[] a) {
		final double[] s = a.clone();
		Arrays.sort(s);
		return s.length % 2 == 1 ? s[s.length / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]);
	}
}
