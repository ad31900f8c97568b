package org.parfocal.cli;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;

import net.imglib2.parallel.Parallelization;

import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.Recipe;
import org.parfocal.command.DeconvolveRunner;
import org.parfocal.command.PsfSource;
import org.parfocal.deconv.PsfPreparation;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Monitor;
import org.parfocal.core.SixteenBit;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.ij1.ImageBridge;
import org.parfocal.provenance.Provenance;
import org.parfocal.psf.PsfGrid;

/**
 * Block-wise deconvolution of one TIFF stack on disk, for stacks larger than the heap.
 *
 * <pre>
 * BlockRunner RECIPE input.tif output.tif [--budget MB] [--block X,Y,Z] [--psf FILE] [--threads N]
 * </pre>
 *
 * RECIPE is a file holding the {@code Deconvolve...} macro options or a provenance JSON record of a recorded run
 * (or the options text itself). The PSF is the recipe's {@code psf=} file, the recorded PSF input's path,
 * {@code --psf FILE}, or computed with {@code psf=from_optics}. The input is read and the output written a block
 * at a time ({@link TiffBlockSource}, {@link TiffBlockSink}); the block plan follows the heap (or
 * {@code --budget}) unless {@code --block} gives the tile size. The output's Info holds the provenance record
 * with the block plan. Exit 0 on success, 1 with one line {@code Error: …} on failure (nothing is left under the
 * output name), 2 for bad usage.
 */
public final class BlockRunner {

	private BlockRunner() {}

	public static void main(final String[] args) {
		System.exit(runMain(args));
	}

	static int runMain(final String[] args) {
		final RunArgs a;
		try {
			a = RunArgs.parse(args);
		} catch (final RunArgs.Usage e) {
			return usage(e.getMessage());
		}
		if (a.positional().size() != 3) return usage(null);
		try {
			return runChecked(a);
		} catch (final RuntimeException e) {
			// Parallelization wraps what the task threw
			Throwable c = e;
			while (c.getClass() == RuntimeException.class && c.getCause() != null) c = c.getCause();
			if (c instanceof IllegalArgumentException || c instanceof IllegalStateException || c instanceof Monitor.CancelledException) {
				System.err.println("Error: " + TiffBlockSource.oneLine(c));
				return 1;
			}
			if (c instanceof IOException || c instanceof java.io.UncheckedIOException) {
				System.err.println("Error: input/output failed: " + TiffBlockSource.oneLine(c));
				return 1;
			}
			throw e;
		}
	}

	private static int runChecked(final RunArgs a) {
		final java.util.List<String> pos = a.positional();
		try {
			final long start = System.nanoTime();
			final Recipe recipe = a.recipe(0);
			// --psf A.tif,B.tif: one PSF per channel (Zarr inputs with channels)
			final java.util.List<String> psfs = a.psfs();
			final long bytes = a.budgetBytes();
			final int[] tile = a.tile();
			final int n = a.threads() > 0 ? a.threads() : Runtime.getRuntime().availableProcessors();
			final Path in = Path.of(pos.get(1)), outPath = Path.of(pos.get(2));
			final Outcome out = Parallelization.runWithNumThreads(n, () -> ZarrBlockRunner.handles(in, outPath)
					? ZarrBlockRunner.run(recipe, psfs, in, outPath, bytes, tile, Monitor.NONE)
					: run(recipe, in, outPath, bytes, tile, Monitor.NONE));
			System.out.println(String.format(Locale.ROOT, "Done: %s -> %s, %s, %.1f s", pos.get(1), out.output() != null ? out.output() : pos.get(2), out.plan(),
					(System.nanoTime() - start) / 1e9));
			return 0;
		} catch (final IllegalArgumentException | IllegalStateException | Monitor.CancelledException e) {
			System.err.println("Error: " + TiffBlockSource.oneLine(e));
			return 1;
		} catch (final IOException | java.io.UncheckedIOException e) {
			System.err.println("Error: input/output failed: " + TiffBlockSource.oneLine(e));
			return 1;
		} catch (final OutOfMemoryError e) {
			if (Boolean.getBoolean("parfocal.debug")) e.printStackTrace();
			System.err.println("Error: out of memory; give a smaller --budget or --block, or more heap (-Xmx)");
			return 1;
		}
	}

	/** What a run did. */
	public record Outcome(BlockPlan plan, BlockDeconvolution.Result result, Path output) {}

	/**
	 * Runs one recipe on one TIFF stack block-wise into {@code output}.
	 *
	 * @param budget bytes per block, 0 for the heap's free memory
	 * @param tile tile size {x, y, z}, or null to plan from the budget
	 */
	public static Outcome run(final Recipe recipe, final Path input, final Path output, final long budget, final int[] tile, final Monitor monitor)
			throws IOException {
		if (ZarrBlockRunner.handles(input, output)) return ZarrBlockRunner.run(recipe, null, input, output, budget, tile, monitor);
		recipe.requirePsf();
		if (input.toAbsolutePath().normalize().equals(output.toAbsolutePath().normalize()))
			throw new IllegalArgumentException("The output must differ from the input (inputs are never written)");
		try (TiffBlockSource source = TiffBlockSource.open(input)) {
			final List<String> notes = new ArrayList<>();
			final Volume psf = loadPsf(recipe, source.voxelSize(), source.shape(), notes);
			for (final String n : notes) System.err.println("Note: " + n); // resampling and PSF box warnings, as the menu command's Log lines
			final BlockPlan plan = DeconvolveRunner.plan(source.shape(), psf.shape(), recipe.options(), budget, tile);
			final Provenance.Builder prov = provenance(recipe, input, source.shape(), psf, plan, "BlockRunner", Parallelization.getTaskExecutor().getParallelism());
			if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes)); // as the menu command records them
			final TiffBlockSink sink = sink(output, source.shape(), source.voxelSize(), recipe, prov);
			final BlockDeconvolution.Result r = BlockDeconvolution.run(source, psf, recipe.options(), plan, sink, monitor);
			return new Outcome(plan, r, sink.output());
		}
	}

	/** The provenance record of a block-wise run of one TIFF stack (the runners' name in {@code runner}). */
	public static Provenance.Builder provenance(final Recipe recipe, final Path input, final int[] shape, final Volume psf, final BlockPlan plan,
			final String runner, final int threads) {
		final Provenance.Builder prov = Provenance.of("Deconvolve", recipe.text())
				.input(new Provenance.Input("image", input.getFileName().toString(), input.toAbsolutePath().toString(), null,
						shape[0] + "x" + shape[1] + "x" + shape[2], null))
				.run("block_plan", plan.describe()).run("runner", runner);
		if (recipe.psfPath() != null) prov.input(new Provenance.Input("psf", Path.of(recipe.psfPath()).getFileName().toString(), recipe.psfPath(), null,
				psf.nx() + "x" + psf.ny() + "x" + psf.nz(), null));
		return prov.versions(BlockRunner.class.getPackage().getImplementationVersion(), IJ.getVersion(), System.getProperty("java.version"))
				.timing(0, threads, Instant.now().toString());
	}

	/**
	 * The TIFF output of a block-wise run, 32-bit, or 16-bit for {@code output=16-bit}: then its Info is
	 * {@link #sixteenBitInfo}, with the scaling decided at commit for the whole volume.
	 */
	public static TiffBlockSink sink(final Path output, final int[] shape, final VoxelSize voxelSize, final Recipe recipe, final Provenance.Builder prov) {
		final TiffBlockSink sink = new TiffBlockSink(output, shape, voxelSize, prov.build().toInfoText());
		return recipe.sixteenBit() ? sink.sixteenBit(s -> sixteenBitInfo(prov, s)) : sink;
	}

	/**
	 * The Info of a 16-bit output as the menu command writes it: the scaling line, then the record with
	 * {@code output_depth}, {@code output_offset} and {@code output_scale} in its run facts.
	 */
	public static String sixteenBitInfo(final Provenance.Builder prov, final SixteenBit.Scaling s) {
		return s.infoLine() + "\n" + sixteenBitRecord(prov, s).build().toInfoText();
	}

	/** {@code prov} with the 16-bit run facts the menu command records: {@code output_depth output_offset output_scale}. */
	public static Provenance.Builder sixteenBitRecord(final Provenance.Builder prov, final SixteenBit.Scaling s) {
		return prov.run("output_depth", SixteenBit.KEY).run("output_offset", s.offset()).run("output_scale", s.scale());
	}

	/** Recipe from a file (options text or provenance JSON) or from the argument itself. */
	public static Recipe readRecipe(final String arg) throws IOException {
		final Path p = Path.of(arg);
		final boolean file = !arg.contains("=") && Files.isRegularFile(p);
		if (!file && !arg.contains("=")) throw new IllegalArgumentException("Recipe " + arg + " is neither a file nor macro options (key=value ...)");
		return Recipe.read(file ? Files.readString(p, StandardCharsets.UTF_8) : arg);
	}

	/**
	 * The recipe's PSF, prepared as {@code Deconvolve...} prepares it ({@link PsfSource#prepare}, one code path):
	 * computed from the optics on a box fitted to the stack (its central plane for a 2D image), or read from a
	 * file and resampled to the image's voxel size when both are calibrated. Notes for the user are dropped; see
	 * {@link #loadPsf(Recipe, VoxelSize, int[], List)}.
	 *
	 * @param shape the image's {nx, ny, nz}
	 */
	public static Volume loadPsf(final Recipe recipe, final VoxelSize image, final int[] shape) {
		return loadPsf(recipe, image, shape, new ArrayList<>());
	}

	/** See {@link #loadPsf(Recipe, VoxelSize, int[])}; the preparation's notes (resampling, box warnings) go to {@code notes}. */
	public static Volume loadPsf(final Recipe recipe, final VoxelSize image, final int[] shape, final List<String> notes) {
		recipe.requirePsf();
		final PsfSource source;
		if (recipe.optics() != null) source = new PsfSource.FromOptics(recipe.optics());
		else {
			final Path p = Path.of(recipe.psfPath());
			if (!Files.isRegularFile(p)) throw new IllegalArgumentException("PSF file " + p + " does not exist");
			if (TiffCheck.hasTiffName(p)) TiffCheck.requireComplete(p);
			final ImagePlus imp = IJ.openImage(p.toString());
			if (imp == null) throw new IllegalArgumentException("PSF file " + p + " cannot be opened as an image");
			if (imp.getBitDepth() == 24) throw new IllegalArgumentException("PSF file " + p + " is an RGB image: a PSF is one grey channel");
			source = new PsfSource.Given(ImageBridge.toCore(imp), p.getFileName().toString(), false);
		}
		return source.prepare(new PsfPreparation.Target(shape[0], shape[1], shape[2], 1, image), notes).get(0);
	}

	private static int usage(final String problem) {
		if (problem != null) {
			System.err.println("Error: " + problem);
			return HeadlessMacro.EXIT_USAGE;
		}
		System.err.println("Usage: BlockRunner <recipe (options file, provenance JSON or options text)> <input.tif|.zarr> <output.tif|.zarr> [options: "
				+ RunArgs.OPTIONS + "]");
		return HeadlessMacro.EXIT_USAGE;
	}
}
