package org.parfocal.command;

import java.io.IOException;
import java.util.ArrayList;
import java.util.List;

import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.BlockSink;
import org.parfocal.blocks.BlockSource;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.IterationListener;
import org.parfocal.deconv.PsfPreparation;

/**
 * Deconvolve's run without a front end ({@link #run}): the PSF per channel ({@link PsfSource#prepare}), the one
 * decision whether the stack fits in the memory budget or goes block by block ({@link #blockwise}), and every
 * channel and frame through {@link Deconvolution} or {@link BlockDeconvolution}. The ImageJ command makes the image,
 * the Log lines and the record from its {@link Outcome}; the block runners choose their plan with {@link #plan}.
 * Threads come from the caller's context. No {@code ij.*}, no AWT.
 */
public final class DeconvolveRunner {

	/** System property (bytes) that overrides the memory budget deciding when to work block by block. */
	public static final String BUDGET_PROPERTY = "parfocal.blocks.budget";

	private DeconvolveRunner() {}

	/** What a front end adds to a run: watch mode's listeners, and lines the user should see at once. */
	public interface Hooks {

		/** No watch, nothing said. */
		Hooks NONE = new Hooks() {};

		/** A line for the user now (before the run is done), e.g. that the stack goes block by block. */
		default void notice(final String line) {}

		/** Called once before the first volume of a whole-stack run, after its memory check (watch mode prepares its references). */
		default void beforeVolumes(final Hyperstack in, final List<Volume> psfs, final Monitor monitor) {}

		/** The listener of the iterations of channel {@code c}, frame {@code t} of a whole-stack run. */
		default IterationListener listener(final int c, final int t, final Volume recording, final Volume psf) {
			return IterationListener.NONE;
		}
	}

	/**
	 * What a run made.
	 *
	 * @param psfs the PSF of each channel
	 * @param volumes the estimate of each volume, channel fastest
	 * @param results each volume's engine result (whole-stack run; empty block by block)
	 * @param plan the block plan, or null for a whole-stack run
	 * @param blockRuns each volume's block-wise result (empty for a whole-stack run)
	 * @param notes the notes for the user (PSF preparation, then the runs' own, each once)
	 */
	public record Outcome(List<Volume> psfs, List<Volume> volumes, List<DeconvolutionResult> results, BlockPlan plan,
			List<BlockDeconvolution.Result> blockRuns, List<String> notes) {

		/** True when the run went block by block. */
		public boolean blockwise() {
			return plan != null;
		}
	}

	/** The memory budget of a run: {@link #BUDGET_PROPERTY} when set, else {@link BlockPlan#heapBudget()}. */
	public static long budget() {
		return Long.getLong(BUDGET_PROPERTY, BlockPlan.heapBudget());
	}

	/**
	 * The decision: true when a stack of {@code shape} with a PSF of {@code psfShape} goes block by block under
	 * {@code budget} bytes ({@link BlockPlan#needed}). Watch mode needs the whole iterate, so it never does.
	 */
	public static boolean blockwise(final DeconvolveRequest request, final int[] shape, final int[] psfShape, final long budget) {
		return !request.watch() && BlockPlan.needed(shape, psfShape, request.deconvolution(), budget);
	}

	/**
	 * The plan of a run that goes block by block: tiles of about {@code tile} voxels when given
	 * ({@link BlockPlan#forTileSize}), else the fewest blocks that fit in {@code budget} bytes
	 * ({@link BlockPlan#forBudget}; 0 or less: {@link BlockPlan#heapBudget()}).
	 */
	public static BlockPlan plan(final int[] shape, final int[] psfShape, final DeconvolutionOptions options, final long budget, final int[] tile) {
		return tile != null ? BlockPlan.forTileSize(shape, psfShape, options, tile)
				: BlockPlan.forBudget(shape, psfShape, options, budget > 0 ? budget : BlockPlan.heapBudget());
	}

	/** {@link #run(DeconvolveRequest, Hyperstack, PsfSource, long, Hooks, List, Monitor)} with {@link #budget()} and no hooks. */
	public static Outcome run(final DeconvolveRequest request, final Hyperstack in, final PsfSource psf, final Monitor monitor) {
		return run(request, in, psf, 0, Hooks.NONE, new ArrayList<>(), monitor);
	}

	/**
	 * Deconvolves every channel and frame of {@code in} as {@code request} asks; the stack goes block by block when
	 * it does not fit in the budget ({@link #blockwise}). The request's image and PSF names are the front end's:
	 * {@code in} and {@code psf} are what they name.
	 *
	 * @param budget bytes, or 0 for {@link #budget()} (read after the PSFs are made)
	 * @param notes receives the notes for the user (also in the outcome)
	 * @throws IllegalArgumentException one line, for input the run cannot take or too little memory
	 */
	public static Outcome run(final DeconvolveRequest request, final Hyperstack in, final PsfSource psf, final long budget, final Hooks hooks,
			final List<String> notes, final Monitor monitor) {
		final List<Volume> psfs = psf.prepare(PsfPreparation.Target.of(in), notes);
		final long bytes = budget > 0 ? budget : budget();
		final int[] shape = in.first().shape(), psfShape = psfs.get(0).shape();
		return blockwise(request, shape, psfShape, bytes) ? inBlocks(request.deconvolution(), in, psfs, bytes, hooks, notes, monitor)
				: whole(request, in, psfs, hooks, notes, monitor);
	}

	private static Outcome whole(final DeconvolveRequest request, final Hyperstack in, final List<Volume> psfs, final Hooks hooks, final List<String> notes,
			final Monitor monitor) {
		final DeconvolutionOptions d = request.deconvolution();
		final int n = in.volumes().size();
		final long voxels = in.first().size();
		MemoryBudget.require(Deconvolution.bytesNeeded(in.first().shape(), psfs.get(0).shape(), d) + 8L * voxels + (request.watch() ? 8L * voxels * n : 0),
				"deconvolving " + in.nx() + " x " + in.ny() + " x " + in.nz());
		hooks.beforeVolumes(in, psfs, monitor);
		final List<DeconvolutionResult> results = new ArrayList<>();
		for (int t = 0; t < in.frames(); t++)
			for (int c = 0; c < in.channels(); c++) {
				final String where = n > 1 ? " (channel " + (c + 1) + ", frame " + (t + 1) + ")" : "";
				final IterationListener listener = hooks.listener(c, t, in.get(c, t), psfs.get(c));
				results.add(Deconvolution.run(in.get(c, t), psfs.get(c), d, null, share(monitor, results.size(), n, where), listener));
			}
		final List<Volume> volumes = new ArrayList<>();
		for (final DeconvolutionResult r : results) {
			volumes.add(r.estimate());
			addNew(notes, r.notes());
		}
		return new Outcome(psfs, volumes, results, null, List.of(), notes);
	}

	private static Outcome inBlocks(final DeconvolutionOptions d, final Hyperstack in, final List<Volume> psfs, final long budget, final Hooks hooks,
			final List<String> notes, final Monitor monitor) {
		final BlockPlan plan = BlockPlan.forBudget(in.first().shape(), psfs.get(0).shape(), d, budget);
		hooks.notice("the padded stack does not fit in " + MemoryBudget.format(budget) + "; deconvolving block by block: " + plan);
		MemoryBudget.require(4L * in.first().size() * in.volumes().size(), "the block-wise result");
		final int n = in.volumes().size();
		final List<BlockDeconvolution.Result> runs = new ArrayList<>();
		final List<Volume> volumes = new ArrayList<>();
		for (int t = 0; t < in.frames(); t++)
			for (int c = 0; c < in.channels(); c++) {
				final BlockSink.Memory sink = BlockSink.memory(in.first().shape(), in.voxelSize());
				try {
					runs.add(BlockDeconvolution.run(BlockSource.of(in.get(c, t)), psfs.get(c), d, plan, sink, share(monitor, volumes.size(), n, null)));
				} catch (final IOException e) {
					throw new IllegalStateException("Block-wise run failed: " + e.getMessage());
				}
				volumes.add(sink.result());
			}
		for (final BlockDeconvolution.Result r : runs) addNew(notes, r.notes());
		return new Outcome(psfs, volumes, List.of(), plan, runs, notes);
	}

	/** The progress of volume {@code index} of {@code n} as a share of the whole run; {@code where} (if not null) ends its status. */
	private static Monitor share(final Monitor monitor, final int index, final int n, final String where) {
		return new Monitor() {
			@Override
			public void progress(final int done, final int total, final String status) {
				monitor.progress(index * total + done, n * total, where == null ? status : status + where);
			}

			@Override
			public boolean isCancelled() {
				return monitor.isCancelled();
			}
		};
	}

	private static void addNew(final List<String> notes, final List<String> more) {
		for (final String note : more) if (!notes.contains(note)) notes.add(note);
	}
}
