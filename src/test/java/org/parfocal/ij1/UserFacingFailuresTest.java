package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.event.KeyEvent;

import ij.IJ;
import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/**
 * What a user sees when things go wrong (issue 13, items 8, 9, 11, 13): one line, never a stack trace; silent
 * wrong results refused or warned about; the real reason from a loop; nothing recorded for a cancelled run.
 */
class UserFacingFailuresTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
		IJ.resetEscape();
	}

	private static ImagePlus cell(final String title) {
		return ImageBridge.toImagePlus(SampleScene.cell(24, 24, 8, 3).withVoxelSize(VoxelSize.microns(0.1, 0.1, 0.25)), title);
	}

	private static ImagePlus centredPsf(final String title) {
		return ImageBridge.toImagePlus(SampleScene.gaussianPsf(7, 7, 5).withVoxelSize(VoxelSize.microns(0.1, 0.1, 0.25)), title);
	}

	private static String oneLineFailure(final ImagePlus imp, final String command, final String options) {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(imp, command, options));
		assertFalse(e.getMessage().contains("Exception") || e.getMessage().contains("\tat "), e.getMessage());
		return e.getMessage();
	}

	/** Issue 13.8: run("Deconvolve...", "") headless with an image open was a 22-line RuntimeException. */
	@Test
	void emptyOptionsHeadlessIsOneLine() {
		// with a display the empty options open a real dialog (and wait for a person): this case is headless only
		org.junit.jupiter.api.Assumptions.assumeFalse(ImageJHarness.hasDisplay(), "headless only");
		final ImagePlus img = cell("cell.tif");
		ImageJHarness.open(img, centredPsf("psf.tif"));
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.runMacro("selectImage(\"cell.tif\");\nrun(\"Deconvolve...\", \"\");\n", null));
		assertTrue(e.getMessage().startsWith("Macro failed: Deconvolve: "), e.getMessage());
		assertFalse(e.getMessage().contains("Exception"), e.getMessage());
	}

	/** Issue 13.11: a failing command inside a loop reports its own message, not "';' expected". */
	@Test
	void failureInsideALoopReportsTheCommand() {
		final ImagePlus img = cell("cell.tif");
		ImageJHarness.open(img, centredPsf("psf.tif"));
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.runMacro(
				"for (i = 0; i < 2; i++) {\n  run(\"Deconvolve...\", \"image=nope.tif psf=psf.tif\");\n}\nprint(\"not reached\");\n", null));
		// headless: "'nope.tif' is not a valid image title (image=)"; with a display the dialog's choice reads it differently
		assertTrue(e.getMessage().startsWith("Macro failed: Deconvolve: ") && e.getMessage().contains("'nope.tif'")
				&& e.getMessage().endsWith(" (line 2)"), e.getMessage());
	}

	/** Issue 13.9: an all-zero PSF without normalize, a negative object with noise, photons=1e20: refused in one line. */
	@Test
	void convolveRefusesSilentWrongResults() {
		final ImagePlus img = cell("cell.tif");
		final ImagePlus zero = ImageBridge.toImagePlus(Volume.zeros(5, 5, 3, VoxelSize.microns(0.1, 0.1, 0.25)), "zero-psf.tif");
		final Volume neg = SampleScene.cell(24, 24, 8, 3).copy();
		for (int i = 0; i < neg.data().length; i++) neg.data()[i] -= 0.5f;
		final ImagePlus negative = ImageBridge.toImagePlus(neg.withVoxelSize(VoxelSize.microns(0.1, 0.1, 0.25)), "negative.tif");
		ImageJHarness.open(img, centredPsf("psf.tif"), zero, negative);
		assertTrue(oneLineFailure(img, "Convolve with PSF...", "image=cell.tif psf=zero-psf.tif boundary=zero photons=0")
				.contains("The PSF sums to 0.0 (all zero or negative)"));
		assertTrue(oneLineFailure(img, "Convolve with PSF...", "image=negative.tif psf=psf.tif normalize photons=10")
				.contains("The image has negative values"));
		assertTrue(oneLineFailure(img, "Convolve with PSF...", "image=cell.tif psf=psf.tif normalize photons=1e20")
				.contains("more than 1e+15"));
		// still fine: a realistic photon count, and a negative object without noise
		ImageJHarness.run(img, "Convolve with PSF...", "image=cell.tif psf=psf.tif normalize photons=1e6");
		ImageJHarness.run(img, "Convolve with PSF...", "image=negative.tif psf=psf.tif normalize photons=0");
	}

	/**
	 * Issue 13.9: a PSF whose centre of mass is off its centre voxel shifts the result by as much (the shift
	 * theorem of the Fourier transform, a textbook fact): warned about in the Log and the record; recentre moves
	 * it back, and then the result equals the one with the centred PSF.
	 */
	@Test
	void offCentrePsfIsWarnedAboutAndRecentred() {
		final ImagePlus img = cell("cell.tif");
		final Volume g = SampleScene.gaussianPsf(9, 9, 5);
		final VoxelSize vs = VoxelSize.microns(0.1, 0.1, 0.25);
		// the same Gaussian in a 15-voxel-wide box: centred (x 3..11), and 3 voxels to the right (x 6..14)
		final Volume centred = Volume.zeros(15, 9, 5, vs), shifted = Volume.zeros(15, 9, 5, vs);
		for (int z = 0; z < 5; z++)
			for (int y = 0; y < 9; y++)
				for (int x = 0; x < 9; x++) {
					centred.set(x + 3, y, z, g.get(x, y, z));
					shifted.set(x + 6, y, z, g.get(x, y, z));
				}
		final double[] off = Psfs.centroidOffset(shifted);
		assertEquals(3, off[0], 1e-5, "centre of mass moved by 3 voxels in x");
		assertEquals(0, off[1], 1e-6);
		ImageJHarness.open(img, ImageBridge.toImagePlus(centred, "psf.tif"), ImageBridge.toImagePlus(shifted, "shifted-psf.tif"));
		final String base = "image=cell.tif boundary=zero normalize photons=0";
		final ImageJHarness.Result warned = ImageJHarness.run(img, "Convolve with PSF...", base + " psf=shifted-psf.tif");
		assertTrue(warned.log().stream().anyMatch(l -> l.contains("Warning: the PSF's centre of mass is off its centre voxel by (3.")), warned.log().toString());
		final var record = ImageProvenance.of(warned.onlyCreated()).orElseThrow();
		assertTrue(record.warnings().size() == 1 && record.warnings().get(0).contains("add recentre"), record.warnings().toString());
		assertEquals(null, record.run().get("warning"), "in the warnings list, not the old single key");
		final ImagePlus reference = ImageJHarness.run(img, "Convolve with PSF...", base + " psf=psf.tif").onlyCreated();
		final ImagePlus recentred = ImageJHarness.run(img, "Convolve with PSF...", base + " psf=shifted-psf.tif recentre").onlyCreated();
		ImageJHarness.assertSamePixels(reference, recentred, 1e-6);
		// Deconvolve warns too (Log and the record's notes)
		final ImageJHarness.Result d = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=shifted-psf.tif method=richardson-lucy iterations=2 "
				+ "offset=0 background=0");
		assertTrue(String.valueOf(ImageProvenance.of(d.onlyCreated()).orElseThrow().run().get("notes")).contains("Warning: the PSF's centre of mass"));
		final ImageJHarness.Result r = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=shifted-psf.tif method=richardson-lucy iterations=2 "
				+ "offset=0 background=0 recentre");
		assertTrue(String.valueOf(ImageProvenance.of(r.onlyCreated()).orElseThrow().run().get("notes")).contains("PSF re-centred"));
		final ImagePlus dRef = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=psf.tif method=richardson-lucy iterations=2 offset=0 background=0")
				.onlyCreated();
		ImageJHarness.assertSamePixels(dRef, r.onlyCreated(), 1e-5);
	}

	/** Issue 13.13: Cancel in the dialog, or Esc during the run, records nothing. */
	@Test
	@Tag("display")
	void cancelledRunsAreNotRecorded() {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = ImageBridge.toImagePlus(SampleScene.cell(64, 64, 16, 3).withVoxelSize(VoxelSize.microns(0.1, 0.1, 0.25)), "cell.tif");
		ImageJHarness.open(img, centredPsf("psf.tif"));
		assertEquals("", ImageJHarness.recorderTextOf(img, "Convolve with PSF...", ImageJHarness.DialogInput.defaults(), true, null).strip());
		final ImageJHarness.DialogInput many = dialog -> ((java.awt.TextField) dialog.getNumericFields().get(0)).setText("500");
		final String escaped = ImageJHarness.recorderTextOf(img, "Deconvolve...", many, false, () -> IJ.setKeyDown(KeyEvent.VK_ESCAPE));
		assertFalse(escaped.contains("run(\"Deconvolve...\""), escaped);
		// a completed run is recorded (the control)
		final String done = ImageJHarness.recorderTextOf(img, "Convolve with PSF...", ImageJHarness.DialogInput.defaults(), false, null);
		assertTrue(done.contains("run(\"Convolve with PSF...\""), done);
	}
}
