package org.parfocal.scijava;

import ij.ImagePlus;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.ij1.ImageBridge;

/** Small calibrated recordings of the sample scene's cell (our own synthetic data) for command tests. */
public final class SciJavaTestImages {

	static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	private SciJavaTestImages() {}

	/** The cell (40 x 36 x 10) blurred by a 9 x 9 x 5 Gaussian PSF, Poisson noise, background 2, offset 100. */
	public static ImagePlus recorded(final String title) {
		final Volume truth = SampleScene.cell(40, 36, 10, 7);
		final Volume y = new Acquisition(SampleScene.gaussianPsf(9, 9, 5), truth.shape(), new Acquisition.Options(Boundary.ZERO, true, 2, 1, 5, 100))
				.record(truth, Monitor.NONE);
		return ImageBridge.toImagePlus(y.withVoxelSize(VOXEL), title);
	}
}
