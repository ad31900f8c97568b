package org.parfocal.conv;

import org.parfocal.core.Volume;

/**
 * Preparation of a PSF before use: the conventions every operator assumes are unit sum (flux is kept) and
 * origin at voxel ⌊(k − 1)/2⌋ per axis (the centre voxel of an odd-sized PSF). All methods return new
 * volumes and leave their argument untouched.
 */
public final class Psfs {

	private Psfs() {}

	/** Copy scaled to unit sum. @throws IllegalArgumentException if the sum is not positive and finite */
	public static Volume normalized(final Volume psf) {
		final double s = psf.sum();
		if (!(s > 0) || !Double.isFinite(s))
			throw new IllegalArgumentException("The PSF cannot be normalised: its sum is " + s);
		final Volume out = psf.copy();
		final float[] d = out.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) (d[i] / s);
		return out;
	}

	/** True if the PSF sums to 1 within {@code tol}. */
	public static boolean isNormalized(final Volume psf, final double tol) {
		return Math.abs(psf.sum() - 1) <= tol;
	}

	/** Copy with negative values set to zero; the count of clipped values is returned in {@code clipped[0]}. */
	public static Volume clipNegative(final Volume psf, final int[] clipped) {
		final Volume out = psf.copy();
		final float[] d = out.data();
		int c = 0;
		for (int i = 0; i < d.length; i++)
			if (d[i] < 0) {
				d[i] = 0;
				c++;
			}
		if (clipped != null && clipped.length > 0) clipped[0] = c;
		return out;
	}

	/**
	 * Copy of size (kx, ky, kz) whose origin voxel is the input's origin voxel: a centred crop where the new
	 * size is smaller, zero padding where it is larger.
	 */
	public static Volume resizeCentered(final Volume psf, final int kx, final int ky, final int kz) {
		final Volume out = Volume.zeros(kx, ky, kz, psf.voxelSize());
		final int[] in = psf.shape(), k = { kx, ky, kz }, shift = new int[3];
		for (int d = 0; d < 3; d++) shift[d] = (in[d] - 1) / 2 - (k[d] - 1) / 2;
		for (int z = 0; z < kz; z++) {
			final int sz = z + shift[2];
			if (sz < 0 || sz >= in[2]) continue;
			for (int y = 0; y < ky; y++) {
				final int sy = y + shift[1];
				if (sy < 0 || sy >= in[1]) continue;
				for (int x = 0; x < kx; x++) {
					final int sx = x + shift[0];
					if (sx >= 0 && sx < in[0]) out.set(x, y, z, psf.get(sx, sy, sz));
				}
			}
		}
		return out;
	}

	/** Copy circularly shifted by whole voxels so that its maximum sits at the origin voxel. */
	public static Volume centerOnPeak(final Volume psf) {
		final float[] d = psf.data();
		int arg = 0;
		for (int i = 1; i < d.length; i++) if (d[i] > d[arg]) arg = i;
		final int ax = arg % psf.nx(), ay = (arg / psf.nx()) % psf.ny(), az = arg / (psf.nx() * psf.ny());
		final int dx = (psf.nx() - 1) / 2 - ax, dy = (psf.ny() - 1) / 2 - ay, dz = (psf.nz() - 1) / 2 - az;
		final Volume out = Volume.zeros(psf.nx(), psf.ny(), psf.nz(), psf.voxelSize());
		for (int z = 0; z < psf.nz(); z++)
			for (int y = 0; y < psf.ny(); y++)
				for (int x = 0; x < psf.nx(); x++)
					out.set(Math.floorMod(x + dx, psf.nx()), Math.floorMod(y + dy, psf.ny()), Math.floorMod(z + dz, psf.nz()), psf.get(x, y, z));
		return out;
	}
}
