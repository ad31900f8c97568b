package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Base64;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import javax.imageio.ImageIO;

import ij.ImagePlus;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

class WriteReportCommandTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** Issue 13, item 6: the record of a bin/parfocal-blocks output (inputs by path, no pixel hash) gave a NullPointerException. */
	@Test
	void reportOfABlocksRunnerOutput(@TempDir final Path dir) throws Exception {
		final org.parfocal.core.VoxelSize v = org.parfocal.core.VoxelSize.microns(0.08, 0.08, 0.2);
		final Path in = dir.resolve("in.tif"), psf = dir.resolve("psf.tif"), out = dir.resolve("out.tif");
		assertTrue(new ij.io.FileSaver(ImageBridge.toImagePlus(org.parfocal.demo.SampleScene.cell(24, 20, 6, 5).withVoxelSize(v), "in")).saveAsTiffStack(in.toString()));
		assertTrue(new ij.io.FileSaver(ImageBridge.toImagePlus(org.parfocal.demo.SampleScene.gaussianPsf(5, 5, 3), "psf")).saveAsTiffStack(psf.toString()));
		org.parfocal.cli.BlockRunner.run(org.parfocal.blocks.Recipe.parse("psf=" + psf + " method=richardson-lucy iterations=2 stop=fixed offset=0 background=0"),
				in, out, 0, null, org.parfocal.core.Monitor.NONE);
		final ImagePlus result = ij.IJ.openImage(out.toString());
		Interpreter.addBatchModeImage(result);
		final Path html = dir.resolve("blocks-report.html");
		ImageJHarness.run(result, "Write Report...", "file=[" + html + "]");
		final String page = Files.readString(html);
		assertTrue(page.contains("block_plan") && page.contains("psf.tif"), "the plan and the PSF file are in the report");
	}

	@Test
	void reportOfADeconvolutionIsOneSelfContainedPageWithEveryParameterAndReadableFigures(@TempDir final Path dir) throws Exception {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(img.getCalibration().pixelWidth > 0
				? org.parfocal.core.VoxelSize.microns(0.08, 0.08, 0.2) : null), "psf.tif");
		DeconvolveCommandTest.open(img, psf);
		final ImagePlus out = ImageJHarness.run(img, "Deconvolve...", DeconvolveCommandTest.OPTIONS.replace("iterations=12", "iterations=4")).onlyCreated();
		Interpreter.addBatchModeImage(out);
		final Path html = dir.resolve("report.html");
		ImageJHarness.run(out, "Write Report...", "file=[" + html + "]");
		final String page = Files.readString(html);
		assertTrue(page.startsWith("<!DOCTYPE html>"));
		assertTrue(page.contains("Caution."), "the caution is shown");
		for (final String key : DeconvolveCommandTest.KEYS.subList(0, DeconvolveCommandTest.KEYS.size() - 1))
			assertTrue(page.contains("<td>" + key + "</td>"), "parameter " + key);
		assertTrue(page.contains("FWHM ("));
		// issue 17: warnings come first, the convergence is a figure, projections say their display range and have
		// scale bars, inputs show their calibration
		assertTrue(page.indexOf("id=\"warnings\"") > 0 && page.indexOf("id=\"warnings\"") < page.indexOf("What was done"), "warnings at the top");
		assertTrue(page.contains("alt=\"Convergence: relative change"), "convergence figure");
		assertTrue(page.contains("display range"), "display ranges");
		assertTrue(page.contains("log scale (peak to 10⁻³ of it)"), "PSF on a log scale");
		assertTrue(page.contains("<th>voxel size</th>") && page.contains("0.08 x 0.08 x 0.2 µm"), "input calibration");
		assertFalse(page.contains("http://") || page.contains("https://") || page.contains("<script"), "self-contained, no scripts");
		final Matcher m = Pattern.compile("data:image/png;base64,([A-Za-z0-9+/=]+)").matcher(page);
		int figures = 0;
		while (m.find()) {
			assertNotNull(ImageIO.read(new ByteArrayInputStream(Base64.getDecoder().decode(m.group(1)))), "figure " + figures + " is a PNG");
			figures++;
		}
		assertEquals(8, figures, "result XY+XZ, image XY+XZ, PSF XY+XZ (log), PSF profiles, convergence");
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(out, "Write Report...", "file=[" + html + "]"));
		assertTrue(e.getMessage().contains("exists"), e.getMessage());
	}
}
