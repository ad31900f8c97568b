package org.parfocal.blocks;

import java.io.IOException;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * Where a block-wise result goes. It starts at zero; {@link #add} adds a block's weighted estimate to a box
 * (the weights of a {@link BlockPlan} sum to 1, so the sum of all blocks is the result). {@link #commit} makes
 * the result visible under its final name; {@link #abort} removes everything written, so an interrupted run
 * leaves nothing that looks complete.
 */
public interface BlockSink extends AutoCloseable {

	/** Adds {@code part} (its own shape) at {@code origin} of the output. */
	void add(Volume part, int[] origin) throws IOException;

	/** Makes the output complete and visible. */
	void commit() throws IOException;

	/** Removes what was written; safe to call more than once and after a failure. */
	void abort();

	@Override
	default void close() {
		abort();
	}

	/** An output in memory, zero-filled, of the given shape. */
	public static Memory memory(final int[] shape, final VoxelSize voxelSize) {
		return new Memory(Volume.zeros(shape[0], shape[1], shape[2], voxelSize));
	}

	/** Result held in one volume (for stacks that fit, tests and cluster tasks). */
	final class Memory implements BlockSink {
		private final Volume out;
		private boolean committed;

		Memory(final Volume out) {
			this.out = out;
		}

		@Override
		public synchronized void add(final Volume part, final int[] origin) {
			Boxes.addInto(out, part, origin);
		}

		@Override
		public void commit() {
			committed = true;
		}

		@Override
		public void abort() {}

		/** The result; only after {@link #commit}. */
		public Volume result() {
			if (!committed) throw new IllegalStateException("The block-wise result is not complete");
			return out;
		}
	}
}
