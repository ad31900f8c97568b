package org.parfocal.spark;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;

import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaSparkContext;
import org.parfocal.blocks.Recipe;
import org.parfocal.cli.BlockRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;

import net.imglib2.parallel.Parallelization;

/**
 * Throughput of the Spark runner over one folder of stacks with 1 and 2 local workers, against the plain
 * single-machine loop ({@link BlockRunner#run} on each stack in turn, as the batch entry does) measured in the
 * same run. Not a unit test; prints figures only.
 *
 * <pre>
 * spark/bin/parfocal-spark-bench [stacks] [iterations]     (defaults 8 stacks of 96 x 96 x 32, 20 RL iterations)
 * </pre>
 */
public final class SparkRunnerBench {

	private SparkRunnerBench() {}

	public static void main(final String[] args) throws Exception {
		final int n = args.length > 0 ? Integer.parseInt(args[0]) : 8, iterations = args.length > 1 ? Integer.parseInt(args[1]) : 20;
		final Path root = Files.createTempDirectory("parfocal-spark-bench");
		try {
			final Path in = Files.createDirectory(root.resolve("in"));
			final Volume h = SparkRunnerTest.psf(9, 7, 1.4, 1.1);
			SparkRunnerTest.write(h, root.resolve("psf.tif"));
			for (int i = 0; i < n; i++) SparkRunnerTest.write(SparkRunnerTest.recording(100 + i, 96, 96, 32, h), in.resolve(String.format("cell-%02d.tif", i)));
			final Recipe recipe = Recipe.parse("psf=" + root.resolve("psf.tif") + " method=richardson-lucy iterations=" + iterations
					+ " regularization=0 stop=fixed edges=non-circulant offset=auto background=auto");
			final List<Path> stacks = SparkRunner.stacksIn(in);
			System.out.printf(Locale.ROOT, "%d stacks of 96 x 96 x 32 (float TIFF), PSF 9 x 9 x 7, Richardson-Lucy %d iterations, %d cores%n", n, iterations,
					Runtime.getRuntime().availableProcessors());

			// warm-up of the JIT on one stack, not timed
			BlockRunner.run(recipe, stacks.get(0), root.resolve("warm.tif"), 0, null, Monitor.NONE);

			// each loop twice, the second (warm) timed, as the Spark jobs' second run
			loop(recipe, stacks, Files.createDirectory(root.resolve("loop1a")), 1);
			final double loop1 = loop(recipe, stacks, Files.createDirectory(root.resolve("loop1")), 1);
			loop(recipe, stacks, Files.createDirectory(root.resolve("loop2a")), 2);
			final double loop2 = loop(recipe, stacks, Files.createDirectory(root.resolve("loop2")), 2);
			final double[] s1 = spark(1, recipe, stacks, root.resolve("spark1"));
			final double[] s2 = spark(2, recipe, stacks, root.resolve("spark2"));

			System.out.printf(Locale.ROOT, "%-46s %8s %10s%n", "run", "seconds", "stacks/min");
			row("plain loop, 1 thread (baseline, warm)", loop1, n);
			row("plain loop, 2 threads per stack (warm)", loop2, n);
			row("Spark local[1], job (first / second)", s1[1], n);
			row("", s1[2], n);
			row("Spark local[2], job (first / second)", s2[1], n);
			row("", s2[2], n);
			System.out.printf(Locale.ROOT, "Spark start-up (context) %.1f s with local[1], %.1f s with local[2]%n", s1[0], s2[0]);
			System.out.printf(Locale.ROOT, "overhead of Spark local[1] vs the plain 1-thread loop: %.2fx (job, warm), %.2fx (start-up + first job)%n",
					s1[2] / loop1, (s1[0] + s1[1]) / loop1);
			System.out.printf(Locale.ROOT, "Spark local[2] vs local[1]: %.2fx the throughput (warm jobs)%n", s1[2] / s2[2]);
			System.out.printf(Locale.ROOT, "Spark local[2] vs the plain loop with 2 threads per stack: %.2fx the throughput (warm)%n", loop2 / s2[2]);
		} finally {
			SparkRunner.deleteTree(root);
		}
	}

	private static void row(final String name, final double seconds, final int n) {
		System.out.printf(Locale.ROOT, "%-46s %8.2f %10.1f%n", name, seconds, 60.0 * n / seconds);
	}

	private static double loop(final Recipe recipe, final List<Path> stacks, final Path out, final int threads) {
		final long t0 = System.nanoTime();
		Parallelization.runWithNumThreads(threads, () -> {
			for (final Path p : stacks)
				try {
					BlockRunner.run(recipe, p, out.resolve(p.getFileName()), 0, null, Monitor.NONE);
				} catch (final Exception e) {
					throw new IllegalStateException(e);
				}
		});
		return (System.nanoTime() - t0) / 1e9;
	}

	/** {start-up s, first job s, second job s}. */
	private static double[] spark(final int workers, final Recipe recipe, final List<Path> stacks, final Path out) {
		final long t0 = System.nanoTime();
		try (JavaSparkContext sc = new JavaSparkContext(new SparkConf().setMaster("local[" + workers + "]").setAppName("SparkRunnerBench")
				.set("spark.ui.enabled", "false").set("spark.driver.host", "127.0.0.1").set("spark.driver.bindAddress", "127.0.0.1"))) {
			final double start = (System.nanoTime() - t0) / 1e9;
			final double[] r = { start, 0, 0 };
			for (int rep = 1; rep <= 2; rep++) {
				final long t1 = System.nanoTime();
				final List<SparkRunner.StackStatus> rows = SparkRunner.runStacks(sc, recipe, stacks, out.resolve("rep" + rep), SparkRunner.Settings.DEFAULT);
				r[rep] = (System.nanoTime() - t1) / 1e9;
				if (!rows.stream().allMatch(SparkRunner.StackStatus::ok)) throw new IllegalStateException("a stack failed: " + rows);
			}
			return r;
		}
	}
}
