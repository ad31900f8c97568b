package org.parfocal.fft;

import java.lang.management.ManagementFactory;
import java.lang.management.ThreadMXBean;
import java.util.Arrays;
import java.util.Locale;
import java.util.Random;

import net.imglib2.parallel.Parallelization;

/**
 * Benchmark (not a unit test): on one thread, CPU time (which a busy shared machine disturbs far less than
 * wall time) of the transform work of one RL iteration on a padded grid, as ratios to FFTW's own floor:
 * <ul>
 * <li>the floor: 4 whole-volume FFTW transforms on a native grid ({@link FftwBound}), estimated and measured plans;</li>
 * <li>RealFft on each backend: 4 in-place transforms, and 2 fused convolutions (forward, product, inverse)
 * with the line-layout transfer function, the way the engines call it.</li>
 * </ul>
 * {@code bin/parfocal-bench fftw [nx ny nz]} (default 320 320 96, the padded grid of a 64×256×256 stack with a
 * 33×65×65 PSF).
 */
public final class FftwPathBenchmark {

	public static void main(final String[] args) {
		final int nx = args.length > 2 ? Integer.parseInt(args[0]) : 320, ny = args.length > 2 ? Integer.parseInt(args[1]) : 320,
				nz = args.length > 2 ? Integer.parseInt(args[2]) : 96;
		System.out.printf(Locale.ROOT, "grid %d x %d x %d (x y z), one thread, CPU seconds (medians)%n", nx, ny, nz);
		final double[] est = FftwBound.fourTransforms(nx, ny, nz, 1, false);
		final double[] mea = FftwBound.fourTransforms(nx, ny, nz, 1, true);
		if (est == null) {
			System.out.println("FFTW does not load: " + FftBackend.FFTW.unavailableReason());
			return;
		}
		System.out.printf(Locale.ROOT, "  FFTW floor, 4 whole-volume transforms: estimated plans %.3f s (planning %.2f s), measured %.3f s (planning %.1f s)%n",
				est[2], est[0], mea[2], mea[0]);
		final double floor = Math.min(est[2], mea[2]);
		Parallelization.runWithNumThreads(1, () -> {
			for (final FftBackend b : FftBackend.values()) {
				if (!b.available()) continue;
				final RealFft f = new RealFft(nx, ny, nz, b);
				final double planning0 = FftBackend.planningSeconds();
				final float[] g = f.newGrid(), t = f.newGrid(), lt = f.newGrid();
				final Random r = new Random(1);
				for (int i = 0; i < g.length; i++) t[i] = r.nextFloat();
				final RealFft.LineTransfer line = f.lineTransfer(t, lt);
				final double four = cpu(() -> {
					for (int k = 0; k < 2; k++) {
						f.forwardInPlace(g, f.allRows());
						f.inverseInPlace(g, f.allRows());
					}
				});
				final double planning = FftBackend.planningSeconds() - planning0;
				final double conv = cpu(() -> {
					for (int k = 0; k < 2; k++) f.convolveInPlace(g, line, k == 1, f.allRows(), null, f.allRows(), null);
				});
				System.out.printf(Locale.ROOT, "  %-5s 4 in-place transforms %.3f s = %.2f x floor; 2 fused convolutions %.3f s = %.2f x floor (planning %.2f s)%n",
						b.key(), four, four / floor, conv, conv / floor, planning);
			}
			return null;
		});
	}

	private static double cpu(final Runnable r) {
		final ThreadMXBean tb = ManagementFactory.getThreadMXBean();
		final double[] t = new double[5];
		for (int i = 0; i < t.length; i++) {
			final long c = tb.getCurrentThreadCpuTime();
			r.run();
			t[i] = (tb.getCurrentThreadCpuTime() - c) / 1e9;
		}
		final double[] u = Arrays.copyOfRange(t, 1, t.length);
		Arrays.sort(u);
		return 0.5 * (u[1] + u[2]);
	}
}
