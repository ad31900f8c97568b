package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.ShortProcessor;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;

class ImageBridgeTest {

	/** A 16-bit hyperstack whose pixel value encodes (x, y, c, z, t), so any reordering shows. */
	static ImagePlus coded(final int nx, final int ny, final int nc, final int nz, final int nt) {
		final ImageStack st = new ImageStack(nx, ny);
		for (int t = 0; t < nt; t++)
			for (int z = 0; z < nz; z++)
				for (int c = 0; c < nc; c++) {
					final ShortProcessor sp = new ShortProcessor(nx, ny);
					for (int y = 0; y < ny; y++)
						for (int x = 0; x < nx; x++) sp.set(x, y, code(x, y, c, z, t));
					st.addSlice(sp);
				}
		final ImagePlus imp = new ImagePlus("coded", st);
		imp.setDimensions(nc, nz, nt);
		imp.setOpenAsHyperStack(true);
		final Calibration cal = imp.getCalibration();
		cal.pixelWidth = 0.065;
		cal.pixelHeight = 0.07;
		cal.pixelDepth = 0.3;
		cal.setUnit("micron");
		return imp;
	}

	static int code(final int x, final int y, final int c, final int z, final int t) {
		return 40000 + x + 7 * y + 100 * c + 1000 * z + 10000 * t;
	}

	@Test
	void hyperstackKeepsOrderCalibrationAndRawValues() {
		final ImagePlus imp = coded(5, 4, 2, 3, 2);
		final Hyperstack h = ImageBridge.toCore(imp);
		assertEquals(2, h.channels());
		assertEquals(2, h.frames());
		assertEquals(3, h.nz());
		assertEquals(0.065, h.voxelSize().dx(), 0);
		assertEquals(0.07, h.voxelSize().dy(), 0);
		assertEquals(0.3, h.voxelSize().dz(), 0);
		assertEquals("micron", h.voxelSize().unit());
		for (int t = 0; t < 2; t++)
			for (int c = 0; c < 2; c++)
				for (int z = 0; z < 3; z++)
					assertEquals(code(3, 2, c, z, t), h.get(c, t).get(3, 2, z), 0, "c" + c + " z" + z + " t" + t);
		// Unsigned 16-bit values above 32767 must stay positive.
		assertTrue(h.get(1, 1).get(4, 3, 2) > 32767);
	}

	@Test
	void roundTripGivesNew32BitImageWithSameDimensionsAndCalibration() {
		final ImagePlus imp = coded(6, 5, 3, 4, 2);
		final Object pixelsBefore = imp.getStack().getPixels(1);
		final short[] copyBefore = ((short[]) pixelsBefore).clone();
		final ImagePlus out = ImageBridge.toImagePlus(ImageBridge.toCore(imp), "out", imp.getCalibration());
		assertEquals(32, out.getBitDepth());
		assertArrayEquals(imp.getDimensions(), out.getDimensions());
		assertEquals(imp.getCalibration().pixelDepth, out.getCalibration().pixelDepth, 0);
		assertEquals(imp.getCalibration().getUnit(), out.getCalibration().getUnit());
		assertNotSame(imp.getCalibration(), out.getCalibration());
		for (int i = 1; i <= imp.getStackSize(); i++) {
			final float[] o = (float[]) out.getStack().getPixels(i);
			final short[] s = (short[]) imp.getStack().getPixels(i);
			for (int p = 0; p < s.length; p++) assertEquals(s[p] & 0xffff, o[p], 0, "slice " + i);
		}
		assertArrayEquals(copyBefore, (short[]) imp.getStack().getPixels(1), "input unchanged");
	}

	@Test
	void coreGetsACopySoTheInputCannotChange() {
		final ImagePlus imp = IJ.createImage("f", "32-bit ramp", 8, 8, 3);
		final float[] before = ((float[]) imp.getStack().getPixels(2)).clone();
		final Volume v = ImageBridge.toCore(imp).first();
		java.util.Arrays.fill(v.data(), -1f);
		assertArrayEquals(before, (float[]) imp.getStack().getPixels(2));
	}

	@Test
	void uncalibratedImagesSaySo() {
		final ImagePlus imp = IJ.createImage("u", "8-bit ramp", 8, 8, 2);
		assertFalse(ImageBridge.toCore(imp).voxelSize().isCalibrated());
	}

	@Test
	void rgbAndEmptyImagesAreRefusedInOneLine() {
		final ImagePlus rgb = IJ.createImage("colour", "RGB ramp", 8, 8, 1);
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ImageBridge.toCore(rgb));
		assertTrue(e.getMessage().contains("RGB"), e.getMessage());
		assertFalse(e.getMessage().contains("\n"));
		final IllegalArgumentException e2 = assertThrows(IllegalArgumentException.class, () -> ImageBridge.toCore(new ImagePlus()));
		assertTrue(e2.getMessage().contains("empty"), e2.getMessage());
	}
}
