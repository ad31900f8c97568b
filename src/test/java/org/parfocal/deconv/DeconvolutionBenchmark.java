package org.parfocal.deconv;

import java.lang.management.ManagementFactory;
import java.lang.management.MemoryPoolMXBean;
import java.lang.management.MemoryType;
import java.lang.management.ThreadMXBean;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.fft.FastSizes;
import org.parfocal.fft.FftBackend;
import org.parfocal.fft.FftwBound;
import org.parfocal.fft.RealFft;

/**
 * Benchmark (not a unit test) of the deconvolution engine, every figure measured in the same run:
 * <ol>
 * <li>seconds per Richardson–Lucy iteration (non-circulant edges) on 64×256×256 and 64×512×512 stacks with
 * a 33×65×65 PSF, with 1 and 2 threads, and the speed-up;</li>
 * <li>for each FFT backend that runs here (FFTW, JTransforms): the first run's cost with its FFT planning, and
 * the figures below; and FFTW's own floor, 4 whole-volume FFTW transforms of the padded grid on a native array
 * ({@link FftwBound}, FFTW_MEASURE, FFTW's threads), with the ratio of an iteration to it;</li>
 * <li>the bare FFT lower bound: 2 forward + 2 inverse real FFTs ({@link RealFft}) of the padded size, full
 * (not pruned), the faster of the out-of-place ({@code forward}/{@code inverse}) and in-place paths, and the
 * ratio of an iteration to it (below 1 is possible: an iteration prunes transforms of rows known to be zero
 * or not needed);</li>
 * <li>peak heap during the run against the padded volume in float (JMX pool peaks, an upper bound that
 * includes uncollected garbage), the native bytes of the FFTW backend's buffers, and the solver's own accounting;</li>
 * <li>time-to-quality on 64×256×256: wall time of plain RL for 50 iterations and of accelerated RL until its
 * log-likelihood reaches plain RL's after 50.</li>
 * </ol>
 * Run with a large heap, e.g. {@code java -Xmx8g -cp target/classes:target/test-classes:<deps>
 * org.parfocal.deconv.DeconvolutionBenchmark [256] [512] [quality]} (no argument: all three). Per-iteration
 * times are medians of the intervals between successive iterations (setup excluded).
 */
public final class DeconvolutionBenchmark {

	private static final int[] PSF = { 65, 65, 33 };

	public static void main(final String[] args) {
		System.out.printf(Locale.ROOT, "Parfocal deconvolution benchmark: Java %s, %d cores, max heap %s%n", System.getProperty("java.version"),
				Runtime.getRuntime().availableProcessors(), org.parfocal.core.MemoryBudget.format(Runtime.getRuntime().maxMemory()));
		final List<String> parts = args.length == 0 ? List.of("256", "512", "quality") : List.of(args);
		final Volume psf = Synthetic.gaussianPsf(PSF[0], PSF[1], PSF[2], 2.0, 2.0, 4.0);
		for (final int[] n : new int[][] { { 256, 256, 64 }, { 512, 512, 64 } }) {
			final boolean quality = n[0] == 256 && parts.contains("quality");
			if (!parts.contains(Integer.toString(n[0])) && !quality) continue;
			final Volume image = recording(n, psf);
			if (parts.contains(Integer.toString(n[0]))) perIteration(image, psf);
			if (quality) timeToQuality(image, psf);
		}
	}

	/** A noisy recording of an invented cell (project acquisition model, mirror edges). */
	private static Volume recording(final int[] n, final Volume psf) {
		final Volume object = Synthetic.cell(1, n[0], n[1], n[2], 3, n[0] / 2);
		return new Acquisition(psf, n, new Acquisition.Options(Boundary.MIRROR, true, 2, 5, 7, 100)).record(object, Monitor.NONE);
	}

	private static DeconvolutionOptions options(final DeconvolutionMethod m, final int iterations) {
		return DeconvolutionOptions.of(m, iterations).withOffset(Level.of(100)).withBackground(Level.of(2));
	}

	private static void perIteration(final Volume image, final Volume psf) {
		final int[] n = image.shape();
		final int[] p = new int[3];
		for (int d = 0; d < 3; d++) p[d] = FastSizes.next(n[d] + PSF[d] - 1);
		final long padded = (long) p[0] * p[1] * p[2];
		System.out.printf(Locale.ROOT, "%nimage %d x %d x %d (z y x), PSF %d x %d x %d, padded %d x %d x %d = %.1f M voxels%n", n[2], n[1], n[0], PSF[2],
				PSF[1], PSF[0], p[2], p[1], p[0], padded / 1e6);
		// FFTW's own whole-volume plans on a native grid (FFTW_MEASURE, FFTW's threads): the floor of an iteration
		final double[] bound = new double[3];
		for (final int threads : new int[] { 1, 2 }) {
			final double[] b = FftwBound.fourTransforms(p[0], p[1], p[2], threads, true);
			if (b == null) break;
			bound[threads] = b[1];
			System.out.printf(Locale.ROOT, "  FFTW bound, %d thread(s): 4 whole-volume transforms %.3f s%s (FFTW_MEASURE planning %.1f s)%n", threads, b[1],
					threads == 1 ? String.format(Locale.ROOT, ", CPU time %.3f s", b[2]) : "", b[0]);
			System.out.printf(Locale.ROOT, "RESULT %d fftw_bound_%d %.5f%n", n[0], threads, b[1]);
		}
		final String old = System.getProperty(FftBackend.PROPERTY);
		for (final FftBackend backend : FftBackend.values()) {
			if (!backend.available()) continue;
			System.setProperty(FftBackend.PROPERTY, backend.key());
			System.out.printf(Locale.ROOT, "  backend %s%n", backend.description());
			final double planning0 = FftBackend.planningSeconds();
			final long s0 = System.nanoTime();
			Parallelization.runWithNumThreads(2, () -> Deconvolution.run(image, psf, options(DeconvolutionMethod.RL, 1), Monitor.NONE));
			System.out.printf(Locale.ROOT, "    first run (1 iteration, 2 threads): %.2f s, of which FFT planning %.2f s%n", (System.nanoTime() - s0) / 1e9,
					FftBackend.planningSeconds() - planning0);
			perIteration(image, psf, p, backend, bound);
		}
		if (old == null) System.clearProperty(FftBackend.PROPERTY);
		else System.setProperty(FftBackend.PROPERTY, old);
		// memory: the live heap measured by a full GC inside an iteration (all solver arrays live), minus the heap
		// before the run (the input image); JMX pool peaks are also printed, an upper bound with garbage
		final long base = usedAfterGc();
		resetPeaks();
		final long[] live = new long[2];
		Deconvolution.run(image, psf, options(DeconvolutionMethod.RL, 2), null, Monitor.NONE, (r, v) -> {
			if (r.iteration() == 1) {
				live[0] = usedAfterGc();
				live[1] = FftBackend.nativeBytes();
			}
		});
		System.out.printf(Locale.ROOT, "  heap during RL (%s): live %.2f x padded volume in float + native buffers %.2f x (solver accounting %.2f), JMX pool peaks %.2f x%n",
				FftBackend.selected().key(), (live[0] - base) / (4.0 * padded), live[1] / (4.0 * padded), Deconvolution.bytesNeeded(n, PSF, options(DeconvolutionMethod.RL, 1)) / (4.0 * padded),
				(peakHeap() - base) / (4.0 * padded));
	}

	private static void perIteration(final Volume image, final Volume psf, final int[] p, final FftBackend backend, final double[] bound) {
		// rounds interleave 1 and 2 threads, so that a drift of a shared machine hits both alike; medians of rounds
		final int rounds = 3;
		final double[][] iter = new double[3][rounds], fft = new double[3][rounds];
		for (int round = 0; round < rounds; round++)
			for (final int threads : new int[] { 1, 2 }) {
				final int r = round;
				fft[threads][r] = Parallelization.runWithNumThreads(threads, () -> bareFft(p));
				iter[threads][r] = Parallelization.runWithNumThreads(threads, () -> secondsPerIteration(image, psf, DeconvolutionMethod.RL, 5));
			}
		final double[] it = new double[3], ff = new double[3];
		for (final int threads : new int[] { 1, 2 }) {
			it[threads] = median(iter[threads]);
			ff[threads] = median(fft[threads]);
			System.out.printf(Locale.ROOT, "    %d thread(s): RL iteration %.3f s | bare FFT bound %.3f s | ratio %.3f (medians of %d rounds)%n", threads,
					it[threads], ff[threads], it[threads] / ff[threads], rounds);
			if (bound[threads] > 0)
				System.out.printf(Locale.ROOT, "      iteration / FFTW bound of the padded grid: %.2f%n", it[threads] / bound[threads]);
			System.out.printf(Locale.ROOT, "RESULT %d %s_iteration_%d %.5f%n", image.shape()[0], backend.key(), threads, it[threads]);
		}
		final double[] speedUps = new double[rounds];
		for (int r = 0; r < rounds; r++) speedUps[r] = iter[1][r] / iter[2][r];
		Arrays.sort(speedUps);
		System.out.printf(Locale.ROOT, "    speed-up 2 threads vs 1: %.2f (rounds %.2f to %.2f; FFT bound alone: %.2f)%n", it[1] / it[2], speedUps[0],
				speedUps[rounds - 1], ff[1] / ff[2]);
		final double acc = Parallelization.runWithNumThreads(2, () -> secondsPerIteration(image, psf, DeconvolutionMethod.RL_ACCELERATED, 6));
		System.out.printf(Locale.ROOT, "    accelerated RL iteration (2 threads) %.3f s = %.2f x a plain one%n", acc, acc / it[2]);
	}

	/**
	 * Median interval between successive iteration reports. With one thread all work runs on the calling
	 * thread, so its CPU time per iteration is printed too: a figure that a busy shared machine disturbs far
	 * less than wall time.
	 */
	private static double secondsPerIteration(final Volume image, final Volume psf, final DeconvolutionMethod method, final int iterations) {
		final List<Long> stamps = new ArrayList<>(), cpu = new ArrayList<>();
		final ThreadMXBean tb = ManagementFactory.getThreadMXBean();
		Deconvolution.run(image, psf, options(method, iterations), null, Monitor.NONE, (r, v) -> {
			stamps.add(System.nanoTime());
			cpu.add(tb.getCurrentThreadCpuTime());
		});
		final double[] d = new double[stamps.size() - 1], c = new double[stamps.size() - 1];
		for (int i = 1; i < stamps.size(); i++) {
			d[i - 1] = (stamps.get(i) - stamps.get(i - 1)) / 1e9;
			c[i - 1] = (cpu.get(i) - cpu.get(i - 1)) / 1e9;
		}
		if (Parallelization.getTaskExecutor().getParallelism() == 1)
			System.out.printf(Locale.ROOT, "    1 thread: %s iteration CPU time %.3f s (wall %.3f s)%n", method, median(c), median(d));
		return median(d);
	}

	/**
	 * Time of 2 forward + 2 inverse real FFTs of the padded shape (all rows): the faster of the medians of the
	 * out-of-place path (separate real and spectrum arrays) and of the in-place path (one grid).
	 */
	private static double bareFft(final int[] p) {
		final RealFft f = new RealFft(p[0], p[1], p[2]);
		final float[] real = new float[f.realLength()], spec = f.newSpectrum(), grid = f.newGrid();
		final Random r = new Random(3);
		for (int i = 0; i < real.length; i++) real[i] = r.nextFloat();
		for (int i = 0; i < grid.length; i++) grid[i] = r.nextFloat();
		final double[] t = new double[5], u = new double[5], cpu = new double[5];
		final ThreadMXBean tb = ManagementFactory.getThreadMXBean();
		for (int rep = 0; rep < t.length; rep++) { // interleaved, so drifts of the machine hit both alike
			final long c0 = tb.getCurrentThreadCpuTime();
			long s = System.nanoTime();
			for (int k = 0; k < 2; k++) {
				f.forward(real, spec);
				f.inverse(spec, real);
			}
			t[rep] = (System.nanoTime() - s) / 1e9;
			s = System.nanoTime();
			for (int k = 0; k < 2; k++) {
				f.forwardInPlace(grid, f.allRows());
				f.inverseInPlace(grid, f.allRows());
			}
			u[rep] = (System.nanoTime() - s) / 1e9;
			cpu[rep] = (tb.getCurrentThreadCpuTime() - c0) / 2e9; // both paths: the mean of the two
		}
		if (Parallelization.getTaskExecutor().getParallelism() == 1)
			System.out.printf(Locale.ROOT, "    1 thread: bare FFT CPU time %.3f s (mean of both paths)%n", median(Arrays.copyOfRange(cpu, 1, cpu.length)));
		final double outOfPlace = median(Arrays.copyOfRange(t, 1, t.length)), inPlace = median(Arrays.copyOfRange(u, 1, u.length)); // first: warm-up
		System.out.printf(Locale.ROOT, "    bare FFT: out-of-place %.3f s, in-place %.3f s%n", outOfPlace, inPlace);
		return Math.min(outOfPlace, inPlace);
	}

	private static void timeToQuality(final Volume image, final Volume psf) {
		Parallelization.runWithNumThreads(2, () -> {
			final DeconvolutionResult plain = Deconvolution.run(image, psf, options(DeconvolutionMethod.RL, 50), Monitor.NONE);
			final double target = plain.logLikelihood();
			final List<double[]> reports = new ArrayList<>();
			Deconvolution.run(image, psf, options(DeconvolutionMethod.RL_ACCELERATED, 50), null, Monitor.NONE,
					(r, v) -> reports.add(new double[] { r.iteration(), r.logLikelihood() }));
			int reached = -1;
			for (final double[] r : reports)
				if (r[1] >= target) {
					reached = (int) r[0];
					break;
				}
			if (reached < 0) {
				System.out.println("  time-to-quality: accelerated RL did not reach plain RL's 50-iteration log-likelihood in 50 iterations");
				return null;
			}
			// the report of iteration j is the log-likelihood of the extrapolated point entering it; the RL step from
			// that point cannot lower it (EM property), so a run of j iterations ends at or above the target. A
			// shorter run may too (its last RL step can cross the target): the fewest iterations whose run ends at
			// or above the target are used, checked on the result of each run. Whole runs are timed (set-up and
			// the final log-likelihood included), plain and accelerated interleaved.
			int fewest = reached;
			for (int j = Math.max(1, reached - 2); j < reached; j++)
				if (Deconvolution.run(image, psf, options(DeconvolutionMethod.RL_ACCELERATED, j), Monitor.NONE).logLikelihood() >= target) {
					fewest = j;
					break;
				}
			final int k = fewest, rounds = 3;
			final double[] plainSeconds = new double[rounds], accSeconds = new double[rounds];
			DeconvolutionResult acc = null;
			for (int round = 0; round < rounds; round++) {
				long s = System.nanoTime();
				Deconvolution.run(image, psf, options(DeconvolutionMethod.RL, 50), Monitor.NONE);
				plainSeconds[round] = (System.nanoTime() - s) / 1e9;
				s = System.nanoTime();
				acc = Deconvolution.run(image, psf, options(DeconvolutionMethod.RL_ACCELERATED, k), Monitor.NONE);
				accSeconds[round] = (System.nanoTime() - s) / 1e9;
			}
			System.out.printf(Locale.ROOT,
					"  time-to-quality (2 threads, medians of %d rounds): plain RL 50 iterations %.2f s (log-likelihood %.7g); accelerated RL %d iterations %.2f s (%.7g, %s); ratio %.2f%n",
					rounds, median(plainSeconds), target, k, median(accSeconds), acc.logLikelihood(), acc.logLikelihood() >= target ? "reached" : "NOT reached",
					median(plainSeconds) / median(accSeconds));
			System.out.printf(Locale.ROOT, "RESULT %d %s_time_to_quality %.5f%n", image.shape()[0], FftBackend.selected().key(), median(accSeconds));
			return null;
		});
	}

	private static long usedAfterGc() {
		System.gc();
		System.gc();
		final Runtime rt = Runtime.getRuntime();
		return rt.totalMemory() - rt.freeMemory();
	}

	private static void resetPeaks() {
		for (final MemoryPoolMXBean b : ManagementFactory.getMemoryPoolMXBeans())
			if (b.getType() == MemoryType.HEAP) b.resetPeakUsage();
	}

	private static long peakHeap() {
		long s = 0;
		for (final MemoryPoolMXBean b : ManagementFactory.getMemoryPoolMXBeans())
			if (b.getType() == MemoryType.HEAP) s += b.getPeakUsage().getUsed();
		return s;
	}

	static double median(final double[] a) {
		final double[] s = a.clone();
		Arrays.sort(s);
		return s.length % 2 == 1 ? s[s.length / 2] : 0.5 * (s[s.length / 2 - 1] + s[s.length / 2]);
	}
}
