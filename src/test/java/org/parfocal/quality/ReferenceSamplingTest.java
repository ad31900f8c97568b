package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * References sampled unlike the result: the check warns when voxel sizes differ by more than 1.5× (and when the
 * apparent resolutions differ by more than 2×, {@link MatchedResolution}), and shrinking
 * a reference no longer aliases. Outside facts: a grating of period 2 voxels sampled at 1/4 of its rate has no
 * frequency below the new Nyquist limit, so an anti-aliased shrink leaves (nearly) a constant (sampling theorem,
 * common practice), while linear interpolation alone returns the grating's full contrast.
 */
class ReferenceSamplingTest {

	private static final ReferenceComparison.Options OPTIONS = ReferenceComparison.Options.defaults().withCounts(1024, 4096, 0);

	/** The case: a reference at 0.13 µm for a result at 0.512 µm (3.9×) gets one warning naming both. */
	@Test
	void warnsWhenReferencePixelsDifferByMoreThanOneAndAHalfTimes() {
		final Volume result = SharpScenes.cell2D(5, 96, 96).withVoxelSize(VoxelSize.microns(0.512, 0.512, 1));
		final Volume fine = SharpScenes.cell2D(6, 384, 384).withVoxelSize(VoxelSize.microns(0.13, 0.13, 1));
		final Volume close = SharpScenes.cell2D(7, 96, 96).withVoxelSize(VoxelSize.microns(0.45, 0.45, 1));
		final ReferenceComparison.References r = ReferenceComparison.prepare(List.of(close, fine), result, OPTIONS, Monitor.NONE);
		// one line for the sampling, one for the apparent resolution (both cells drawn with a 0.7-voxel blur, so the
		// fine one is 3.9x sharper in µm; the autocorrelation estimate reads 3.4x, the cells' vesicles and cytoplasm
		// adding the same breadth to both)
		assertEquals(2, r.notes().size(), r.notes().toString());
		final String n = r.notes().get(0);
		assertTrue(n.startsWith("Reference 2 has 0.13 x 0.13 µm voxels, 3.9 times finer than the result's 0.512 x 0.512 µm"), n);
		assertTrue(r.notes().get(1).startsWith("Reference 2 looks 3.4 times sharper than the result (apparent FWHM 0.382 against 1.31 µm)"), r.notes().get(1));
		assertEquals(r.notes(), ReferenceComparison.compare(r, result, null, Monitor.NONE).notes());
	}

	/** A ±1 grating of period 2 voxels shrunk 4×: anti-aliased output within 0.1 of its mean (linear interpolation alone: ±1). */
	@Test
	void shrinkingDoesNotAlias() {
		final Volume g = Volume.zeros(64, 8, 1, VoxelSize.microns(0.1, 0.1, 1));
		for (int y = 0; y < 8; y++)
			for (int x = 0; x < 64; x++) g.data()[x + 64 * y] = x % 2 == 0 ? 1 : -1;
		final Volume s = Resampling.toVoxelSize(g, VoxelSize.microns(0.4, 0.1, 1));
		assertEquals(16, s.nx());
		for (int x = 1; x < s.nx() - 1; x++) assertEquals(0, s.get(x, 4, 0), 0.1, "x = " + x);
	}
}
