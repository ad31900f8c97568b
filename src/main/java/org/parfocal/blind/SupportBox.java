package org.parfocal.blind;

/**
 * The box the PSF estimate lives in, odd sizes in voxels, centred on the PSF origin voxel (the support
 * constraint: the PSF is zero outside it). A 2D image takes {@code nz = 1}.
 */
public record SupportBox(int nx, int ny, int nz) {

	public SupportBox {
		if (nx < 1 || ny < 1 || nz < 1 || nx % 2 == 0 || ny % 2 == 0 || nz % 2 == 0)
			throw new IllegalArgumentException("The PSF support box needs odd sizes of at least 1 (the centre voxel is the origin), got " + nx + " x " + ny + " x " + nz);
	}

	int[] shape() { return new int[] { nx, ny, nz }; }

	@Override
	public String toString() { return nx + " x " + ny + " x " + nz; }
}
