package org.parfocal.scijava;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeSet;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.parfocal.command.CommandKeys;
import org.parfocal.testing.ImageJHarness;
import org.scijava.Context;
import org.scijava.command.CommandInfo;
import org.scijava.command.CommandModule;
import org.scijava.command.CommandService;
import org.scijava.script.ScriptModule;
import org.scijava.script.ScriptService;

/**
 * The SciJava commands through a SciJava {@link Context} and its {@link CommandService} (scijava-common alone, as a
 * headless script would use them): every menu entry of plugins.config has a Command in the plugin index, and the
 * typed path gives the same pixels as the menu path run with options written out by hand here.
 */
class SciJavaCommandsTest {

	private static Context context;
	private static CommandService commands;

	@BeforeAll
	static void context() {
		context = new Context(CommandService.class, ScriptService.class);
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

	/** The menu labels of plugins.config (the jar's resource), separators left out. */
	static List<String> menuLabels() throws IOException {
		try (InputStream in = SciJavaCommandsTest.class.getResourceAsStream("/plugins.config")) {
			final List<String> labels = new ArrayList<>();
			for (final String line : new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n")) {
				final String t = line.strip();
				if (t.isEmpty() || t.startsWith("#")) continue;
				final String label = t.substring(t.indexOf('"') + 1, t.lastIndexOf('"'));
				if (!label.equals("-")) labels.add(label);
			}
			return labels;
		}
	}

	@Test
	void everyMenuEntryHasACommandInThePluginIndexWithoutASecondMenuEntry() throws Exception {
		final Map<String, CommandInfo> byLabel = new LinkedHashMap<>();
		for (final CommandInfo info : commands.getCommands()) {
			if (!info.getClassName().startsWith("org.parfocal.")) continue;
			assertTrue(info.canRunHeadless(), info.getClassName() + " runs headless");
			assertTrue(info.getMenuPath() == null || info.getMenuPath().isEmpty(), info.getClassName() + " adds no menu entry of its own");
			final MenuCommand c = (MenuCommand) info.loadClass().getDeclaredConstructor().newInstance();
			byLabel.put(c.menuLabel(), info);
			// every key of the command's table is an input (so a script can set each one), and nothing else is sent
			final CommandKeys.Command keys = CommandKeys.of(c.menuLabel()).orElse(null);
			if (keys != null) assertEquals(new TreeSet<>(keys.keys().keySet()), new TreeSet<>(c.inputNames().stream().filter(keys.keys()::containsKey).toList()),
					c.menuLabel() + ": inputs cover the keys");
		}
		final List<String> labels = menuLabels();
		assertEquals(10, labels.size(), "plugins.config entries");
		for (final String label : labels) assertTrue(byLabel.containsKey(label), "a SciJava command for " + label + " (have " + byLabel.keySet() + ")");
		assertEquals(labels.size(), byLabel.size(), "one command per menu entry");
	}

	private static CommandModule run(final Class<? extends MenuCommand> c, final Object... inputs) throws Exception {
		final CommandModule m = commands.run(c, true, inputs).get();
		assertFalse(m.isCanceled(), c.getSimpleName() + " cancelled: " + m.getCancelReason());
		return m;
	}

	static ImagePlus recorded(final String title) {
		return SciJavaTestImages.recorded(title);
	}

	@Test
	void psfFromOpticsConvolveAndDeconvolveGiveTheMenuPathsPixels() throws Exception {
		// PSF from Optics: no image involved
		final String optics = "model=gaussian modality=widefield na=1.2 immersion_index=1.33 sample_index=1.33 emission=0.52 voxel_xy=0.08 "
				+ "voxel_z=0.2 size_xy=11 size_z=7";
		final ImagePlus psfMenu = ImageJHarness.run(null, "PSF from Optics...", optics).output();
		final ImagePlus psf = (ImagePlus) run(PsfFromOpticsCommand.class, "model", "gaussian", "modality", "widefield", "na", 1.2, "immersion_index", 1.33,
				"sample_index", 1.33, "emission", 0.52, "voxel_xy", 0.08, "voxel_z", 0.2, "size_xy", 11, "size_z", 7).getOutput("result");
		assertNotNull(psf, "PSF output");
		assertNotSame(psfMenu, psf);
		ImageJHarness.assertSamePixels(psfMenu, psf, 0);
		assertEquals(11, psf.getWidth());
		assertEquals(7, psf.getNSlices());

		// Convolve with PSF: the images are handed over as objects, ImageJ never saw them (a headless script's)
		final ImagePlus object = recorded("object.tif");
		psf.setTitle("optics-psf.tif");
		final ImagePlus blurred = (ImagePlus) run(ConvolveWithPsfCommand.class, "image", object, "psf", psf, "boundary", "zero", "normalize", true,
				"background", 3.0, "photons", 2.0, "seed", 11).getOutput("result");
		ImageJHarness.open(object, psf);
		final ImagePlus blurredMenu = ImageJHarness.run(object, "Convolve with PSF...", "image=object.tif psf=optics-psf.tif boundary=zero normalize "
				+ "background=3 photons=2 seed=11").onlyCreated();
		ImageJHarness.assertSamePixels(blurredMenu, blurred, 0);
		ImageJHarness.closeAll();

		// Deconvolve
		blurred.setTitle("blurred.tif");
		final ImagePlus result = (ImagePlus) run(DeconvolveCommand.class, "image", blurred, "psf", psf, "method", "richardson-lucy-tv", "iterations", 4,
				"regularization", 0.002, "offset", "0").getOutput("result");
		ImageJHarness.open(blurred, psf);
		final ImagePlus resultMenu = ImageJHarness.run(blurred, "Deconvolve...", "image=blurred.tif psf=optics-psf.tif method=richardson-lucy-tv "
				+ "iterations=4 regularization=0.002 offset=0").onlyCreated();
		ImageJHarness.assertSamePixels(resultMenu, result, 0);
		assertTrue(result.getInfoProperty() != null && result.getInfoProperty().contains("iterations=4"), "the provenance record of the menu path");
	}

	@Test
	void deconvolveFromOpticsSendsTheOpticsKeys() throws Exception {
		final ImagePlus img = recorded("cell.tif");
		final ImagePlus result = (ImagePlus) run(DeconvolveCommand.class, "image", img, "method", "richardson-lucy", "iterations", 2, "offset", "100",
				"model", "gaussian", "na", 1.2, "immersion_index", 1.33, "sample_index", 1.33, "emission", 0.52, "size_xy", 9, "size_z", 5)
						.getOutput("result");
		ImageJHarness.open(img);
		final ImagePlus menu = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=from_optics method=richardson-lucy iterations=2 offset=100 "
				+ "model=gaussian na=1.2 immersion_index=1.33 sample_index=1.33 emission=0.52 size_xy=9 size_z=5").onlyCreated();
		ImageJHarness.assertSamePixels(menu, result, 0);
	}

	@Test
	void blindDeconvolveGivesTheMenuPathsThreeImages() throws Exception {
		final ImagePlus img = recorded("cell.tif");
		final CommandModule m = run(BlindDeconvolveCommand.class, "image", img, "fwhm_xy", 0.3, "fwhm_z", 0.8, "iterations", 4, "snapshot_interval", 2, "offset", "100");
		final ImagePlus result = (ImagePlus) m.getOutput("result"), psf = (ImagePlus) m.getOutput("estimated_psf");
		final ImagePlus history = (ImagePlus) m.getOutput("psf_history");
		ImageJHarness.open(img);
		final List<ImagePlus> made = ImageJHarness.run(img, "Blind Deconvolve...", "image=cell.tif psf=gaussian fwhm_xy=0.3 fwhm_z=0.8 iterations=4 snapshot_interval=2 offset=100")
				.created();
		ImageJHarness.assertSamePixels(made.stream().filter(i -> i.getTitle().equals("cell-blind.tif")).findFirst().orElseThrow(), result, 0);
		ImageJHarness.assertSamePixels(made.stream().filter(i -> i.getTitle().equals("cell-blind-psf.tif")).findFirst().orElseThrow(), psf, 0);
		ImageJHarness.assertSamePixels(made.stream().filter(i -> i.getTitle().equals("cell-blind-psf-history.tif")).findFirst().orElseThrow(), history, 0);
	}

	/** The README's "Scripting from Fiji" example, the file itself, run by SciJava's script service (Groovy). */
	@Test
	void theReadmeScriptGivesTheMenuPathsPixels() throws Exception {
		final java.io.File script = new java.io.File("sample-stacks/deconvolve.groovy");
		final java.io.File stack = new java.io.File("sample-stacks/quillwort-widefield.tif"), psfFile = new java.io.File("sample-stacks/quillwort-psf.tif");
		final ScriptModule m = context.service(ScriptService.class).run(script, true, "stack_file", stack, "psf_file", psfFile, "iterations", 3).get();
		final ImagePlus result = (ImagePlus) m.getOutput("result");
		assertNotNull(result, "the script's output");
		final ImagePlus img = ij.IJ.openImage(stack.getPath()), psf = ij.IJ.openImage(psfFile.getPath());
		ImageJHarness.open(img, psf);
		final ImagePlus menu = ImageJHarness.run(img, "Deconvolve...", "image=quillwort-widefield.tif psf=quillwort-psf.tif method=richardson-lucy-tv "
				+ "iterations=3 regularization=0.002").onlyCreated();
		ImageJHarness.assertSamePixels(menu, result, 0);
	}

	@Test
	void aCommandErrorCancelsTheModuleWithItsOneLine() throws Exception {
		final CommandModule m = commands.run(PsfFromOpticsCommand.class, true, "model", "gaussian", "na", 1.6, "immersion_index", 1.33, "voxel_xy", 0.08,
				"voxel_z", 0.2).get();
		assertTrue(m.isCanceled(), "cancelled");
		assertTrue(m.getCancelReason().startsWith("PSF from Optics: "), m.getCancelReason());
		assertFalse(m.getCancelReason().contains("\n"), "one line");
		assertEquals(null, m.getOutput("result"));
	}
}
