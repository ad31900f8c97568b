package org.parfocal.zarr;

import java.io.IOException;
import java.io.Serializable;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.parfocal.blocks.Block;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.BlockSink;
import org.parfocal.core.Volume;

/**
 * One frame and channel of a block-wise result written into the chunks of an OME-Zarr output being made
 * ({@link OmeZarr.Writer}), so that every chunk is written by exactly one writer and never read back and
 * rewritten — which lets cluster tasks write their own chunks in parallel, and a retried task rewrite the same
 * chunks without touching its neighbours'.
 * <p>
 * The blocks' weighted estimates overlap in their blend zones. A chunk that only one block's estimate reaches
 * (its {@code outOrigin + outSize} box) is final as soon as that block is done: the block writes it
 * ({@link #writeBlock}). A chunk that several blocks reach (a seam chunk) gets from each of them a fragment file
 * (that block's estimate over the chunk, in a hidden fragment folder); when all blocks are done one writer per
 * seam chunk adds the fragments in block order and writes the chunk ({@link #finishChunk}). Adding in block order
 * from zero is what {@link BlockSink.Memory} and {@code BlockDeconvolution.run} do, so the result is the same
 * float for float. Chunks and fragments are written under temporary names and renamed.
 * <p>
 * As a {@link BlockSink} (one machine): {@link #add} is {@link #writeBlock}, {@link #commit} finishes the seam
 * chunks of this frame and channel; {@link #abort} removes the whole output being written and the fragments.
 */
public final class ZarrBlockSink implements BlockSink, Serializable {

	private static final long serialVersionUID = 1L;

	private final String output, hidden, fragments;
	private final int t, c;
	private final BlockPlan plan;
	private final int[] chunk, shape, grid;

	/**
	 * @param fragments folder for the seam fragments (made when needed; deleted by the caller when the output is complete)
	 */
	public ZarrBlockSink(final OmeZarr.Writer writer, final int t, final int c, final BlockPlan plan, final Path fragments) throws IOException {
		output = writer.output().toString();
		hidden = writer.hidden().toString();
		this.fragments = fragments.toString();
		this.t = t;
		this.c = c;
		this.plan = plan;
		final OmeZarr img = writer.image();
		chunk = img.chunkShape();
		shape = img.shape();
		if (!java.util.Arrays.equals(shape, plan.shape()))
			throw new IllegalArgumentException("The block plan is for a " + plan.shape()[0] + " x " + plan.shape()[1] + " x " + plan.shape()[2] + " stack, the output is "
					+ shape[0] + " x " + shape[1] + " x " + shape[2]);
		grid = new int[3];
		for (int d = 0; d < 3; d++) grid[d] = (shape[d] + chunk[d] - 1) / chunk[d];
	}

	private OmeZarr.Writer writer() {
		return OmeZarr.Writer.of(output, hidden);
	}

	/** Chunk grid {x, y, z} of one frame and channel. */
	public int[] grid() {
		return grid.clone();
	}

	/** Box {x0, y0, z0, x1, y1, z1} of chunk g, clipped to the image. */
	private int[] box(final int[] g) {
		final int[] b = new int[6];
		for (int d = 0; d < 3; d++) {
			b[d] = g[d] * chunk[d];
			b[3 + d] = Math.min(shape[d], b[d] + chunk[d]);
		}
		return b;
	}

	private static boolean meets(final Block k, final int[] b) {
		for (int d = 0; d < 3; d++)
			if (k.outOrigin()[d] >= b[3 + d] || k.outOrigin()[d] + k.outSize()[d] <= b[d]) return false;
		return true;
	}

	/** The blocks whose weighted estimates reach chunk g, in block order. */
	public List<Block> contributors(final int[] g) {
		final int[] b = box(g);
		final List<Block> l = new ArrayList<>();
		for (final Block k : plan.blocks())
			if (meets(k, b)) l.add(k);
		return l;
	}

	/** The seam chunks (reached by more than one block), {x, y, z} grid positions, in grid order. */
	public List<int[]> seamChunks() {
		final List<int[]> l = new ArrayList<>();
		for (int z = 0; z < grid[2]; z++)
			for (int y = 0; y < grid[1]; y++)
				for (int x = 0; x < grid[0]; x++) {
					final int[] g = { x, y, z };
					if (contributors(g).size() > 1) l.add(g);
				}
		return l;
	}

	private Path fragment(final int[] g, final int block) {
		return Path.of(fragments, t + "." + c, g[0] + "." + g[1] + "." + g[2], "block-" + block);
	}

	/**
	 * Writes block {@code b}'s weighted estimate {@code part} (over its out box): the chunks only it reaches, and a
	 * fragment for each seam chunk it reaches. Repeating it (a retried task) writes the same files again.
	 *
	 * @param afterChunk called after each file written (a test's way to stop a task half-way); may be null
	 */
	public void writeBlock(final Block b, final Volume part, final Runnable afterChunk) throws IOException {
		final ZarrArray a = ZarrArray.open(Path.of(hidden, "0"));
		final OmeZarr.Writer w = writer();
		final int[] o = b.outOrigin(), s = b.outSize();
		final int[] g0 = new int[3], g1 = new int[3];
		for (int d = 0; d < 3; d++) {
			g0[d] = o[d] / chunk[d];
			g1[d] = (o[d] + s[d] - 1) / chunk[d];
		}
		final float[] src = part.data();
		for (int gz = g0[2]; gz <= g1[2]; gz++)
			for (int gy = g0[1]; gy <= g1[1]; gy++)
				for (int gx = g0[0]; gx <= g1[0]; gx++) {
					final int[] g = { gx, gy, gz }, box = box(g);
					final List<Block> from = contributors(g);
					final int x0 = Math.max(o[0], box[0]), x1 = Math.min(o[0] + s[0], box[3]);
					final int y0 = Math.max(o[1], box[1]), y1 = Math.min(o[1] + s[1], box[4]);
					final int z0 = Math.max(o[2], box[2]), z1 = Math.min(o[2] + s[2], box[5]);
					if (from.size() == 1) {
						final float[] v = new float[chunk[0] * chunk[1] * chunk[2]];
						for (int z = z0; z < z1; z++)
							for (int y = y0; y < y1; y++) {
								final int dst = (x0 - box[0]) + chunk[0] * ((y - box[1]) + chunk[1] * (z - box[2]));
								final int at = (x0 - o[0]) + s[0] * ((y - o[1]) + s[1] * (z - o[2]));
								// 0 + v, as the sum from zero of BlockSink.Memory
								for (int x = 0; x < x1 - x0; x++) v[dst + x] = 0f + src[at + x];
							}
						w.writeChunk(a, t, c, gx, gy, gz, v);
					} else {
						final int nx = x1 - x0, ny = y1 - y0, nz = z1 - z0;
						final ByteBuffer buf = ByteBuffer.allocate(4 * nx * ny * nz).order(ByteOrder.LITTLE_ENDIAN);
						for (int z = z0; z < z1; z++)
							for (int y = y0; y < y1; y++) {
								final int at = (x0 - o[0]) + s[0] * ((y - o[1]) + s[1] * (z - o[2]));
								for (int x = 0; x < nx; x++) buf.putFloat(src[at + x]);
							}
						final Path f = fragment(g, b.index());
						Files.createDirectories(f.getParent());
						ZarrArray.writeAtomically(f, buf.array());
					}
					if (afterChunk != null) afterChunk.run();
				}
	}

	/**
	 * Adds the fragments of seam chunk g in block order and writes the chunk.
	 *
	 * @throws IllegalStateException when a contributing block's fragment is missing or of the wrong size
	 */
	public void finishChunk(final int[] g) throws IOException {
		final ZarrArray a = ZarrArray.open(Path.of(hidden, "0"));
		final int[] box = box(g);
		final float[] v = new float[chunk[0] * chunk[1] * chunk[2]];
		for (final Block b : contributors(g)) {
			final int[] o = b.outOrigin(), s = b.outSize();
			final int x0 = Math.max(o[0], box[0]), x1 = Math.min(o[0] + s[0], box[3]);
			final int y0 = Math.max(o[1], box[1]), y1 = Math.min(o[1] + s[1], box[4]);
			final int z0 = Math.max(o[2], box[2]), z1 = Math.min(o[2] + s[2], box[5]);
			final Path f = fragment(g, b.index());
			final long n = (long) (x1 - x0) * (y1 - y0) * (z1 - z0);
			if (!Files.isRegularFile(f) || Files.size(f) != 4 * n)
				throw new IllegalStateException("The part of block " + (b.index() + 1) + " for chunk " + g[0] + "," + g[1] + "," + g[2] + " is missing or incomplete");
			final ByteBuffer buf = ByteBuffer.wrap(Files.readAllBytes(f)).order(ByteOrder.LITTLE_ENDIAN);
			for (int z = z0; z < z1; z++)
				for (int y = y0; y < y1; y++) {
					final int dst = (x0 - box[0]) + chunk[0] * ((y - box[1]) + chunk[1] * (z - box[2]));
					for (int x = 0; x < x1 - x0; x++) v[dst + x] += buf.getFloat();
				}
		}
		writer().writeChunk(a, t, c, g[0], g[1], g[2], v);
	}

	/** The block whose out box starts at {@code origin}. */
	private Block blockAt(final int[] origin, final int[] size) {
		for (final Block b : plan.blocks())
			if (java.util.Arrays.equals(b.outOrigin(), origin) && java.util.Arrays.equals(b.outSize(), size)) return b;
		throw new IllegalArgumentException("No block of the plan has its output at " + java.util.Arrays.toString(origin));
	}

	@Override
	public void add(final Volume part, final int[] origin) throws IOException {
		writeBlock(blockAt(origin, part.shape()), part, null);
	}

	/** Finishes the seam chunks of this frame and channel (the whole output is completed by {@link OmeZarr.Writer#complete}). */
	@Override
	public void commit() throws IOException {
		for (final int[] g : seamChunks()) finishChunk(g);
	}

	@Override
	public void abort() {
		writer().abort();
		OmeZarr.deleteTree(Path.of(fragments));
	}

	/** Closing after a commit keeps the output (unlike the default, which aborts). */
	@Override
	public void close() {}
}
