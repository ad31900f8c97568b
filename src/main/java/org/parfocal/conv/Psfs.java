package org.parfocal.conv;

import org.parfocal.core.Trilinear;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * Preparation of a PSF before use: the conventions every operator assumes are unit sum (flux is kept) and
 * origin at voxel ⌊(k − 1)/2⌋ per axis (the centre voxel of an odd-sized PSF). All methods return new
 * volumes and leave their argument untouched.
 */
public final class Psfs {

	private Psfs() {}

	/**
	 * The one placement of a PSF on an FFT grid: PSF voxel (x, y, z) of a k[0] × k[1] × k[2] kernel (x fastest)
	 * goes to grid voxel (x − c + s) mod p per axis, c = ⌊(k − 1)/2⌋ the PSF origin, s a shift (0: the origin
	 * at grid voxel 0, wrapping around), on a grid of p[0] × p[1] × p[2] with {@code rowStride} floats per row
	 * (p[0] for a plain real array, the in-place row length for {@code RealFft}'s grids). {@code gather}: the
	 * other way, kernel ← the grid's values at those voxels; otherwise the kernel is added to the grid.
	 */
	public static void place(final float[] kernel, final int[] k, final float[] grid, final int[] p, final int rowStride, final int[] shift,
			final boolean gather) {
		for (int z = 0; z < k[2]; z++) {
			final int qz = Math.floorMod(z - (k[2] - 1) / 2 + shift[2], p[2]);
			for (int y = 0; y < k[1]; y++) {
				final int qy = Math.floorMod(y - (k[1] - 1) / 2 + shift[1], p[1]);
				for (int x = 0, j = k[0] * (y + k[1] * z); x < k[0]; x++, j++) {
					final int q = Math.floorMod(x - (k[0] - 1) / 2 + shift[0], p[0]) + rowStride * (qy + p[1] * qz);
					if (gather) kernel[j] = grid[q];
					else grid[q] += kernel[j];
				}
			}
		}
	}

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

	/**
	 * The PSF's centre of mass minus its origin voxel ⌊(k − 1)/2⌋, in voxels per axis (x, y, z); null if its sum
	 * is not positive. A PSF convolves an image shifted by this much (the shift theorem), so a PSF whose centre of
	 * mass is off its origin moves the result.
	 */
	public static double[] centroidOffset(final Volume psf) {
		final float[] d = psf.data();
		final int nx = psf.nx(), ny = psf.ny(), nz = psf.nz();
		double s = 0, sx = 0, sy = 0, sz = 0;
		for (int z = 0, i = 0; z < nz; z++)
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++, i++) {
					final double v = d[i];
					s += v;
					sx += v * x;
					sy += v * y;
					sz += v * z;
				}
		if (!(s > 0) || !Double.isFinite(s)) return null;
		return new double[] { sx / s - (nx - 1) / 2, sy / s - (ny - 1) / 2, sz / s - (nz - 1) / 2 };
	}

	/** Offsets larger than this (voxels, along any axis) are worth a warning: the result shifts visibly. */
	public static final double CENTROID_TOLERANCE = 0.5;

	/**
	 * A one-line warning when the centre of mass is more than half a voxel off the origin voxel along any axis,
	 * else null.
	 */
	public static String centroidWarning(final Volume psf) {
		final double[] o = centroidOffset(psf);
		if (o == null) return null;
		if (Math.abs(o[0]) <= CENTROID_TOLERANCE && Math.abs(o[1]) <= CENTROID_TOLERANCE && Math.abs(o[2]) <= CENTROID_TOLERANCE) return null;
		return String.format(java.util.Locale.ROOT, "the PSF's centre of mass is off its centre voxel by (%.2f, %.2f, %.2f) voxels (x, y, z), "
				+ "so the result is shifted by as much; add recentre to move it to the centre", o[0], o[1], o[2]);
	}

	/**
	 * Copy circularly shifted by whole voxels so that its centre of mass lies within half a voxel of the origin
	 * voxel along every axis (the shift is the rounded {@link #centroidOffset}; whole voxels keep the values
	 * exact). Returned unchanged if its sum is not positive.
	 */
	public static Volume recentred(final Volume psf) {
		final double[] o = centroidOffset(psf);
		if (o == null) return psf.copy();
		final int dx = (int) -Math.round(o[0]), dy = (int) -Math.round(o[1]), dz = (int) -Math.round(o[2]);
		return shifted(psf, dx, dy, dz);
	}

	/** Copy circularly shifted by whole voxels: the value at (x, y, z) moves to (x + dx, y + dy, z + dz). */
	private static Volume shifted(final Volume psf, final int dx, final int dy, final int dz) {
		final Volume out = Volume.zeros(psf.nx(), psf.ny(), psf.nz(), psf.voxelSize());
		for (int z = 0; z < psf.nz(); z++)
			for (int y = 0; y < psf.ny(); y++)
				for (int x = 0; x < psf.nx(); x++)
					out.set(Math.floorMod(x + dx, psf.nx()), Math.floorMod(y + dy, psf.ny()), Math.floorMod(z + dz, psf.nz()), psf.get(x, y, z));
		return out;
	}

	/** Copy circularly shifted by whole voxels so that its maximum sits at the origin voxel. */
	public static Volume centerOnPeak(final Volume psf) {
		final float[] d = psf.data();
		int arg = 0;
		for (int i = 1; i < d.length; i++) if (d[i] > d[arg]) arg = i;
		final int ax = arg % psf.nx(), ay = (arg / psf.nx()) % psf.ny(), az = arg / (psf.nx() * psf.ny());
		final int dx = (psf.nx() - 1) / 2 - ax, dy = (psf.ny() - 1) / 2 - ay, dz = (psf.nz() - 1) / 2 - az;
		return shifted(psf, dx, dy, dz);
	}

	/**
	 * Copy resampled to another voxel size by trilinear interpolation about the origin voxel, so the PSF stays
	 * centred: the new size along each axis is the largest odd size whose half-extent does not exceed the old
	 * one, and the result is scaled to unit sum. Used when a PSF was recorded or computed at another voxel size
	 * than the image (sizes in the same unit).
	 */
	public static Volume resampleTo(final Volume psf, final VoxelSize target) {
		final VoxelSize from = psf.voxelSize();
		final double[] dOld = { from.dx(), from.dy(), from.dz() }, dNew = { target.dx(), target.dy(), target.dz() };
		final int[] k = psf.shape(), kn = new int[3], c = new int[3], cn = new int[3];
		for (int d = 0; d < 3; d++) {
			c[d] = (k[d] - 1) / 2;
			if (k[d] == 1) {
				kn[d] = 1;
				continue;
			}
			final int half = (int) Math.floor(c[d] * dOld[d] / dNew[d] + 1e-9);
			kn[d] = 2 * half + 1;
			cn[d] = half;
		}
		// output index i samples the input at c + (i − cn)·new/old along each axis, zero beyond the PSF's box
		final Trilinear.Axis[] axes = new Trilinear.Axis[3];
		for (int d = 0; d < 3; d++) {
			final double[] p = new double[kn[d]];
			for (int i = 0; i < kn[d]; i++) p[i] = k[d] == 1 ? 0 : c[d] + (i - cn[d]) * dNew[d] / dOld[d];
			axes[d] = Trilinear.Axis.zeroOutside(p, k[d]);
		}
		final Volume out = Trilinear.sample(psf, axes[0], axes[1], axes[2], target);
		final double sum = out.sum();
		if (!(sum > 0)) throw new IllegalArgumentException("The PSF resampled to " + target + " is empty");
		final float[] d = out.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) (d[i] / sum);
		return out;
	}
}
