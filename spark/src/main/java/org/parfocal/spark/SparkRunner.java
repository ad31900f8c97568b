package org.parfocal.spark;

import java.io.IOException;
import java.io.Serializable;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;

import org.apache.spark.SparkConf;
import org.apache.spark.SparkEnv;
import org.apache.spark.TaskContext;
import org.apache.spark.api.java.JavaSparkContext;
import org.apache.spark.broadcast.Broadcast;


import net.imglib2.parallel.Parallelization;

import org.parfocal.blocks.Block;
import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.Recipe;
import org.parfocal.cli.BlockRunner;
import org.parfocal.cli.RunArgs;
import org.parfocal.cli.TiffBlockSink;
import org.parfocal.cli.TiffBlockSource;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.cli.ZarrBlockRunner;
import org.parfocal.zarr.OmeZarr;
import org.parfocal.zarr.ZarrBlockSink;

/**
 * One deconvolution recipe run on Apache Spark, in two ways.
 *
 * <pre>
 * SparkRunner stacks RECIPE INPUT_FOLDER OUTPUT_FOLDER [--psf FILE] [--budget MB] [--block X,Y,Z] [--threads N]
 * SparkRunner blocks RECIPE INPUT.tif OUTPUT.tif       [--psf FILE] [--budget MB] [--block X,Y,Z] [--threads N]
 * SparkRunner blocks RECIPE INPUT.zarr OUTPUT.zarr     [--psf FILE[,FILE per channel]] [--budget MB] [--block X,Y,Z] [--threads N]
 * </pre>
 *
 * RECIPE is what {@link BlockRunner} takes: a file with the {@code Deconvolve...} macro options or a provenance
 * JSON record of a recorded run, or the options text itself ({@link Recipe#read}). Every path must be on a file
 * system that the driver and all executors see under the same name.
 * <ul>
 * <li><b>stacks</b>: every {@code .tif}/{@code .tiff} (and {@code .zarr} image, written as {@code .zarr}) of the input folder is one Spark task, which runs the
 * engine as {@link BlockRunner} does (block-wise only when the stack does not fit the task's share of the
 * executor heap, or with {@code --block}). Output {@code <stack>-deconvolved.tif} in the output folder (with -2,
 * -3, … when taken: an existing file is never replaced), written under a hidden name and renamed when complete.
 * A stack that fails (unreadable, corrupt, bad values) becomes a failed row and the others go on;
 * {@code spark-summary.csv} lists every stack.</li>
 * <li><b>blocks</b>: one huge stack. The driver reads the stack once for the shared levels
 * ({@link BlockDeconvolution#levels}) and makes the {@link BlockPlan}; each task deconvolves one block and
 * writes it as a part file into a hidden folder beside the output; the driver adds the parts in block order into
 * a {@link TiffBlockSink} and commits. On any failure the sink is aborted and the parts deleted: nothing is left
 * under the output name. With a {@code .zarr} output (input {@code .zarr} or TIFF) the tasks write the output's
 * chunks themselves, see {@link #runZarrBlocks}.</li>
 * </ul>
 * Threads per task: {@code --threads}, else {@code spark.task.cpus} (default 1). The master comes from
 * {@code spark-submit --master}; run with plain {@code java} it is {@code local[*]}. Exit code 0 when
 * everything succeeded, 1 on any failure (one line {@code Error: …}), 2 for bad usage.
 */
public final class SparkRunner {

	/** Added to a stack's name to make its output's name. */
	public static final String SUFFIX = "-deconvolved";
	/** The table of a {@code stacks} run, in the output folder. */
	public static final String SUMMARY = "spark-summary.csv";
	private static final String PART_MAGIC = "PFBLK1";
	/**
	 * Test hook (a Spark setting): a marker file path. The first attempt of the middle block task of a Zarr
	 * {@code blocks} run creates it and stops with an I/O error after writing two of its files, as a killed task
	 * would; Spark retries the task (with {@code local[N,2]} or {@code spark.task.maxFailures} ≥ 2).
	 */
	public static final String FAIL_ONCE = "spark.parfocal.test.failOnceMarker";
	/**
	 * Nanoseconds spent by the Zarr block tasks of this JVM: [0] in all, [1] reading the input, [2] writing chunks
	 * and fragments, [3] finishing seam chunks (read, add, write); [4] the driver's levels pass. For the benchmark
	 * (local mode: one JVM).
	 */
	static final java.util.concurrent.atomic.AtomicLongArray TASK_NANOS = new java.util.concurrent.atomic.AtomicLongArray(5);

	private SparkRunner() {}

	/**
	 * How tasks run.
	 *
	 * @param budget bytes per block; 0 = the task's share of the heap ({@link BlockPlan#heapBudget()} divided by
	 *        the tasks one executor runs at once)
	 * @param tile block size {x, y, z} (as {@code --block}), or null to plan from the budget
	 * @param threads threads per task; 0 = {@code spark.task.cpus}
	 */
	public record Settings(long budget, int[] tile, int threads) implements Serializable {
		private static final long serialVersionUID = 1L;

		public static final Settings DEFAULT = new Settings(0, null, 0);
	}

	/** One row of a {@code stacks} run. */
	public record StackStatus(String input, String output, boolean ok, String message, String plan, int iterations, double seconds)
			implements Serializable {
		private static final long serialVersionUID = 1L;
	}

	/** What a {@code blocks} run did. */
	public record BlocksOutcome(Path output, BlockPlan plan, BlockDeconvolution.Levels levels, int minIterations, int maxIterations, int emptyBlocks,
			double seconds) {

		/** The outcome of the block tasks {@code done} (a block with 0 iterations was empty), started at {@code t0}. */
		static BlocksOutcome of(final Path output, final BlockPlan plan, final BlockDeconvolution.Levels levels, final List<BlockStatus> done,
				final long t0) {
			int min = Integer.MAX_VALUE, max = 0, empty = 0;
			for (final BlockStatus b : done) {
				if (b.iterations() == 0) empty++;
				else {
					min = Math.min(min, b.iterations());
					max = Math.max(max, b.iterations());
				}
			}
			return new BlocksOutcome(output, plan, levels, min == Integer.MAX_VALUE ? 0 : min, max, empty, SparkRunner.seconds(t0));
		}
	}

	/** What one block task reports. */
	record BlockStatus(int index, boolean ok, String message, int iterations) implements Serializable {
		private static final long serialVersionUID = 1L;
	}

	/**
	 * The recipe as it travels to executors: its options text and PSF file (a {@link Recipe} holds the engine's
	 * option records, which are not serialisable).
	 */
	record RecipeText(String text, String psfPath) implements Serializable {
		private static final long serialVersionUID = 1L;

		static RecipeText of(final Recipe r) {
			// absolute: an executor's working folder is not the driver's
			return new RecipeText(r.text(), r.optics() != null || r.psfPath() == null ? null : Path.of(r.psfPath()).toAbsolutePath().toString());
		}

		Recipe recipe() {
			final Recipe r = Recipe.parse(text);
			return psfPath != null ? r.withPsfFile(psfPath) : r;
		}
	}

	/** A PSF as it travels to executors. */
	record PsfData(float[] data, int nx, int ny, int nz, double dx, double dy, double dz, String unit) implements Serializable {
		private static final long serialVersionUID = 1L;

		static PsfData of(final Volume v) {
			final VoxelSize s = v.voxelSize();
			return new PsfData(v.data().clone(), v.nx(), v.ny(), v.nz(), s.dx(), s.dy(), s.dz(), s.unit());
		}

		Volume volume() {
			return Volume.wrap(data.clone(), nx, ny, nz, new VoxelSize(dx, dy, dz, unit));
		}
	}

	// ---------------------------------------------------------------------------------------------------------
	// stacks: one task per stack

	/** The stacks of a folder: its {@code .tif}/{@code .tiff} files (not hidden), sorted by name. */
	public static List<Path> stacksIn(final Path folder) {
		if (!Files.isDirectory(folder)) throw new IllegalArgumentException("The input folder " + folder + " does not exist");
		try (Stream<Path> s = Files.list(folder)) {
			final List<Path> l = s.filter(p -> {
				final String n = p.getFileName().toString().toLowerCase(Locale.ROOT);
				if (n.startsWith(".")) return false;
				if (Files.isDirectory(p)) return n.endsWith(".zarr");
				return Files.isRegularFile(p) && (n.endsWith(".tif") || n.endsWith(".tiff"));
			}).sorted(Comparator.comparing(p -> p.getFileName().toString())).toList();
			if (l.isEmpty()) throw new IllegalArgumentException("No .tif stacks or .zarr images in " + folder);
			return l;
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot list " + folder + ": " + oneLine(e));
		}
	}

	/**
	 * Runs {@code recipe} on every stack, one Spark task each, into {@code outputDir}; writes
	 * {@value #SUMMARY} there (a free name if it exists) and returns its rows in input order. A stack that fails
	 * is a row with {@code ok == false} and leaves no file; the other stacks' outputs are kept.
	 *
	 * @throws IllegalArgumentException for a recipe without a PSF, or an output folder that is the input's, cannot
	 *         be made or is not writable
	 */
	public static List<StackStatus> runStacks(final JavaSparkContext sc, final Recipe recipe, final List<Path> inputs, final Path outputDir,
			final Settings settings) {
		recipe.requirePsf();
		final Path out = outputDir.toAbsolutePath().normalize();
		for (final Path in : inputs)
			if (in.toAbsolutePath().normalize().getParent().equals(out))
				throw new IllegalArgumentException("The output folder must differ from the input folder (inputs are never written)");
		try {
			Files.createDirectories(out);
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot create the output folder " + out + ": " + oneLine(e));
		}
		if (!Files.isWritable(out)) throw new IllegalArgumentException("The output folder " + out + " is not writable");
		// output names are chosen here, once, so that a retried task writes the same name
		final List<String[]> jobs = new ArrayList<>();
		final List<Path> taken = new ArrayList<>();
		for (final Path in : inputs) {
			final boolean zarr = OmeZarr.isZarr(in);
			final Path o = freeName(out, stem(in.getFileName().toString()) + SUFFIX + (zarr ? ".zarr" : ".tif"), taken);
			taken.add(o);
			jobs.add(new String[] { in.toAbsolutePath().toString(), o.toString() });
		}
		final RecipeText rt = RecipeText.of(recipe);
		final TaskSettings s = resolved(sc, settings);
		final List<StackStatus> rows = sc.parallelize(jobs, Math.max(1, jobs.size())).map(j -> stackTask(rt, j[0], j[1], s)).collect();
		writeSummary(out, rows);
		return rows;
	}

	/** One stack, on an executor: never throws for a bad stack, returns a failed row instead. */
	static StackStatus stackTask(final RecipeText rt, final String input, final String output, final TaskSettings s) {
		final long t0 = System.nanoTime();
		final Path in = Path.of(input), out = Path.of(output);
		final Path tmp = out.resolveSibling("." + out.getFileName() + ".task-" + attempt() + ".tif");
		try {
			if (Files.exists(out)) throw new IllegalArgumentException("Output " + out.getFileName() + " exists (outputs are never replaced)");
			final Recipe recipe = rt.recipe();
			if (OmeZarr.isZarr(in)) {
				// every frame and channel, written under a hidden name and renamed when complete (ZarrBlockRunner)
				final BlockRunner.Outcome o = Parallelization.runWithNumThreads(s.threads(), () -> {
					try {
						return ZarrBlockRunner.run(recipe, null, in, out, taskBudget(s), s.tile(), Monitor.NONE);
					} catch (final IOException e) {
						throw new UncheckedIOException(e);
					}
				});
				return new StackStatus(input, output, true, "", o.plan().toString(), o.result().maxIterations(), seconds(t0));
			}
			final String[] plan = new String[1];
			final int[] it = new int[1];
			Parallelization.runWithNumThreads(s.threads(), () -> {
				try (TiffBlockSource source = TiffBlockSource.open(in)) {
					final Volume psf = BlockRunner.loadPsf(recipe, source.voxelSize(), source.shape());
					final BlockPlan p = org.parfocal.command.DeconvolveRunner.plan(source.shape(), psf.shape(), recipe.options(), taskBudget(s), s.tile());
					final TiffBlockSink sink = BlockRunner.sink(tmp, source.shape(), source.voxelSize(), recipe,
							BlockRunner.provenance(recipe, in, source.shape(), psf, p, "SparkRunner stacks", s.threads()));
					final BlockDeconvolution.Result r = BlockDeconvolution.run(source, psf, recipe.options(), p, sink, Monitor.NONE);
					plan[0] = p.toString();
					it[0] = r.maxIterations();
				} catch (final IOException e) {
					throw new UncheckedIOException(e);
				}
			});
			publish(tmp, out);
			return new StackStatus(input, output, true, "", plan[0], it[0], seconds(t0));
		} catch (final RuntimeException | IOException | OutOfMemoryError e) {
			try {
				Files.deleteIfExists(tmp);
			} catch (final IOException x) {
				// the temporary name is hidden; nothing under the output name either way
			}
			return new StackStatus(input, output, false, message(e), "", 0, seconds(t0));
		}
	}

	// ---------------------------------------------------------------------------------------------------------
	// blocks: one task per block of one stack

	/**
	 * A prepared {@code blocks} run: the plan, the shared levels, the PSF and the open output. Made on the driver by
	 * {@link #prepareBlocks}; {@link #runBlocks(JavaSparkContext, BlockJob)} runs the tasks and assembles.
	 */
	public static final class BlockJob implements AutoCloseable {
		final Recipe recipe;
		final Path input, output, parts;
		final int[] shape;
		final long inputBytes;
		final long inputModified;
		final Volume psf;
		final BlockPlan plan;
		final BlockDeconvolution.Levels levels;
		final TiffBlockSink sink;
		final int threads;
		final long start;

		BlockJob(final Recipe recipe, final Path input, final Path output, final Path parts, final int[] shape, final long inputBytes,
				final long inputModified, final Volume psf, final BlockPlan plan, final BlockDeconvolution.Levels levels, final TiffBlockSink sink,
				final int threads, final long start) {
			this.threads = threads;
			this.recipe = recipe;
			this.input = input;
			this.output = output;
			this.parts = parts;
			this.shape = shape;
			this.inputBytes = inputBytes;
			this.inputModified = inputModified;
			this.psf = psf;
			this.plan = plan;
			this.levels = levels;
			this.sink = sink;
			this.start = start;
		}

		public BlockPlan plan() {
			return plan;
		}

		/** Removes everything written (the output's temporary files, the part files); nothing is left. */
		@Override
		public void close() {
			sink.abort();
			deleteTree(parts);
		}
	}

	/**
	 * Driver side of a {@code blocks} run: opens the stack, prepares the PSF, plans the blocks, reads the levels,
	 * opens the output (refused if it exists) and makes the hidden part folder beside it.
	 */
	public static BlockJob prepareBlocks(final JavaSparkContext sc, final Recipe recipe, final Path input, final Path output, final Settings settings)
			throws IOException {
		final long t0 = System.nanoTime();
		recipe.requirePsf();
		final Path in = input.toAbsolutePath().normalize(), out = output.toAbsolutePath().normalize();
		if (in.equals(out)) throw new IllegalArgumentException("The output must differ from the input (inputs are never written)");
		if (Files.exists(out)) throw new IllegalArgumentException("Output " + output + " exists: choose a new name (outputs are never replaced)");
		final TaskSettings s = resolved(sc, settings);
		try (TiffBlockSource source = TiffBlockSource.open(in)) {
			final long bytes = Files.size(in), modified = Files.getLastModifiedTime(in).toMillis();
			final Volume psf = BlockRunner.loadPsf(recipe, source.voxelSize(), source.shape());
			final BlockPlan plan = org.parfocal.command.DeconvolveRunner.plan(source.shape(), psf.shape(), recipe.options(), driverBudget(sc, s), s.tile());
			final BlockDeconvolution.Levels levels = BlockDeconvolution.levels(source, psf, recipe.options(), Monitor.NONE);
			final TiffBlockSink sink = BlockRunner.sink(out, source.shape(), source.voxelSize(), recipe,
					BlockRunner.provenance(recipe, in, source.shape(), psf, plan, "SparkRunner blocks", s.threads()));
			final Path parts = out.resolveSibling("." + out.getFileName() + ".parts-" + sc.sc().applicationId() + "-" + System.nanoTime());
			try {
				Files.createDirectory(parts);
			} catch (final IOException e) {
				sink.abort();
				throw new IllegalArgumentException("Cannot write beside " + output + ": " + oneLine(e));
			}
			return new BlockJob(recipe, in, out, parts, source.shape(), bytes, modified, psf, plan, levels, sink, s.threads(), t0);
		}
	}

	/** {@link #prepareBlocks} then {@link #runBlocks(JavaSparkContext, BlockJob)}. */
	public static BlocksOutcome runBlocks(final JavaSparkContext sc, final Recipe recipe, final Path input, final Path output, final Settings settings)
			throws IOException {
		return runBlocks(sc, prepareBlocks(sc, recipe, input, output, settings));
	}

	/**
	 * Runs one task per block, then adds the parts in block order into the output and commits it. On any failure
	 * (a task, a changed stack, a missing part) everything written is removed and the first failure is thrown as
	 * one line ({@link IllegalStateException} or {@link IllegalArgumentException}).
	 */
	public static BlocksOutcome runBlocks(final JavaSparkContext sc, final BlockJob job) throws IOException {
		try (job) {
			final RecipeText rt = RecipeText.of(job.recipe);
			final int threads = job.threads;
			final Broadcast<PsfData> psf = sc.broadcast(PsfData.of(job.psf));
			final BlockPlan plan = job.plan;
			final BlockDeconvolution.Levels levels = job.levels;
			final String input = job.input.toString(), parts = job.parts.toString();
			final int[] shape = job.shape;
			final long bytes = job.inputBytes, modified = job.inputModified;
			final List<Integer> indices = new ArrayList<>();
			for (int i = 0; i < plan.count(); i++) indices.add(i);
			final List<BlockStatus> done;
			try {
				done = new ArrayList<>(sc.parallelize(indices, Math.max(1, indices.size()))
						.map(i -> blockTask(rt, psf.value(), plan, levels, input, shape, bytes, modified, parts, i, threads)).collect());
			} finally {
				psf.destroy();
			}
			done.sort(Comparator.comparingInt(BlockStatus::index));
			for (final BlockStatus b : done)
				if (!b.ok()) throw new IllegalStateException("Block " + (b.index() + 1) + " of " + plan.count() + " failed: " + b.message());
			// the same order of additions as BlockDeconvolution.run: block index order
			for (final Block b : plan.blocks()) {
				final Volume part = readPart(partFile(job.parts, b.index()), b, job.psf.voxelSize());
				job.sink.add(part, b.outOrigin());
			}
			checkUnchanged(job.input, bytes, modified);
			job.sink.commit();
			return BlocksOutcome.of(job.output, plan, levels, done, job.start);
		}
	}

	/** One block, on an executor; writes its part file. Bad input gives a failed status, I/O trouble throws (Spark retries). */
	static BlockStatus blockTask(final RecipeText rt, final PsfData psfData, final BlockPlan plan, final BlockDeconvolution.Levels levels,
			final String input, final int[] shape, final long bytes, final long modified, final String parts, final int index, final int threads)
			throws IOException {
		final Block block = plan.blocks().get(index);
		try {
			final Path in = Path.of(input);
			checkUnchanged(in, bytes, modified);
			final Recipe recipe = rt.recipe();
			final Volume psf = psfData.volume();
			final int[] it = new int[1];
			final Volume part = Parallelization.runWithNumThreads(threads, () -> {
				try (TiffBlockSource source = TiffBlockSource.open(in)) {
					if (!Arrays.equals(source.shape(), shape)) throw new IllegalStateException(in.getFileName() + " changed size during the run");
					return BlockDeconvolution.deconvolve(source, psf, recipe.options(), plan, levels, block, Monitor.NONE, it);
				} catch (final IOException e) {
					throw new UncheckedIOException(e);
				}
			});
			writePart(Path.of(parts), block, part);
			return new BlockStatus(index, true, "", it[0]);
		} catch (final IllegalArgumentException | IllegalStateException | OutOfMemoryError e) {
			return new BlockStatus(index, false, message(e), 0);
		} catch (final RuntimeException e) {
			return failedBlock(index, e);
		}
	}

	// ---------------------------------------------------------------------------------------------------------
	// blocks of a Zarr (or TIFF) input into an OME-Zarr output: tasks write the chunks themselves

	/**
	 * {@code blocks} into an OME-Zarr output: no driver-side assembly. The driver plans (one plan per channel,
	 * aligned to the output's chunks), reads the shared levels of every frame and channel, and makes the output
	 * under a hidden name. Stage 1, one task per block of each frame and channel: deconvolve it and write the chunks
	 * only it reaches, plus a fragment for each seam chunk ({@link ZarrBlockSink#writeBlock}). Stage 2, tasks over
	 * the seam chunks: add each chunk's fragments in block order and write it ({@link ZarrBlockSink#finishChunk}).
	 * So every chunk is written by exactly one task; chunks and fragments are written to temporary files and
	 * renamed, and a retried task writes the same files with the same values, never a neighbour's. The driver then
	 * checks that every chunk exists, writes {@code .zattrs} (provenance, {@code complete: true}) and renames the
	 * output to its name. On any failure everything written is removed.
	 *
	 * @param psfFiles one PSF per channel, one for all, or empty (the recipe's)
	 * @param failOnce the test hook's marker file ({@link #FAIL_ONCE}), or null
	 */
	public static BlocksOutcome runZarrBlocks(final JavaSparkContext sc, final Recipe recipe, final List<String> psfFiles, final Path input,
			final Path output, final Settings settings, final String failOnce) throws IOException {
		final long t0 = System.nanoTime();
		final Path in = input.toAbsolutePath().normalize(), out = output.toAbsolutePath().normalize();
		if (in.equals(out)) throw new IllegalArgumentException("The output must differ from the input (inputs are never written)");
		if (!OmeZarr.isZarr(out))
			throw new IllegalArgumentException("A Zarr input is written to a .zarr output in Spark blocks mode: name the output *.zarr");
		if (Files.exists(out)) throw new IllegalArgumentException("Output " + output + " exists: choose a new name (outputs are never replaced)");
		final TaskSettings s = resolved(sc, settings);
		final ZarrBlockRunner.Layout li = ZarrBlockRunner.layout(in);
		final List<Volume> psfs = ZarrBlockRunner.psfs(recipe, psfFiles, li);
		final ZarrBlockRunner.Plans pl = ZarrBlockRunner.plans(li, psfs, recipe, s.tile() != null ? 0 : driverBudget(sc, s), s.tile());
		final ZarrBlockRunner.Layout l = pl.output();
		final List<BlockPlan> plans = pl.plans();
		final List<BlockDeconvolution.Levels> levels = new ArrayList<>();
		final long lv = System.nanoTime();
		for (int t = 0; t < l.frames(); t++)
			for (int c = 0; c < l.channels(); c++)
				try (var src = ZarrBlockRunner.openSource(in, t, c)) {
					levels.add(BlockDeconvolution.levels(src, psfs.get(c), recipe.options(), Monitor.NONE));
				}
		TASK_NANOS.addAndGet(4, System.nanoTime() - lv);
		final var record = ZarrBlockRunner.provenance(recipe, psfFiles, in, l, plans, "SparkRunner blocks", s.threads());
		final OmeZarr.Writer w = OmeZarr.create(out, l.frames(), l.channels(), l.shape(), l.chunk(), l.voxelSize());
		final Path fragments = w.hidden().resolveSibling(w.hidden().getFileName() + ".fragments");
		final List<PsfData> psfData = new ArrayList<>();
		for (final Volume h : psfs) psfData.add(PsfData.of(h));
		final Broadcast<List<PsfData>> bpsf = sc.broadcast(psfData);
		try {
			final RecipeText rt = RecipeText.of(recipe);
			final String inS = in.toString(), outS = w.output().toString(), hid = w.hidden().toString(), frag = fragments.toString();
			final int threads = s.threads(), nc = l.channels();
			final List<int[]> tasks = new ArrayList<>();
			for (int t = 0; t < l.frames(); t++)
				for (int c = 0; c < nc; c++)
					for (int b = 0; b < plans.get(c).count(); b++) tasks.add(new int[] { t, c, b });
			final int victim = plans.get(0).count() / 2;
			final List<BlockStatus> done = new ArrayList<>(sc.parallelize(tasks, Math.max(1, tasks.size())).map(k -> zarrBlockTask(rt,
					bpsf.value().get(k[1]), plans.get(k[1]), levels.get(k[0] * nc + k[1]), inS, outS, hid, frag, k[0], k[1], k[2], threads,
					k[0] == 0 && k[1] == 0 && k[2] == victim ? failOnce : null)).collect());
			for (final BlockStatus b : done)
				if (!b.ok()) throw new IllegalStateException("Block " + (b.index() + 1) + " failed: " + b.message());
			final List<int[]> seams = new ArrayList<>();
			for (int t = 0; t < l.frames(); t++)
				for (int c = 0; c < nc; c++)
					for (final int[] g : new ZarrBlockSink(w, t, c, plans.get(c), fragments).seamChunks()) seams.add(new int[] { t, c, g[0], g[1], g[2] });
			if (!seams.isEmpty()) {
				final int slices = Math.min(seams.size(), Math.max(1, 4 * sc.defaultParallelism()));
				sc.parallelize(seams, slices).foreach(g -> {
					final long a = System.nanoTime();
					new ZarrBlockSink(OmeZarr.Writer.of(outS, hid), g[0], g[1], plans.get(g[1]), Path.of(frag)).finishChunk(new int[] { g[2], g[3], g[4] });
					TASK_NANOS.addAndGet(3, System.nanoTime() - a);
				});
			}
			ZarrBlockRunner.complete(w, l.voxelSize(), recipe, record);
			return BlocksOutcome.of(out, plans.get(0), levels.get(0), done, t0);
		} catch (final IOException | RuntimeException | Error e) {
			w.abort();
			throw e;
		} finally {
			bpsf.destroy();
			deleteTree(fragments);
		}
	}

	/** One block of a Zarr {@code blocks} run, on an executor: writes its own chunks and seam fragments. */
	static BlockStatus zarrBlockTask(final RecipeText rt, final PsfData psfData, final BlockPlan plan, final BlockDeconvolution.Levels levels,
			final String input, final String output, final String hidden, final String fragments, final int t, final int c, final int index,
			final int threads, final String failOnce) throws IOException {
		final Block block = plan.blocks().get(index);
		final long start = System.nanoTime();
		try {
			final Recipe recipe = rt.recipe();
			final Volume psf = psfData.volume();
			final int[] it = new int[1];
			final Volume part = Parallelization.runWithNumThreads(threads, () -> {
				try (var source = ZarrBlockRunner.openSource(Path.of(input), t, c, false)) {
					final var timed = new org.parfocal.blocks.BlockSource() {
						@Override
						public int[] shape() { return source.shape(); }

						@Override
						public org.parfocal.core.VoxelSize voxelSize() { return source.voxelSize(); }

						@Override
						public Volume read(final int[] o, final int[] sz) throws IOException {
							final long a = System.nanoTime();
							try {
								return source.read(o, sz);
							} finally {
								TASK_NANOS.addAndGet(1, System.nanoTime() - a);
							}
						}
					};
					return BlockDeconvolution.deconvolve(timed, psf, recipe.options(), plan, levels, block, Monitor.NONE, it);
				} catch (final IOException e) {
					throw new UncheckedIOException(e);
				}
			});
			final ZarrBlockSink sink = new ZarrBlockSink(OmeZarr.Writer.of(output, hidden), t, c, plan, Path.of(fragments));
			final int[] written = new int[1];
			final long w0 = System.nanoTime();
			sink.writeBlock(block, part, failOnce == null ? null : () -> {
				if (++written[0] == 2 && firstAttempt(Path.of(failOnce)))
					throw new UncheckedIOException(new IOException("test hook: task attempt stopped after writing 2 of its files"));
			});
			TASK_NANOS.addAndGet(2, System.nanoTime() - w0);
			TASK_NANOS.addAndGet(0, System.nanoTime() - start);
			return new BlockStatus(index, true, "", it[0]);
		} catch (final IllegalArgumentException | IllegalStateException | OutOfMemoryError e) {
			return new BlockStatus(index, false, message(e), 0);
		} catch (final RuntimeException e) {
			return failedBlock(index, e);
		}
	}

	/**
	 * A block task's failure wrapped by a lambda or a stream: a bad-input cause becomes a failed block with its
	 * one line, an I/O cause is rethrown (Spark retries the task), anything else propagates.
	 */
	private static BlockStatus failedBlock(final int index, final RuntimeException e) throws IOException {
		final Throwable c = unwrap(e);
		if (c instanceof IllegalArgumentException || c instanceof IllegalStateException) return new BlockStatus(index, false, message(c), 0);
		if (c instanceof IOException io) throw io;
		throw e;
	}

	/** True the first time (creates the marker). */
	private static boolean firstAttempt(final Path marker) {
		try {
			Files.createFile(marker);
			return true;
		} catch (final IOException e) {
			return false;
		}
	}

	static Path partFile(final Path parts, final int index) {
		return parts.resolve(String.format(Locale.ROOT, "block-%06d.part", index));
	}

	/**
	 * A part file: {@value #PART_MAGIC}, block index, out origin and size (ints), then the weighted estimate
	 * (floats, x fastest), big-endian. Written under a temporary name and renamed, so a part is whole or absent.
	 */
	static void writePart(final Path parts, final Block b, final Volume part) throws IOException {
		final Path file = partFile(parts, b.index()), tmp = parts.resolve("." + file.getFileName() + "." + attempt());
		final float[] d = part.data();
		final ByteBuffer head = ByteBuffer.allocate(PART_MAGIC.length() + 4 * 7).order(ByteOrder.BIG_ENDIAN);
		head.put(PART_MAGIC.getBytes(StandardCharsets.US_ASCII)).putInt(b.index());
		for (int k = 0; k < 3; k++) head.putInt(b.outOrigin()[k]);
		for (int k = 0; k < 3; k++) head.putInt(b.outSize()[k]);
		head.flip();
		try (FileChannel ch = FileChannel.open(tmp, StandardOpenOption.CREATE, StandardOpenOption.TRUNCATE_EXISTING, StandardOpenOption.WRITE)) {
			while (head.hasRemaining()) ch.write(head);
			final ByteBuffer buf = ByteBuffer.allocate(1 << 20).order(ByteOrder.BIG_ENDIAN);
			for (int i = 0; i < d.length;) {
				buf.clear();
				while (i < d.length && buf.remaining() >= 4) buf.putFloat(d[i++]);
				buf.flip();
				while (buf.hasRemaining()) ch.write(buf);
			}
			ch.force(true);
		} catch (final IOException e) {
			Files.deleteIfExists(tmp);
			throw e;
		}
		// a retried or speculative attempt wrote the same numbers: replacing its part is harmless
		try {
			Files.move(tmp, file, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
		} catch (final AtomicMoveNotSupportedException e) {
			Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING);
		}
	}

	/** Reads a part file and checks that it is the block's. */
	static Volume readPart(final Path file, final Block b, final VoxelSize voxelSize) throws IOException {
		if (!Files.isRegularFile(file)) throw new IllegalStateException("The part of block " + (b.index() + 1) + " is missing (" + file + ")");
		final int[] s = b.outSize();
		final long n = (long) s[0] * s[1] * s[2];
		final int headBytes = PART_MAGIC.length() + 4 * 7;
		if (Files.size(file) != headBytes + 4 * n) throw new IllegalStateException("The part of block " + (b.index() + 1) + " has the wrong size");
		final Volume v = Volume.zeros(s[0], s[1], s[2], voxelSize);
		final float[] d = v.data();
		try (FileChannel ch = FileChannel.open(file, StandardOpenOption.READ)) {
			final ByteBuffer head = ByteBuffer.allocate(headBytes).order(ByteOrder.BIG_ENDIAN);
			readFully(ch, head);
			head.flip();
			final byte[] magic = new byte[PART_MAGIC.length()];
			head.get(magic);
			final int[] h = new int[7];
			for (int k = 0; k < 7; k++) h[k] = head.getInt();
			if (!PART_MAGIC.equals(new String(magic, StandardCharsets.US_ASCII)) || h[0] != b.index()
					|| !Arrays.equals(Arrays.copyOfRange(h, 1, 4), b.outOrigin()) || !Arrays.equals(Arrays.copyOfRange(h, 4, 7), s))
				throw new IllegalStateException("The part file " + file.getFileName() + " is not block " + (b.index() + 1) + "'s");
			final ByteBuffer buf = ByteBuffer.allocate(1 << 20).order(ByteOrder.BIG_ENDIAN);
			for (int i = 0; i < d.length;) {
				buf.clear();
				buf.limit((int) Math.min(buf.capacity(), 4L * (d.length - i)));
				readFully(ch, buf);
				buf.flip();
				while (buf.hasRemaining()) d[i++] = buf.getFloat();
			}
		}
		return v;
	}

	private static void readFully(final FileChannel ch, final ByteBuffer buf) throws IOException {
		while (buf.hasRemaining())
			if (ch.read(buf) < 0) throw new IOException("part file ended early");
	}

	private static void checkUnchanged(final Path in, final long bytes, final long modified) throws IOException {
		if (!Files.isRegularFile(in)) throw new IllegalStateException(in.getFileName() + " disappeared during the run: nothing was written");
		final long now = Files.size(in);
		if (now != bytes || Files.getLastModifiedTime(in).toMillis() != modified)
			throw new IllegalStateException(in.getFileName() + " changed on disk during the run (" + bytes + " bytes when the run started, now " + now
					+ "): nothing was written; run again on a stack that is not being written");
	}

	// ---------------------------------------------------------------------------------------------------------
	// shared

	/** Settings as tasks use them: budget in bytes (0 = {@code heapShare} of the heap), threads resolved. */
	record TaskSettings(long budget, int[] tile, int threads, int heapShare) implements Serializable {
		private static final long serialVersionUID = 1L;
	}

	/**
	 * The settings with the thread count and the heap share filled in from Spark's configuration: an executor
	 * runs {@code executor.cores / task.cpus} tasks at once (in local mode, the local parallelism), which share
	 * its heap.
	 */
	static TaskSettings resolved(final JavaSparkContext sc, final Settings s) {
		final int cpus = Math.max(1, sc.getConf().getInt("spark.task.cpus", 1));
		final int threads = s.threads() > 0 ? s.threads() : cpus;
		final boolean local = sc.master().startsWith("local");
		final int cores = local ? sc.defaultParallelism() : sc.getConf().getInt("spark.executor.cores", 1);
		return new TaskSettings(s.budget(), s.tile(), threads, Math.max(1, cores / cpus));
	}

	/** Bytes per block for a task: the given budget, or the heap budget of this JVM shared by its concurrent tasks. */
	static long taskBudget(final TaskSettings s) {
		return s.budget() > 0 ? s.budget() : Math.max(1, BlockPlan.heapBudget() / s.heapShare());
	}

	/**
	 * Bytes per block planned on the driver for the executors: the given budget; in local mode the heap budget
	 * shared by the concurrent tasks; on a cluster half of {@code spark.executor.memory} less Spark's reserved
	 * 300 MB, shared by the concurrent tasks.
	 */
	static long driverBudget(final JavaSparkContext sc, final TaskSettings s) {
		if (s.budget() > 0 || sc.master().startsWith("local")) return taskBudget(s);
		final long heap = sc.getConf().getSizeAsBytes("spark.executor.memory", "1g");
		return Math.max(1, (heap - (300L << 20)) / 2 / s.heapShare());
	}

	/** Moves a complete file to its final name, never replacing a file there. */
	static void publish(final Path tmp, final Path out) throws IOException {
		try {
			// a hard link fails atomically when the name is taken
			Files.createLink(out, tmp);
			Files.delete(tmp);
		} catch (final FileAlreadyExistsException e) {
			Files.deleteIfExists(tmp);
			throw new IllegalStateException("Output " + out.getFileName() + " appeared during the run; it was not replaced");
		} catch (final UnsupportedOperationException | IOException e) {
			if (Files.exists(out)) {
				Files.deleteIfExists(tmp);
				throw new IllegalStateException("Output " + out.getFileName() + " appeared during the run; it was not replaced");
			}
			Files.move(tmp, out);
		}
	}

	private static String attempt() {
		final TaskContext tc = TaskContext.get();
		final String exec = SparkEnv.get() == null ? "driver" : SparkEnv.get().executorId();
		return tc == null ? "local-" + System.nanoTime() : exec + "-" + tc.taskAttemptId();
	}

	static String stem(final String name) {
		final int dot = name.lastIndexOf('.');
		return dot > 0 ? name.substring(0, dot) : name;
	}

	private static Path freeName(final Path dir, final String name, final List<Path> taken) {
		Path p = dir.resolve(name);
		final String base = stem(name), ext = name.substring(base.length());
		for (int i = 2; Files.exists(p) || taken.contains(p) || Files.exists(p.resolveSibling("." + p.getFileName() + ".partial")); i++)
			p = dir.resolve(base + "-" + i + ext);
		return p;
	}

	private static Throwable unwrap(final Throwable e) {
		Throwable c = e;
		while ((c.getClass() == RuntimeException.class || c instanceof UncheckedIOException) && c.getCause() != null) c = c.getCause();
		return c;
	}

	static String message(final Throwable e) {
		final Throwable c = unwrap(e);
		if (c instanceof OutOfMemoryError) return "out of memory; give a smaller --budget or --block, or more executor memory";
		final String m = oneLine(c);
		return c instanceof IOException ? "input/output failed: " + m : m;
	}

	/** The message of {@code e} on one line (its class name when it has none). */
	static String oneLine(final Throwable e) {
		final String m = e.getMessage();
		return (m == null || m.isBlank() ? e.getClass().getSimpleName() : m).replace('\n', ' ');
	}

	private static double seconds(final long t0) {
		return (System.nanoTime() - t0) / 1e9;
	}

	static void writeSummary(final Path dir, final List<StackStatus> rows) {
		final StringBuilder sb = new StringBuilder("file,status,message,output,plan,iterations,seconds\n");
		for (final StackStatus r : rows)
			sb.append(csv(Path.of(r.input()).getFileName().toString())).append(',').append(r.ok() ? "ok" : "failed").append(',').append(csv(r.message()))
					.append(',').append(csv(r.ok() ? Path.of(r.output()).getFileName().toString() : "")).append(',').append(csv(r.plan())).append(',')
					.append(r.iterations()).append(',').append(String.format(Locale.ROOT, "%.2f", r.seconds())).append('\n');
		final Path csv = freeName(dir, SUMMARY, List.of());
		try {
			Files.writeString(csv, sb, StandardCharsets.UTF_8, StandardOpenOption.CREATE_NEW);
		} catch (final IOException e) {
			System.err.println("Cannot write the summary " + csv + ": " + oneLine(e));
		}
	}

	private static String csv(final String s) {
		if (s == null) return "";
		return s.contains(",") || s.contains("\"") || s.contains("\n") ? "\"" + s.replace("\"", "\"\"").replace('\n', ' ') + "\"" : s;
	}

	static void deleteTree(final Path dir) {
		if (dir == null || !Files.exists(dir)) return;
		try (Stream<Path> s = Files.walk(dir)) {
			for (final Path p : s.sorted(Comparator.reverseOrder()).toList()) Files.deleteIfExists(p);
		} catch (final IOException e) {
			System.err.println("Could not delete the part folder " + dir + ": " + oneLine(e));
		}
	}

	// ---------------------------------------------------------------------------------------------------------
	// command line

	public static void main(final String[] args) {
		System.exit(runMain(args));
	}

	/** The command line; returns the exit code. */
	public static int runMain(final String[] args) {
		final RunArgs a;
		try {
			a = RunArgs.parse(args);
		} catch (final RunArgs.Usage e) {
			return usage(e.getMessage());
		}
		final List<String> pos = a.positional();
		if (pos.size() != 4 || !(pos.get(0).equals("stacks") || pos.get(0).equals("blocks"))) return usage(null);
		final Recipe recipe;
		final List<String> psfs;
		final Settings settings;
		final List<Path> inputs;
		try {
			recipe = a.recipe(1);
			psfs = a.psfs();
			recipe.requirePsf();
			settings = new Settings(a.budgetBytes(), a.tile(), a.threads());
			if (pos.get(0).equals("stacks")) inputs = stacksIn(Path.of(pos.get(2)));
			else {
				inputs = List.of(Path.of(pos.get(2)));
				if (Files.exists(Path.of(pos.get(3))))
					throw new IllegalArgumentException("Output " + pos.get(3) + " exists: choose a new name (outputs are never replaced)");
			}
		} catch (final IllegalArgumentException | IllegalStateException e) {
			System.err.println("Error: " + oneLine(e));
			return 1;
		} catch (final IOException e) {
			System.err.println("Error: input/output failed: " + oneLine(e));
			return 1;
		}
		final SparkConf conf = new SparkConf().setAppName("Parfocal " + pos.get(0) + " " + Path.of(pos.get(2)).getFileName());
		if (!conf.contains("spark.master")) conf.setMaster("local[*]");
		try (JavaSparkContext sc = new JavaSparkContext(conf)) {
			if (pos.get(0).equals("stacks")) {
				final List<StackStatus> rows = runStacks(sc, recipe, inputs, Path.of(pos.get(3)), settings);
				long failed = 0;
				for (final StackStatus r : rows) {
					if (!r.ok()) failed++;
					System.out.println((r.ok() ? "done   " : "FAILED ") + Path.of(r.input()).getFileName() + (r.ok() ? " -> " + Path.of(r.output()).getFileName()
							: ": " + r.message()) + String.format(Locale.ROOT, " (%.1f s)", r.seconds()));
				}
				System.out.println("Spark stacks: " + (rows.size() - failed) + " of " + rows.size() + " done, " + failed + " failed; summary in "
						+ Path.of(pos.get(3)).resolve(SUMMARY));
				return failed == 0 ? 0 : 1;
			}
			final Path in = inputs.get(0), out = Path.of(pos.get(3));
			final BlocksOutcome o = ZarrBlockRunner.handles(in, out)
					? runZarrBlocks(sc, recipe, psfs, in, out, settings, sc.getConf().get(FAIL_ONCE, null))
					: runBlocks(sc, recipe, in, out, settings);
			System.out.println(String.format(Locale.ROOT, "Done: %s -> %s, %s, %.1f s", pos.get(2), pos.get(3), o.plan(), o.seconds()));
			return 0;
		} catch (final IllegalArgumentException | IllegalStateException e) {
			System.err.println("Error: " + oneLine(e));
			return 1;
		} catch (final IOException | UncheckedIOException e) {
			System.err.println("Error: input/output failed: " + oneLine(e));
			return 1;
		} catch (final Exception e) {
			// a failed Spark job (SparkException, thrown unchecked from Scala): its first cause in one line
			if (Boolean.getBoolean("parfocal.debug")) e.printStackTrace();
			System.err.println("Error: the Spark job failed: " + oneLine(rootCause(e)));
			return 1;
		}
	}

	private static Throwable rootCause(final Throwable e) {
		Throwable c = e;
		while (c.getCause() != null && c.getCause() != c) c = c.getCause();
		return c;
	}

	private static int usage(final String problem) {
		if (problem != null) {
			System.err.println("Error: " + problem);
			return 2;
		}
		System.err.println("Usage: SparkRunner stacks <recipe> <input folder> <output folder> [options: " + RunArgs.OPTIONS + "]");
		System.err.println("       SparkRunner blocks <recipe> <input.tif|.zarr> <output.tif|.zarr> [options]");
		return 2;
	}
}
