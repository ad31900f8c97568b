package org.parfocal.spark;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;

import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaSparkContext;
import org.parfocal.blocks.Recipe;
import org.parfocal.core.Volume;
import org.parfocal.zarr.OmeZarr;
import org.parfocal.zarr.ZarrArray;

/**
 * Throughput of the Zarr {@code blocks} mode on a volume about 4 times larger than the heap, with 1 and 2 local
 * workers (one thread per task) measured in the same run, and the share of the block tasks' time spent reading
 * chunks and writing chunks and fragments. Not a unit test; prints figures only.
 *
 * <pre>
 * PARFOCAL_BENCH_HEAP=192m spark/bin/parfocal-spark-bench-zarr [iterations] [factor]   (defaults 3 iterations, 4x the heap)
 * </pre>
 *
 * Spark's memory manager refuses heaps under 450 MB; the benchmark sets {@code spark.testing.memory} so that
 * local mode starts in a smaller heap (the blocks are planned from the real free heap).
 * {@code -Dparfocal.bench.budgetMB=N} (through {@code JAVA_TOOL_OPTIONS}) plans both runs with the same budget per
 * block, so both cut the volume into the same blocks: the ratio is then the parallel scaling of the same work,
 * without the cost of the smaller blocks that two tasks sharing one heap otherwise get.
 */
public final class SparkZarrBench {

	private SparkZarrBench() {}

	public static void main(final String[] args) throws Exception {
		final int iterations = args.length > 0 ? Integer.parseInt(args[0]) : 3;
		final double factor = args.length > 1 ? Double.parseDouble(args[1]) : 4.0;
		if (args.length > 2) {
			run(iterations, factor, new int[] { Integer.parseInt(args[2]) });
			return;
		}
		// Each worker count in its own JVM (same heap, same classpath): a second Spark context in the JVM of the
		// first inherits its leftovers, so its blocks were planned from a smaller free heap and ran short of it.
		final double[] secs = new double[3], stages = new double[3];
		for (final int workers : new int[] { 1, 2 }) {
			final List<String> cmd = new java.util.ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString()));
			cmd.addAll(java.lang.management.ManagementFactory.getRuntimeMXBean().getInputArguments());
			cmd.addAll(List.of("-cp", System.getProperty("java.class.path"), SparkZarrBench.class.getName(), args.length > 0 ? args[0] : "3",
					args.length > 1 ? args[1] : "4", String.valueOf(workers)));
			final Process p = new ProcessBuilder(cmd).redirectErrorStream(true).start();
			try (var r = new java.io.BufferedReader(new java.io.InputStreamReader(p.getInputStream(), java.nio.charset.StandardCharsets.UTF_8))) {
				for (String line; (line = r.readLine()) != null;) {
					if (line.startsWith("WARN") || line.startsWith("INFO") || line.startsWith("SLF4J")) continue;
					System.out.println(line);
					if (line.startsWith("seconds ")) {
						final String[] f = line.split(" ");
						secs[workers] = Double.parseDouble(f[1]);
						stages[workers] = Double.parseDouble(f[2]);
					}
				}
			}
			if (p.waitFor() != 0) throw new IllegalStateException("local[" + workers + "] run failed (exit " + p.exitValue() + ")");
		}
		System.out.printf(Locale.ROOT, "throughput local[2] / local[1] = %.2f (goal >= 1.8); Spark stages alone (without the driver's levels pass) %.2f%n",
				secs[1] / secs[2], stages[1] / stages[2]);
	}

	private static void run(final int iterations, final double factor, final int[] workerCounts) throws Exception {
		final long heap = Runtime.getRuntime().maxMemory();
		final int nz = 128;
		final int side = (int) Math.ceil(Math.sqrt(factor * heap / 4.0 / nz) / 16) * 16;
		final Path root = Files.createTempDirectory("parfocal-zarr-bench");
		try {
			final Volume h = SparkRunnerTest.psf(9, 7, 1.4, 1.1);
			SparkRunnerTest.write(h, root.resolve("psf.tif"));
			final Path in = root.resolve("volume.zarr");
			final long g0 = System.nanoTime();
			writeSynthetic(in, side, side, nz);
			final long bytes = 4L * side * side * nz;
			System.out.printf(Locale.ROOT, "input %d x %d x %d float32 = %.0f MB, %.2f x the heap (%.0f MB); written in %.1f s%n", side, side, nz, bytes / 1e6,
					(double) bytes / heap, heap / 1e6, (System.nanoTime() - g0) / 1e9);
			final Recipe recipe = Recipe.parse("psf=" + root.resolve("psf.tif") + " method=richardson-lucy iterations=" + iterations
					+ " regularization=0 stop=fixed edges=non-circulant offset=100 background=2");
			for (final int workers : workerCounts) {
				try (JavaSparkContext sc = new JavaSparkContext(new SparkConf().setMaster("local[" + workers + "]").setAppName("SparkZarrBench")
						.set("spark.ui.enabled", "false").set("spark.driver.host", "127.0.0.1").set("spark.driver.bindAddress", "127.0.0.1")
						.set("spark.testing.memory", String.valueOf(512L << 20)))) {
					for (int k = 0; k < 5; k++) SparkRunner.TASK_NANOS.set(k, 0);
					final Path out = root.resolve("out-" + workers + ".zarr");
					final long t0 = System.nanoTime();
					final SparkRunner.BlocksOutcome o = SparkRunner.runZarrBlocks(sc, recipe, List.of(), in, out, new SparkRunner.Settings(Long.getLong("parfocal.bench.budgetMB", 0L) << 20, null, 1), null);
					final double s = (System.nanoTime() - t0) / 1e9;
					final double task = SparkRunner.TASK_NANOS.get(0) / 1e9, read = SparkRunner.TASK_NANOS.get(1) / 1e9,
							write = SparkRunner.TASK_NANOS.get(2) / 1e9, seams = SparkRunner.TASK_NANOS.get(3) / 1e9,
							levels = SparkRunner.TASK_NANOS.get(4) / 1e9;
					System.out.printf(Locale.ROOT, "seconds %.3f %.3f%n", s, s - levels);
					System.out.printf(Locale.ROOT,
							"local[%d]: %.1f s (driver's levels pass %.1f s, one reading pass over the input), %.1f MVoxel/s, %s; block tasks %.1f s (reading %.1f%%, writing %.1f%%), seam chunks %.1f s; I/O share of the tasks' time %.1f%%, of the whole run %.1f%%%n",
							workers, s, levels, side * (double) side * nz / s / 1e6, o.plan(), task, 100 * read / task, 100 * write / task, seams,
							100 * (read + write + seams) / (task + seams), 100 * (levels + (read + write + seams) / workers) / s);
					OmeZarr.deleteTree(out);
				}
			}
		} finally {
			OmeZarr.deleteTree(root);
		}
	}

	/** An invented recording, chunk by chunk (never whole in memory): level 100 + 2 + bright spots, seeded noise. */
	static void writeSynthetic(final Path out, final int nx, final int ny, final int nz) throws Exception {
		final int[] cs = { 128, 128, 32 };
		final OmeZarr.Writer w = OmeZarr.create(out, 1, 1, new int[] { nx, ny, nz }, cs, SparkRunnerTest.VOXEL);
		final ZarrArray a = ZarrArray.open(w.hidden().resolve("0"));
		final float[] v = new float[cs[0] * cs[1] * cs[2]];
		for (int gz = 0; gz * cs[2] < nz; gz++)
			for (int gy = 0; gy * cs[1] < ny; gy++)
				for (int gx = 0; gx * cs[0] < nx; gx++) {
					int i = 0;
					for (int z = 0; z < cs[2]; z++)
						for (int y = 0; y < cs[1]; y++)
							for (int x = 0; x < cs[0]; x++) {
								final long X = gx * cs[0] + x, Y = gy * cs[1] + y, Z = gz * cs[2] + z;
								long hsh = (X * 0x9E3779B97F4A7C15L) ^ (Y * 0xC2B2AE3D27D4EB4FL) ^ (Z * 0x165667B19E3779F9L);
								hsh ^= hsh >>> 29;
								hsh *= 0xBF58476D1CE4E5B9L;
								hsh ^= hsh >>> 32;
								final double u = (hsh & 0xffffff) / (double) 0x1000000;
								final boolean spot = (X / 6 + Y / 6 + Z / 4) % 23 == 0 && X % 6 < 3 && Y % 6 < 3;
								v[i++] = (float) (102 + (spot ? 60 : 4) + 3 * (u - 0.5));
							}
					w.writeChunk(a, 0, 0, gx, gy, gz, v);
				}
		w.complete(SparkRunnerTest.VOXEL, null);
	}
}
