package org.parfocal.quality;

import org.parfocal.core.Volume;

/**
 * The apparent resolution of an image, from its autocorrelation: the FWHM of the Gaussian blur that explains how
 * fast neighbouring voxels decorrelate. For a sparse object (points, thin lines) blurred by a Gaussian of standard
 * deviation σ, the autocorrelation along an axis is A·exp(−τ²/(4σ²)) (the blur's autocorrelation, a Gaussian of
 * variance 2σ²); independent noise (Poisson, read noise) adds to lag 0 only. So lag 0 is never used: the peak A
 * is extrapolated from lags 1 and 2 (ln A = (4 ln C₁ − ln C₂)/3), the half-maximum lag τ½ is read off the
 * measured lags (linear interpolation), and FWHM = √2·τ½; when the half maximum falls before lag 2 the two lags
 * give it directly (σ² = 3 / (4 ln(C₁/C₂))). Textbook properties of Gaussian convolution and of white noise
 * (common practice, written from memory); large structures (a broad object) make images look blurrier than their
 * blur, so the value is used to compare images of the same kind of structure and to warn, not as a measurement of
 * the optics. Written by hand: a lag sum per axis on the array, no transform needed.
 */
public final class ApparentResolution {

	private ApparentResolution() {}

	/** Longest lag examined; a blur broader than about this many voxels is reported as NaN. */
	static final int MAX_LAG = 48;

	private static final double SIGMA_TO_FWHM = 2 * Math.sqrt(2 * Math.log(2));

	/**
	 * Apparent FWHM along {@code axis} (0 x, 1 y, 2 z) in voxels; NaN when it cannot be told (an axis of fewer
	 * than 4 voxels, a constant image, or a blur broader than the lags examined).
	 */
	public static double fwhmVoxels(final Volume v, final int axis) {
		final int[] n = v.shape();
		final int lags = Math.min(MAX_LAG, n[axis] / 2);
		if (lags < 2) return Double.NaN;
		final float[] d = v.data();
		double mean = 0;
		for (final float f : d) mean += f;
		mean /= d.length;
		final int stride = axis == 0 ? 1 : axis == 1 ? n[0] : n[0] * n[1];
		final double c1 = lag(d, n, axis, stride, mean, 1), c2 = lag(d, n, axis, stride, mean, 2);
		if (!(c1 > 0) || !(c2 > 0)) return 1; // neighbours already uncorrelated: sharper than a voxel, reported as 1
		if (c2 >= c1) return Double.NaN; // not decorrelating over two lags: broader than can be told
		final double half = Math.exp((4 * Math.log(c1) - Math.log(c2)) / 3) / 2;
		if (c2 <= half) return SIGMA_TO_FWHM * Math.sqrt(3 / (4 * Math.log(c1 / c2)));
		double previous = c2;
		for (int t = 3; t <= lags; t++) { // lags computed only up to the half maximum
			final double c = lag(d, n, axis, stride, mean, t);
			if (c <= half) return Math.sqrt(2) * (t - 1 + (previous - half) / (previous - c));
			previous = c;
		}
		return Double.NaN;
	}

	/** Mean of (v_i − mean)(v_{i+t} − mean) over all voxel pairs t apart along the axis. */
	private static double lag(final float[] d, final int[] n, final int axis, final int stride, final double mean, final int t) {
		double s = 0;
		long count = 0;
		for (int z = 0; z < n[2]; z++)
			for (int y = 0; y < n[1]; y++) {
				final int pos = axis == 1 ? y : z;
				if (axis != 0 && pos + t >= n[axis]) continue;
				final int row = n[0] * (y + n[1] * z), end = axis == 0 ? n[0] - t : n[0];
				for (int x = 0; x < end; x++) s += (d[row + x] - mean) * (d[row + x + t * stride] - mean);
				count += Math.max(0, end);
			}
		return count == 0 ? 0 : s / count;
	}

	/**
	 * Apparent FWHM {lateral, axial} in the image's units (voxel sizes times the voxel widths; the lateral value is
	 * the mean of x and y); axial is NaN for a 2D image.
	 */
	public static double[] fwhm(final Volume v, final double[] voxelSize) {
		final double x = fwhmVoxels(v, 0) * voxelSize[0], y = fwhmVoxels(v, 1) * voxelSize[1];
		return new double[] { (x + y) / 2, v.is3D() ? fwhmVoxels(v, 2) * voxelSize[2] : Double.NaN };
	}
}
