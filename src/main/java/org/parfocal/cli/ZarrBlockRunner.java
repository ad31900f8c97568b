package org.parfocal.cli;

import java.io.IOException;
import java.nio.file.Path;
import java.time.Instant;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import ij.IJ;

import net.imglib2.parallel.Parallelization;

import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.BlockSource;
import org.parfocal.blocks.Recipe;
import org.parfocal.command.DeconvolveRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.Provenance;
import org.parfocal.zarr.OmeZarr;
import org.parfocal.zarr.ZarrBlockSink;
import org.parfocal.zarr.ZarrBlockSource;

/**
 * The block runner's OME-Zarr side: a Zarr (or TIFF) input deconvolved block-wise into an OME-Zarr output, every
 * frame and channel in turn, each channel with its own PSF (one {@code --psf} file per channel, or one for all).
 * Blocks are aligned to the output's chunk grid ({@link BlockPlan#alignedTo}); the output's chunks are those of the
 * input (a TIFF input gets {@link OmeZarr#DEFAULT_CHUNK}). The output is written under a hidden name and renamed
 * when every chunk is on disk, with the provenance record in its {@code .zattrs}. A Zarr input with one frame and
 * channel may also be written to a TIFF.
 */
public final class ZarrBlockRunner {

	private ZarrBlockRunner() {}

	/** True when the input or the output is a Zarr (then this class runs, not the TIFF path). */
	public static boolean handles(final Path input, final Path output) {
		return OmeZarr.isZarr(input) || OmeZarr.isZarr(output);
	}

	/**
	 * Completes an OME-Zarr output with its record: 32-bit as written, or for {@code output=16-bit} converted to
	 * uint16 with one scaling for the whole image, recorded ({@link OmeZarr.Writer#completeSixteenBit}).
	 */
	public static void complete(final OmeZarr.Writer w, final VoxelSize voxelSize, final Recipe recipe, final Provenance.Builder record)
			throws IOException {
		if (recipe.sixteenBit()) w.completeSixteenBit(voxelSize, s -> BlockRunner.sixteenBitRecord(record, s).build().toJson());
		else w.complete(voxelSize, record.build().toJson());
	}

	/** What an input holds: frames, channels, {nx, ny, nz}, voxel size, chunk shape {x, y, z} for the output. */
	public record Layout(int frames, int channels, int[] shape, VoxelSize voxelSize, int[] chunk) {}

	/** The layout of a Zarr or TIFF input. */
	public static Layout layout(final Path input) throws IOException {
		if (OmeZarr.isZarr(input)) {
			final OmeZarr z = OmeZarr.open(input);
			return new Layout(z.frames(), z.channels(), z.shape(), z.voxelSize(), z.chunkShape());
		}
		try (TiffBlockSource s = TiffBlockSource.open(input)) {
			return new Layout(1, 1, s.shape(), s.voxelSize(), OmeZarr.DEFAULT_CHUNK.clone());
		}
	}

	/** Frame t, channel c of a Zarr or TIFF input as a block source (with a chunk cache for plane-wise passes). */
	public static BlockSource openSource(final Path input, final int t, final int c) throws IOException {
		return openSource(input, t, c, true);
	}

	/** As {@link #openSource(Path, int, int)}; without the cache for tasks that read one block (each chunk once anyway). */
	public static BlockSource openSource(final Path input, final int t, final int c, final boolean cache) throws IOException {
		if (OmeZarr.isZarr(input)) return new ZarrBlockSource(OmeZarr.open(input), t, c, cache ? 0 : -1);
		if (t != 0 || c != 0) throw new IllegalArgumentException(input.getFileName() + " has one frame and one channel");
		return TiffBlockSource.open(input);
	}

	/**
	 * The PSF of each channel: {@code psfFiles} holds one file per channel, one for all, or none (the recipe's).
	 *
	 * @throws IllegalArgumentException when the count matches neither
	 */
	public static List<Volume> psfs(final Recipe recipe, final List<String> psfFiles, final Layout l) {
		if (psfFiles != null && psfFiles.size() > 1 && psfFiles.size() != l.channels())
			throw new IllegalArgumentException("Give one PSF for all channels or one per channel: " + psfFiles.size() + " PSFs for " + l.channels() + " channels");
		final List<Volume> out = new ArrayList<>();
		for (int c = 0; c < l.channels(); c++) {
			final Recipe r = psfFiles == null || psfFiles.isEmpty() ? recipe : recipe.withPsfFile(psfFiles.get(psfFiles.size() == 1 ? 0 : c));
			out.add(BlockRunner.loadPsf(r, l.voxelSize(), l.shape()));
		}
		return out;
	}

	/**
	 * The output's layout and the plan of each channel. The output chunks are the input's, made smaller (halved,
	 * not below 16) along an axis where a block's core would be less than two chunks long, so that most chunks are
	 * reached by one block only (the others are seam chunks, assembled from fragments); the plans are then aligned
	 * to that grid.
	 */
	public record Plans(Layout output, List<BlockPlan> plans) {}

	/** See {@link Plans}. */
	public static Plans plans(final Layout l, final List<Volume> psfs, final Recipe recipe, final long budget, final int[] tile) {
		final List<BlockPlan> raw = new ArrayList<>();
		for (final Volume h : psfs)
			raw.add(DeconvolveRunner.plan(l.shape(), h.shape(), recipe.options(), budget, tile));
		final int[] chunk = l.chunk().clone();
		for (int d = 0; d < 3; d++) {
			int core = Integer.MAX_VALUE;
			for (final BlockPlan p : raw)
				if (p.tiles()[d] > 1) for (final var b : p.blocks()) core = Math.min(core, b.coreSize()[d]);
			while (chunk[d] > 16 && 2 * chunk[d] > core) chunk[d] = (chunk[d] + 1) / 2;
		}
		final Layout out = new Layout(l.frames(), l.channels(), l.shape(), l.voxelSize(), chunk);
		final List<BlockPlan> plans = new ArrayList<>();
		for (final BlockPlan p : raw) plans.add(p.alignedTo(chunk, recipe.options()));
		return new Plans(out, plans);
	}

	/** The plan of one channel, aligned to the input's chunks. */
	public static BlockPlan plan(final Layout l, final Volume psf, final Recipe recipe, final long budget, final int[] tile) {
		return DeconvolveRunner.plan(l.shape(), psf.shape(), recipe.options(), budget, tile).alignedTo(l.chunk(), recipe.options());
	}

	/** The provenance record of a Zarr run (as the TIFF runs record it, with the plan of each channel). */
	public static Provenance.Builder provenance(final Recipe recipe, final List<String> psfFiles, final Path input, final Layout l, final List<BlockPlan> plans,
			final String runner, final int threads) {
		final Provenance.Builder prov = Provenance.of("Deconvolve", recipe.text())
				.input(new Provenance.Input("image", input.getFileName().toString(), input.toAbsolutePath().toString(), null,
						l.shape()[0] + "x" + l.shape()[1] + "x" + l.shape()[2] + (l.channels() > 1 ? "x" + l.channels() + "c" : "")
								+ (l.frames() > 1 ? "x" + l.frames() + "t" : ""),
						null));
		final List<String> files = psfFiles == null || psfFiles.isEmpty() ? (recipe.psfPath() == null ? List.of() : List.of(recipe.psfPath())) : psfFiles;
		for (final String f : files) prov.input(new Provenance.Input("psf", Path.of(f).getFileName().toString(), f, null, null, null));
		if (plans.size() == 1) prov.run("block_plan", plans.get(0).describe());
		else {
			final Map<String, Object> m = new LinkedHashMap<>();
			for (int c = 0; c < plans.size(); c++) m.put("channel_" + (c + 1), plans.get(c).describe());
			prov.run("block_plan", m);
		}
		return prov.run("runner", runner).run("frames", l.frames()).run("channels", l.channels())
				.versions(BlockRunner.class.getPackage().getImplementationVersion(), IJ.getVersion(), System.getProperty("java.version"))
				.timing(0, threads, Instant.now().toString());
	}

	/**
	 * Runs the recipe on every frame and channel of {@code input} into {@code output} (OME-Zarr, or TIFF for one
	 * frame and channel). Threads come from the caller's {@link Parallelization} context.
	 */
	public static BlockRunner.Outcome run(final Recipe recipe, final List<String> psfFiles, final Path input, final Path output, final long budget,
			final int[] tile, final Monitor monitor) throws IOException {
		if (psfFiles == null || psfFiles.isEmpty()) recipe.requirePsf();
		if (input.toAbsolutePath().normalize().equals(output.toAbsolutePath().normalize()))
			throw new IllegalArgumentException("The output must differ from the input (inputs are never written)");
		final Layout in = layout(input);
		final List<Volume> psf = psfs(recipe, psfFiles, in);
		final Plans pl = plans(in, psf, recipe, budget, tile);
		final Layout l = pl.output();
		final List<BlockPlan> plans = pl.plans();
		final int threads = Parallelization.getTaskExecutor().getParallelism();
		final Provenance.Builder record = provenance(recipe, psfFiles, input, l, plans, "BlockRunner", threads);
		if (!OmeZarr.isZarr(output)) {
			if (l.frames() * l.channels() != 1)
				throw new IllegalArgumentException(input.getFileName() + " has " + l.frames() + " frame(s) and " + l.channels()
						+ " channel(s): write them to a .zarr output (a TIFF output takes one frame and channel)");
			try (BlockSource s = openSource(input, 0, 0)) {
				final TiffBlockSink sink = BlockRunner.sink(output, l.shape(), l.voxelSize(), recipe, record);
				final BlockDeconvolution.Result r = BlockDeconvolution.run(s, psf.get(0), recipe.options(), plans.get(0), sink, monitor);
				return new BlockRunner.Outcome(plans.get(0), r, output);
			}
		}
		final OmeZarr.Writer w = OmeZarr.create(output, l.frames(), l.channels(), l.shape(), l.chunk(), l.voxelSize());
		final Path fragments = w.hidden().resolveSibling(w.hidden().getFileName() + ".fragments");
		BlockDeconvolution.Result last = null;
		try {
			for (int t = 0; t < l.frames(); t++)
				for (int c = 0; c < l.channels(); c++)
					try (BlockSource s = openSource(input, t, c)) {
						final ZarrBlockSink sink = new ZarrBlockSink(w, t, c, plans.get(c), fragments);
						last = BlockDeconvolution.run(s, psf.get(c), recipe.options(), plans.get(c), sink, monitor);
					}
			complete(w, l.voxelSize(), recipe, record);
			return new BlockRunner.Outcome(plans.get(0), last, output);
		} catch (final IOException | RuntimeException | Error e) {
			w.abort();
			throw e;
		} finally {
			OmeZarr.deleteTree(fragments);
		}
	}
}
