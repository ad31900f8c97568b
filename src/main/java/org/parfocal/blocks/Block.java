package org.parfocal.blocks;

import java.io.Serializable;
import java.util.Arrays;

/**
 * One block of a {@link BlockPlan}: its core (the tiles of a plan partition the stack), the region whose
 * weighted estimate it contributes (core widened by half the blend width on each inner face) and the region it
 * reads and deconvolves (that, widened by the halo). Boxes are {origin, size} in voxels, x, y, z; all lie inside
 * the stack.
 */
public record Block(int index, int[] tile, int[] coreOrigin, int[] coreSize, int[] outOrigin, int[] outSize, int[] readOrigin, int[] readSize)
		implements Serializable {

	private static final long serialVersionUID = 1L;

	/** Voxels read (and deconvolved). */
	public long readVoxels() {
		return (long) readSize[0] * readSize[1] * readSize[2];
	}

	@Override
	public String toString() {
		return "block " + index + " " + Arrays.toString(tile) + ": core " + box(coreOrigin, coreSize) + ", read " + box(readOrigin, readSize);
	}

	static String box(final int[] o, final int[] s) {
		return "[" + o[0] + "+" + s[0] + ", " + o[1] + "+" + s[1] + ", " + o[2] + "+" + s[2] + "]";
	}

	@Override
	public boolean equals(final Object o) {
		return o instanceof Block b && b.index == index && Arrays.equals(b.coreOrigin, coreOrigin) && Arrays.equals(b.coreSize, coreSize)
				&& Arrays.equals(b.readOrigin, readOrigin) && Arrays.equals(b.readSize, readSize);
	}

	@Override
	public int hashCode() {
		return 31 * index + Arrays.hashCode(coreOrigin);
	}
}
