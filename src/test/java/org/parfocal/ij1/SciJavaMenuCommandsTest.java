package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;
import ij.Prefs;
import ij.plugin.filter.Analyzer;

import java.io.File;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Map;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.demo.SampleStacks;
import org.parfocal.fft.FftBackend;
import org.parfocal.scijava.CompareWithReferencesCommand;
import org.parfocal.scijava.DeconvolveCommand;
import org.parfocal.scijava.ExportProvenanceMacroCommand;
import org.parfocal.scijava.MakeSampleStacksCommand;
import org.parfocal.scijava.ParfocalOptionsCommand;
import org.parfocal.scijava.PsfFromBeadsCommand;
import org.parfocal.scijava.WriteReportCommand;
import org.parfocal.testing.ImageJHarness;
import org.scijava.Context;
import org.scijava.command.Command;
import org.scijava.command.CommandModule;
import org.scijava.command.CommandService;

/**
 * The SciJava commands not covered by {@code SciJavaCommandsTest}, through a {@link CommandService}: each does what
 * its menu entry does (same pixels, same files, same setting).
 */
class SciJavaMenuCommandsTest {

	private static Context context;
	private static CommandService commands;

	@BeforeAll
	static void context() {
		context = new Context(CommandService.class);
		commands = context.service(CommandService.class);
	}

	@AfterAll
	static void dispose() {
		context.dispose();
	}

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static CommandModule run(final Class<? extends Command> c, final Object... inputs) throws Exception {
		final CommandModule m = commands.run(c, true, inputs).get();
		assertFalse(m.isCanceled(), c.getSimpleName() + " cancelled: " + m.getCancelReason());
		return m;
	}

	@Test
	void psfFromBeads() throws Exception {
		final ImagePlus beads = PsfFromBeadsCommandTest.beads("beads.tif");
		final ImagePlus psf = (ImagePlus) run(PsfFromBeadsCommand.class, "image", beads, "box_xy", 1.5, "box_z", 2.4, "reject_saturated", true)
				.getOutput("result");
		ImageJHarness.open(beads);
		final ImagePlus menu = ImageJHarness.run(beads, "PSF from Beads...", PsfFromBeadsCommandTest.OPTIONS).onlyCreated();
		ImageJHarness.assertSamePixels(menu, psf, 0);
	}

	@Test
	void compareKeepsItsTable(@TempDir final Path dir) throws Exception {
		CompareWithReferencesCommandTest.writeReferences(dir, 2);
		final ImagePlus res = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.deconvolved(), "result.tif");
		run(CompareWithReferencesCommand.class, "result", res, "reference_folder", dir.toFile(), "patches", 2048, "bootstrap", 10, "seed", 3);
		assertEquals("4", MacroFunctions.selectTable("Reference comparison of result"), "patch distance + intensity, gradient, Laplacian");
		assertTrue(Analyzer.getResultsTable().getStringValue("property", 0).startsWith("patch"), Analyzer.getResultsTable().getStringValue("property", 0));
	}

	@Test
	void exportMacroAndReportWriteTheMenuPathsFiles(@TempDir final Path dir) throws Exception {
		// inputs from files, so that the macro can rebuild the result
		ij.IJ.saveAsTiff(org.parfocal.scijava.SciJavaTestImages.recorded("cell.tif"), dir.resolve("cell.tif").toString());
		ij.IJ.saveAsTiff(ImageBridge.toImagePlus(org.parfocal.demo.SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(
				org.parfocal.core.VoxelSize.microns(0.08, 0.08, 0.2)), "psf.tif"), dir.resolve("psf.tif").toString());
		final ImagePlus img = ij.IJ.openImage(dir.resolve("cell.tif").toString()), psf = ij.IJ.openImage(dir.resolve("psf.tif").toString());
		final ImagePlus out = (ImagePlus) run(DeconvolveCommand.class, "image", img, "psf", psf, "iterations", 3, "offset", "100").getOutput("result");
		final File a = dir.resolve("a.ijm").toFile(), b = dir.resolve("b.ijm").toFile();
		run(ExportProvenanceMacroCommand.class, "image", out, "macro", a);
		ImageJHarness.open(out);
		ImageJHarness.run(out, "Export Provenance as Macro...", "macro=[" + b + "]");
		assertEquals(Files.readString(b.toPath()), Files.readString(a.toPath()), "same macro");
		final File html = dir.resolve("report.html").toFile();
		run(WriteReportCommand.class, "image", out, "file", html);
		final String text = Files.readString(html.toPath());
		assertTrue(text.contains("<html") && text.contains(out.getTitle()), "a report of " + out.getTitle());
	}

	@Test
	void parfocalOptionsSetsTheLibrary() throws Exception {
		final String property = System.getProperty(FftBackend.PROPERTY), pref = Prefs.get(ParfocalOptions.PREF_FFT, null);
		try {
			run(ParfocalOptionsCommand.class, "fft_library", "java");
			assertEquals("java", System.getProperty(FftBackend.PROPERTY));
			assertEquals(FftBackend.JAVA, FftBackend.selected());
		} finally {
			if (property == null) System.clearProperty(FftBackend.PROPERTY);
			else System.setProperty(FftBackend.PROPERTY, property);
			Prefs.set(ParfocalOptions.PREF_FFT, pref);
		}
	}

	@Test
	void makeSampleStacksGivesTheSevenStacks() throws Exception {
		final CommandModule m = run(MakeSampleStacksCommand.class);
		final Map<String, ImagePlus> expected = SampleStacks.make();
		final String[] outputs = { "widefield", "psf", "truth", "beads", "beads_psf", "two_channel", "two_channel_psf" };
		int i = 0;
		for (final ImagePlus e : expected.values()) {
			final ImagePlus got = (ImagePlus) m.getOutput(outputs[i++]);
			assertNotNull(got, outputs[i - 1]);
			assertEquals(e.getTitle(), got.getTitle());
			ImageJHarness.assertSamePixels(e, got, 0);
		}
		assertEquals(outputs.length, i);
	}
}
