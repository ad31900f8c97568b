package org.parfocal.core;

import java.util.Arrays;

/**
 * A 2D or 3D single-precision image: a function f: {0..nx-1} × {0..ny-1} × {0..nz-1} → ℝ stored in one
 * {@code float[]} with x fastest, then y, then z ({@code index = x + nx * (y + ny * z)}), the order of an
 * ImageJ stack. A 2D image has {@code nz == 1}.
 * <p>
 * The pixel array is exposed on purpose: hot loops in the core run on arrays (a plain loop over a
 * {@code float[]} is several times faster than a cursor here). A {@code Volume} is therefore mutable;
 * methods that must not change their input say so, and the ImageJ bridge always hands the core a copy.
 * <p>
 * One volume holds at most {@code Integer.MAX_VALUE - 8} voxels (Java array limit); larger stacks are
 * processed in blocks.
 */
public final class Volume {

	/** Largest number of voxels one volume may hold (Java array limit). */
	public static final long MAX_VOXELS = Integer.MAX_VALUE - 8;

	private final int nx, ny, nz;
	private final float[] data;
	private final VoxelSize voxelSize;

	private Volume(final int nx, final int ny, final int nz, final float[] data, final VoxelSize voxelSize) {
		this.nx = nx;
		this.ny = ny;
		this.nz = nz;
		this.data = data;
		this.voxelSize = voxelSize == null ? VoxelSize.UNCALIBRATED : voxelSize;
	}

	/** New zero-filled volume. */
	public static Volume zeros(final int nx, final int ny, final int nz, final VoxelSize voxelSize) {
		return new Volume(nx, ny, nz, new float[checkedSize(nx, ny, nz)], voxelSize);
	}

	/** Wraps {@code data} without copying; its length must be {@code nx * ny * nz}. */
	public static Volume wrap(final float[] data, final int nx, final int ny, final int nz, final VoxelSize voxelSize) {
		final int n = checkedSize(nx, ny, nz);
		if (data.length != n)
			throw new IllegalArgumentException("Pixel array has " + data.length + " values, expected " + nx + " x " + ny + " x " + nz + " = " + n);
		return new Volume(nx, ny, nz, data, voxelSize);
	}

	/** Number of voxels, checking every size is at least 1 and the total fits in one array. */
	public static int checkedSize(final int nx, final int ny, final int nz) {
		if (nx < 1 || ny < 1 || nz < 1)
			throw new IllegalArgumentException("Image sizes must be at least 1, got " + nx + " x " + ny + " x " + nz);
		final long n = (long) nx * ny * nz;
		if (n > MAX_VOXELS)
			throw new IllegalArgumentException("Image of " + nx + " x " + ny + " x " + nz + " = " + n
					+ " voxels is larger than one block can hold (" + MAX_VOXELS + ")");
		return (int) n;
	}

	public int nx() { return nx; }

	public int ny() { return ny; }

	public int nz() { return nz; }

	/** Sizes as {@code {nx, ny, nz}}. */
	public int[] shape() { return new int[] { nx, ny, nz }; }

	public int size() { return data.length; }

	/** True when {@code nz > 1}. */
	public boolean is3D() { return nz > 1; }

	/** The pixels, x fastest; shared, not copied. */
	public float[] data() { return data; }

	public VoxelSize voxelSize() { return voxelSize; }

	public float get(final int x, final int y, final int z) { return data[x + nx * (y + ny * z)]; }

	public void set(final int x, final int y, final int z, final float v) { data[x + nx * (y + ny * z)] = v; }

	/** Deep copy. */
	public Volume copy() { return new Volume(nx, ny, nz, data.clone(), voxelSize); }

	/** Same pixels (shared), other calibration. */
	public Volume withVoxelSize(final VoxelSize v) { return new Volume(nx, ny, nz, data, v); }

	/** True if both have the same {nx, ny, nz}. */
	public boolean sameShape(final Volume o) { return nx == o.nx && ny == o.ny && nz == o.nz; }

	/** Sum of all voxels, in double with compensated (Kahan–Neumaier) summation. */
	public double sum() { return Sums.sum(data); }

	/** Index of the first NaN or infinite value, or -1 when all are finite. */
	public int firstNonFinite() {
		for (int i = 0; i < data.length; i++)
			if (!Float.isFinite(data[i])) return i;
		return -1;
	}

	/** "x, y, z" of a linear index, for messages. */
	public String position(final int index) {
		final int x = index % nx, y = (index / nx) % ny, z = index / (nx * ny);
		return nz > 1 ? "(" + x + ", " + y + ", " + z + ")" : "(" + x + ", " + y + ")";
	}

	@Override
	public String toString() {
		return "Volume " + nx + " x " + ny + " x " + nz + " [" + voxelSize + "]";
	}

	@Override
	public boolean equals(final Object o) {
		return o instanceof Volume v && sameShape(v) && voxelSize.equals(v.voxelSize) && Arrays.equals(data, v.data);
	}

	@Override
	public int hashCode() {
		return 31 * Arrays.hashCode(shape()) + Arrays.hashCode(data);
	}
}
