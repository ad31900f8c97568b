package org.parfocal.fft;

import java.util.Arrays;
import java.util.Locale;
import java.util.Random;

import org.jtransforms.fft.FloatFFT_1D;

/**
 * Benchmark (not a unit test): one line transform, forward + inverse, by JTransforms alone (its mixed-radix
 * path for these lengths) and by the split path of {@link SplitFft} / {@link SplitRealFft}, interleaved in one
 * process on one thread, so that both see the same machine. Prints nanoseconds per value and the ratio
 * split / JTransforms (medians of 5 rounds). Lengths: the padded sizes of the deconvolution benchmark and a
 * few more. {@code bin/parfocal-bench lines}
 */
public final class LineTransformBenchmark {

	public static void main(final String[] args) {
		System.out.printf(Locale.ROOT, "Line transforms, forward + inverse, 1 thread, Java %s: ns per value, medians of 5 rounds%n",
				System.getProperty("java.version"));
		final Random r = new Random(1);
		for (final int n : new int[] { 96, 160, 192, 288, 320, 576, 640 }) {
			final FloatFFT_1D jt = new FloatFFT_1D(n);
			final int reps = 20_000_000 / n;
			final SplitRealFft sr = SplitRealFft.forLength(n);
			if (sr != null) {
				final float[] b = new float[n + 2], c = new float[n + 2];
				for (int i = 0; i < n; i++) b[i] = c[i] = r.nextFloat();
				final double[] tj = new double[5], ts = new double[5];
				for (int round = 0; round < 5; round++) {
					final long t0 = System.nanoTime();
					for (int k = 0; k < reps; k++) {
						jt.realForward(b);
						jt.realInverse(b, true);
					}
					final long t1 = System.nanoTime();
					for (int k = 0; k < reps; k++) {
						sr.forward(c, 0);
						sr.inverse(c, 0);
					}
					final long t2 = System.nanoTime();
					tj[round] = (t1 - t0) / (2.0 * reps * n);
					ts[round] = (t2 - t1) / (2.0 * reps * n);
				}
				print("real", n, tj, ts);
			}
			final SplitFft s = SplitFft.forLength(n);
			if (s != null) {
				final float[] b = new float[2 * n], c = new float[2 * n];
				for (int i = 0; i < 2 * n; i++) b[i] = c[i] = r.nextFloat();
				final double[] tj = new double[5], ts = new double[5];
				for (int round = 0; round < 5; round++) {
					final long t0 = System.nanoTime();
					for (int k = 0; k < reps / 2; k++) {
						jt.complexForward(b);
						jt.complexInverse(b, true);
					}
					final long t1 = System.nanoTime();
					for (int k = 0; k < reps / 2; k++) { // the de-interleaving a caller does while gathering is counted too
						s.deinterleave(c);
						s.forward(c);
						s.deinterleave(c);
						s.inverse(c, true);
					}
					final long t2 = System.nanoTime();
					tj[round] = (t1 - t0) / (1.0 * reps * n);
					ts[round] = (t2 - t1) / (1.0 * reps * n);
				}
				print("complex", n, tj, ts);
			}
		}
	}

	private static void print(final String kind, final int n, final double[] tj, final double[] ts) {
		Arrays.sort(tj);
		Arrays.sort(ts);
		System.out.printf(Locale.ROOT, "  %-7s n = %3d: JTransforms %.2f, split %.2f, ratio %.2f%n", kind, n, tj[2], ts[2], ts[2] / tj[2]);
	}
}
