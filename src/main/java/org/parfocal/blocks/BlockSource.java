package org.parfocal.blocks;

import java.io.IOException;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * A stack that can be read a box at a time, so that it need not fit in memory. Implementations check on every
 * read that the stack has not changed since it was opened (size, length on disk) and say so in one line.
 */
public interface BlockSource extends AutoCloseable {

	/** {nx, ny, nz}. */
	int[] shape();

	VoxelSize voxelSize();

	/** A new volume holding the box {@code origin + size} (inside the stack), with the stack's calibration. */
	Volume read(int[] origin, int[] size) throws IOException;

	/**
	 * The boxes {x, y, z} this source reads most cheaply (a chunked file's chunks), or null when planes are cheap.
	 * The streaming passes of {@link BlockDeconvolution#levels} read such boxes instead of planes when one layer of
	 * them does not fit in memory (every chunk would otherwise be decoded once per plane).
	 */
	default int[] chunkShape() {
		return null;
	}

	/** Where the stack comes from, for messages and provenance. */
	default String name() {
		return "stack";
	}

	@Override
	default void close() throws IOException {}

	/** A stack already in memory (not copied; never modified). */
	static BlockSource of(final Volume v) {
		return new BlockSource() {
			@Override
			public int[] shape() { return v.shape(); }

			@Override
			public VoxelSize voxelSize() { return v.voxelSize(); }

			@Override
			public Volume read(final int[] o, final int[] s) {
				return Boxes.crop(v, o, s);
			}

			@Override
			public String name() { return "in-memory " + v; }
		};
	}
}
