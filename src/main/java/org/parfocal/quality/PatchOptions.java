package org.parfocal.quality;

/**
 * How image patches become feature vectors.
 *
 * @param size patch width and height in voxels of the common grid (≥ 2)
 * @param depth patch depth in slices when patches are volumetric (≥ 1; ignored for 2D patches)
 * @param scales number of scales (1 to 4): scale s adds the same-sized patch, centred at the same place, of
 *        the image averaged over 2^s × 2^s blocks in x and y (z is never averaged), so a feature sees
 *        structure up to 2^(scales−1) × size voxels across
 * @param contrastNormalized divide each mean-removed feature vector by its root mean square (plus
 *        {@link #CONTRAST_FLOOR}), so that only the shape of local structure is compared, not its contrast
 * @param volumetric use size × size × depth patches when every image is 3D; otherwise size × size patches
 *        from random planes
 */
public record PatchOptions(int size, int depth, int scales, boolean contrastNormalized, boolean volumetric) {

	/**
	 * Added (in quadrature) to a patch's root mean square before contrast normalisation, in units of the
	 * normalised intensity (the 1st–99.5th percentile range by default): flat background patches keep their
	 * small values instead of having noise blown up to unit contrast.
	 */
	public static final double CONTRAST_FLOOR = 0.02;

	public PatchOptions {
		if (size < 2 || size > 64) throw new IllegalArgumentException("Patch size must be 2 to 64 voxels, got " + size);
		if (depth < 1 || depth > 64) throw new IllegalArgumentException("Patch depth must be 1 to 64 slices, got " + depth);
		if (scales < 1 || scales > 4) throw new IllegalArgumentException("Number of scales must be 1 to 4, got " + scales);
	}

	/** Length of one feature vector for 2D ({@code volumetricPatches} false) or volumetric patches. */
	public int dimension(final boolean volumetricPatches) {
		return size * size * (volumetricPatches ? depth : 1) * scales;
	}
}
