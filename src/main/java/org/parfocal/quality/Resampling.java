package org.parfocal.quality;

import org.parfocal.core.Smoothing;
import org.parfocal.core.Trilinear;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.PsfGrid;

/**
 * Resampling to another voxel size by linear (bilinear in 2D, trilinear in 3D) interpolation.
 * <p>
 * Voxel centres are aligned: output voxel i along an axis samples the input at the continuous index
 * (i + ½)·t/s − ½ (s the input, t the output voxel size), clamped to [0, n − 1], i.e. the edge value is
 * repeated; the output has round(n·(s/t)) voxels, halves rounded up (at least 1). This is
 * {@code scipy.ndimage.map_coordinates(image, coords, order=1, mode="nearest")}.
 * <p>
 * Linear interpolation alone does not low-pass filter: shrinking aliases fine structure (a reference at 0.13 µm
 * shrunk 3.9× to a 0.512 µm grid turns fine filaments into spurious texture). So along every axis that shrinks by
 * a factor k = s/t &lt; 1 the image is first smoothed with a Gaussian of σ = (1/k − 1)/2 input voxels, the default
 * anti-aliasing of scikit-image's {@code transform.resize} (from memory), with a mirrored border
 * ({@link Smoothing}). A large mismatch is reported by {@link #scaleFactors} for the caller to warn about.
 * The interpolation is {@link Trilinear}'s.
 */
public final class Resampling {

	private Resampling() {}

	/**
	 * Micrometres per unit for the length units ImageJ users write; NaN for an unknown unit: {@link
	 * PsfGrid#micronsPerUnit}, the one table of units in the project.
	 */
	public static double micronsPerUnit(final String unit) {
		return PsfGrid.micronsPerUnit(unit);
	}

	/** {dx, dy, dz} in µm, or an exception naming the unit if it is not a known length unit. */
	public static double[] microns(final VoxelSize v, final String what) {
		final double f = micronsPerUnit(v.unit());
		if (Double.isNaN(f))
			throw new IllegalArgumentException(what + " is calibrated in '" + v.unit() + "', which is not a length unit Parfocal converts (use µm, nm or mm)");
		return new double[] { v.dx() * f, v.dy() * f, v.dz() * f };
	}

	/** Input-to-output voxel size ratio s/t per axis (above 1: the output grid is finer). */
	public static double[] scaleFactors(final VoxelSize from, final VoxelSize to) {
		final double[] s = microns(from, "The image"), t = microns(to, "The target grid");
		return new double[] { s[0] / t[0], s[1] / t[1], s[2] / t[2] };
	}

	/**
	 * {@code v} (not modified) resampled to voxel size {@code target} (both calibrated in length units); a 2D
	 * image stays 2D. Returns a copy when the sizes already agree to 1e-9 relative.
	 */
	public static Volume toVoxelSize(final Volume v, final VoxelSize target) {
		final double[] f = scaleFactors(v.voxelSize(), target);
		final int[] n = v.shape(), o = new int[3];
		boolean same = true;
		for (int d = 0; d < 3; d++) {
			if (d == 2 && n[2] == 1) f[2] = 1;
			o[d] = (int) Math.max(1, Math.round(n[d] * f[d]));
			same &= Math.abs(f[d] - 1) < 1e-9;
		}
		if (same) return v.copy().withVoxelSize(target);
		final double[] sigma = new double[3];
		for (int d = 0; d < 3; d++) sigma[d] = f[d] < 1 && n[d] > 1 ? (1 / f[d] - 1) / 2 : 0;
		final Volume src = sigma[0] > 0 || sigma[1] > 0 || sigma[2] > 0 ? Smoothing.gaussian(v, sigma[0], sigma[1], sigma[2]) : v;
		// output index i samples the input at (i + ½)/f − ½ along each axis, clamped (the edge value repeated)
		final Trilinear.Axis[] axes = new Trilinear.Axis[3];
		for (int d = 0; d < 3; d++) {
			final double[] c = new double[o[d]];
			for (int i = 0; i < o[d]; i++) c[i] = (i + 0.5) / f[d] - 0.5;
			axes[d] = Trilinear.Axis.clamped(c, n[d]);
		}
		return Trilinear.sample(src, axes[0], axes[1], axes[2], target);
	}
}
