package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Path;

import ij.ImagePlus;
import ij.io.FileSaver;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.ij1.ImageBridge;

class TiffBlockSourceTest {

	/** ImageJ's TIFF writer escapes µ in its description ("unit=\u00B5m"); the block reader must read µm back. */
	@Test
	void micrometreCalibrationWrittenByImageJIsReadBack(@TempDir final Path dir) throws Exception {
		final ImagePlus imp = ImageBridge.toImagePlus(Volume.zeros(8, 6, 4, VoxelSize.microns(0.08, 0.08, 0.2)), "s.tif");
		final Path f = dir.resolve("s.tif");
		assertTrue(new FileSaver(imp).saveAsTiff(f.toString()));
		final VoxelSize v = TiffBlockSource.open(f).voxelSize();
		assertEquals("µm", v.unit());
		assertEquals(0.2, v.dz(), 1e-12);
		assertTrue(v.isCalibrated());
	}
}
