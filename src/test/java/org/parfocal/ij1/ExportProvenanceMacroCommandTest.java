package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/**
 * Record → save as TIFF → reopen → export macro → run headless → same pixels, through a three-command chain
 * (PSF from Optics → Convolve with PSF → Deconvolve) whose only file input is the object.
 */
class ExportProvenanceMacroCommandTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void exportedMacroRebuildsTheSavedOutputBitForBit(@TempDir final Path dir) throws Exception {
		final Path objectFile = dir.resolve("object.tif");
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(40, 36, 10, 3).withVoxelSize(VoxelSize.microns(0.08, 0.08, 0.2)), "object.tif"))
				.saveAsTiff(objectFile.toString()));
		final ImagePlus object = IJ.openImage(objectFile.toString());
		Interpreter.batchMode = true;
		Interpreter.addBatchModeImage(object);
		final ImagePlus psf = ImageJHarness.run(null, "PSF from Optics...", PsfFromOpticsCommandTest.OPTIONS.replace("size_xy=33 size_z=21", "size_xy=15 size_z=7"))
				.onlyCreated();
		Interpreter.addBatchModeImage(psf);
		final ImagePlus blurred = ImageJHarness.run(object, "Convolve with PSF...", "image=object.tif psf=" + psf.getTitle()
				+ " boundary=zero normalize background=2 photons=1 seed=11 offset=100").onlyCreated();
		Interpreter.addBatchModeImage(blurred);
		final ImagePlus result = ImageJHarness.run(blurred, "Deconvolve...", "image=" + blurred.getTitle() + " psf=" + psf.getTitle()
				+ " method=richardson-lucy-tv iterations=6 regularization=0.002 stop=fixed threshold=0.001 edges=non-circulant offset=100 background=auto")
				.onlyCreated();
		final Path saved = dir.resolve("result.tif");
		assertTrue(new FileSaver(result).saveAsTiff(saved.toString()));
		final ImagePlus reopened = IJ.openImage(saved.toString());
		Interpreter.addBatchModeImage(reopened);

		final Path macro = dir.resolve("rebuild.ijm");
		ImageJHarness.run(reopened, "Export Provenance as Macro...", "macro=[" + macro + "]");
		final String text = Files.readString(macro);
		assertTrue(text.contains("run(\"PSF from Optics...\"") && text.contains("run(\"Convolve with PSF...\"") && text.contains("run(\"Deconvolve...\""),
				text);
		assertTrue(text.contains("open(\"" + objectFile + "\")"), text);

		final Path rebuilt = dir.resolve("rebuilt.tif");
		final ImageJHarness.HeadlessRun run = ImageJHarness.runHeadlessJvm(macro, rebuilt.toString());
		assertEquals(0, run.exitCode(), run.stderr() + run.stdout());
		ImageJHarness.assertSamePixels(reopened, IJ.openImage(rebuilt.toString()), 0);

		// Never replaced silently.
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(reopened, "Export Provenance as Macro...", "macro=[" + macro + "]"));
		assertTrue(e.getMessage().contains("exists"), e.getMessage());
		ImageJHarness.run(reopened, "Export Provenance as Macro...", "macro=[" + macro + "] replace");
	}

	@Test
	void missingInputFileIsNamedWhenReplaying(@TempDir final Path dir) throws Exception {
		final Path objectFile = dir.resolve("gone.tif");
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(24, 24, 6, 3).withVoxelSize(VoxelSize.microns(0.08, 0.08, 0.2)), "gone.tif"))
				.saveAsTiff(objectFile.toString()));
		final ImagePlus object = IJ.openImage(objectFile.toString());
		final ImagePlus psf = ImageBridge.toImagePlus(SampleScene.gaussianPsf(5, 5, 3), "psf.tif");
		final Path psfFile = dir.resolve("psf.tif");
		new FileSaver(psf).saveAsTiff(psfFile.toString());
		final ImagePlus psfOpened = IJ.openImage(psfFile.toString());
		Interpreter.batchMode = true;
		Interpreter.addBatchModeImage(object);
		Interpreter.addBatchModeImage(psfOpened);
		final ImagePlus out = ImageJHarness.run(object, "Convolve with PSF...", "image=gone.tif psf=psf.tif boundary=zero normalize background=0 photons=0 seed=1 offset=0")
				.onlyCreated();
		Interpreter.addBatchModeImage(out);
		final Path macro = dir.resolve("m.ijm");
		ImageJHarness.run(out, "Export Provenance as Macro...", "macro=[" + macro + "]");
		Files.delete(objectFile);
		final ImageJHarness.HeadlessRun run = ImageJHarness.runHeadlessJvm(macro, null);
		assertEquals(1, run.exitCode());
		assertTrue(run.stderr().contains("Macro failed: input file not found: " + objectFile), run.stderr());
	}

	@Test
	void imagesWithoutProvenanceAreRefusedInOneLine() {
		final ImagePlus plain = IJ.createImage("plain", "32-bit ramp", 8, 8, 1);
		Interpreter.batchMode = true;
		Interpreter.addBatchModeImage(plain);
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(plain, "Export Provenance as Macro...", "macro=/tmp/never-written.ijm"));
		assertTrue(e.getMessage().contains("has no Parfocal provenance"), e.getMessage());
	}
}
