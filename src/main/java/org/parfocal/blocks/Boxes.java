package org.parfocal.blocks;

import org.parfocal.core.Volume;

/** Copies boxes between volumes (x fastest). */
public final class Boxes {

	private Boxes() {}

	/** A new volume with the box {@code origin + size} of {@code v}. */
	public static Volume crop(final Volume v, final int[] origin, final int[] size) {
		check(v.shape(), origin, size);
		final Volume out = Volume.zeros(size[0], size[1], size[2], v.voxelSize());
		final float[] src = v.data(), dst = out.data();
		for (int z = 0; z < size[2]; z++)
			for (int y = 0; y < size[1]; y++)
				System.arraycopy(src, origin[0] + v.nx() * (origin[1] + y + v.ny() * (origin[2] + z)), dst, size[0] * (y + size[1] * z), size[0]);
		return out;
	}

	/** Adds {@code part} into {@code target} at {@code origin}. */
	public static void addInto(final Volume target, final Volume part, final int[] origin) {
		check(target.shape(), origin, part.shape());
		final float[] src = part.data(), dst = target.data();
		final int sx = part.nx(), sy = part.ny();
		for (int z = 0; z < part.nz(); z++)
			for (int y = 0; y < sy; y++) {
				final int a = sx * (y + sy * z), b = origin[0] + target.nx() * (origin[1] + y + target.ny() * (origin[2] + z));
				for (int x = 0; x < sx; x++) dst[b + x] += src[a + x];
			}
	}

	static void check(final int[] shape, final int[] origin, final int[] size) {
		for (int d = 0; d < 3; d++)
			if (origin[d] < 0 || size[d] < 1 || origin[d] + size[d] > shape[d])
				throw new IllegalArgumentException("Box [" + origin[0] + "+" + size[0] + ", " + origin[1] + "+" + size[1] + ", " + origin[2] + "+" + size[2]
						+ "] is outside the " + shape[0] + " x " + shape[1] + " x " + shape[2] + " stack");
	}
}
