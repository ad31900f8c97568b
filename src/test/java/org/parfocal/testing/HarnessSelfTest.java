package org.parfocal.testing;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNotSame;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Choice;
import java.awt.TextField;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.cli.HeadlessMacro;

import ij.ImagePlus;
import ij.ImageStack;
import ij.process.FloatProcessor;

/**
 * Tests of {@link ImageJHarness} with commands built into ImageJ 1.x, so they hold whatever
 * Parfocal's own plugins do. Expected values come from closed forms (the 2D Gaussian
 * 1/(2 pi sigma^2) at its centre; a maximum or sum over slices computed here), not from ImageJ.
 */
class HarnessSelfTest {

	/** A dark 33x33 image with one bright pixel of value 1 at its centre (16, 16). */
	private static ImagePlus impulse() {
		final FloatProcessor fp = new FloatProcessor(33, 33);
		fp.setf(16, 16, 1f);
		return new ImagePlus("impulse", fp);
	}

	/** Three 5x4 slices with seeded, distinct values; slice k holds values around 10 k. */
	private static ImagePlus smallStack() {
		final java.util.Random random = new java.util.Random(20240611L);
		final ImageStack stack = new ImageStack(5, 4);
		for (int k = 1; k <= 3; k++) {
			final float[] pixels = new float[20];
			for (int i = 0; i < pixels.length; i++) pixels[i] = 10f * k + (float) random.nextInt(50);
			stack.addSlice(new FloatProcessor(5, 4, pixels));
		}
		return new ImagePlus("stack", stack);
	}

	private static float[][] pixelsOf(final ImagePlus imp) {
		final float[][] all = new float[imp.getStackSize()][];
		for (int z = 1; z <= imp.getStackSize(); z++) {
			all[z - 1] = ((float[]) imp.getStack().getProcessor(z).getPixels()).clone();
		}
		return all;
	}

	private static double sum(final ImagePlus imp) {
		double s = 0;
		for (final float v : (float[]) imp.getProcessor().getPixels()) s += v;
		return s;
	}

	// -- (a) commands by menu label, headless --

	@Test
	void gaussianBlurUsesTheMacroOptionsAndWorksInPlace() {
		final ImagePlus imp = impulse();
		final ImageJHarness.Result result = ImageJHarness.run(imp, "Gaussian Blur...", "sigma=1.5");
		assertTrue(result.created().isEmpty(), "Gaussian Blur works in place: " + result.created());
		assertSame(imp, result.output());
		// Centre of a unit-mass 2D Gaussian: 1/(2 pi sigma^2) (textbook closed form). ImageJ's sampled,
		// normalised kernel differs from it by far less than 1e-4 at sigma = 1.5 (from memory: the
		// discrete sum of exp(-x^2/(2 sigma^2)) equals sigma sqrt(2 pi) to ~1e-8 for sigma >= 1).
		final double sigma = 1.5;
		assertEquals(1 / (2 * Math.PI * sigma * sigma), imp.getProcessor().getf(16, 16), 1e-4,
			"centre value; the default sigma (2) would give 0.0398");
		assertEquals(1.0, sum(imp), 1e-5, "a normalised blur keeps the total intensity");
	}

	@Test
	void commandThatCreatesAnImageLeavesTheInputUnchanged() {
		final ImagePlus imp = smallStack();
		final float[][] before = pixelsOf(imp);
		final ImageJHarness.Result result = ImageJHarness.run(imp, "Z Project...", "projection=[Max Intensity]");
		final ImagePlus max = result.onlyCreated();
		assertNotSame(imp, max);
		assertArrayEquals(before, pixelsOf(imp), "input pixels");
		assertEquals(3, imp.getStackSize(), "input slices");
		assertEquals(1, max.getStackSize());
		for (int i = 0; i < 20; i++) {
			final float expected = Math.max(before[0][i], Math.max(before[1][i], before[2][i]));
			assertEquals(expected, max.getProcessor().getf(i), 0f, "max over slices at index " + i);
		}
	}

	@Test
	void unknownCommandIsAFailureNamingIt() {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
			() -> ImageJHarness.run(impulse(), "No Such Command Here...", "x=1"));
		assertTrue(e.getMessage().contains("Unrecognized command: \"No Such Command Here...\""), e.getMessage());
		assertTrue(e.getMessage().lines().count() == 1, "one line: " + e.getMessage());
	}

	@Test
	void errorReportedByTheCommandIsAFailure() {
		// Z Project reports IJ.error("Z Project", "Stack required") on a single plane and returns.
		final ImagePlus single = impulse();
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
			() -> ImageJHarness.run(single, "Z Project...", "projection=[Max Intensity]"));
		assertEquals("run(\"Z Project...\", \"projection=[Max Intensity]\") failed: Stack required", e.getMessage());
	}

	@Test
	void pluginsConfigCommandsAreInstalled() throws IOException {
		final String dirs = System.getProperty("ij1.plugin.dirs");
		Assumptions.assumeTrue(dirs != null, "ij1.plugin.dirs is not set (the pom's Surefire argLine sets it)");
		final Path config = Path.of(dirs.split(java.io.File.pathSeparator)[0], "plugins.config");
		Assumptions.assumeTrue(Files.exists(config), "no " + config + " yet");
		final List<String[]> entries = new ArrayList<>();
		for (final String line : Files.readAllLines(config)) {
			final String t = line.strip();
			if (t.isEmpty() || t.startsWith("#")) continue;
			// Plugins>Sub, "Label", pkg.Class("arg")
			final int q1 = t.indexOf('"');
			final int q2 = t.indexOf('"', q1 + 1);
			if (t.substring(q1 + 1, q2).equals("-")) continue; // a menu separator, not a command
			entries.add(new String[] { t.substring(q1 + 1, q2), t.substring(t.indexOf(',', q2) + 1).strip() });
		}
		Assumptions.assumeFalse(entries.isEmpty(), config + " lists no command yet");
		final Map<String, String> installed = ImageJHarness.installedCommands();
		for (final String[] entry : entries) {
			assertEquals(entry[1], installed.get(entry[0]), "command \"" + entry[0] + "\" from " + config);
		}
	}

	// -- (b) record with a display, replay headless --

	@Test
	@Tag("display")
	void recordedGaussianBlurReplaysToTheSamePixels() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus recordedOn = impulse();
		final ImageJHarness.Recording recording = ImageJHarness.record(recordedOn, "Gaussian Blur...",
			dialog -> ((TextField) dialog.getNumericFields().get(0)).setText("1.25"));
		assertEquals("run(\"Gaussian Blur...\", \"sigma=1.25\");", recording.line());
		assertSame(recordedOn, recording.result().output(), "blurred in place");
		assertEquals(1 / (2 * Math.PI * 1.25 * 1.25), recordedOn.getProcessor().getf(16, 16), 1e-4,
			"the value typed into the dialog was used");

		final ImagePlus replayedHere = impulse();
		ImageJHarness.replay(replayedHere, recording.line());
		ImageJHarness.assertSamePixels(recordedOn, replayedHere, 0);

		final ImagePlus replayedHeadless = ImageJHarness.replayInHeadlessJvm(impulse(), recording.line());
		ImageJHarness.assertSamePixels(recordedOn, replayedHeadless, 0);
	}

	@Test
	@Tag("display")
	void recordedChoiceOfANewImageCommandReplays() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus stack = smallStack();
		final float[][] before = pixelsOf(stack);
		final String[] shownFirst = new String[1];
		final ImageJHarness.Recording recording = ImageJHarness.record(stack, "Z Project...", dialog -> {
			final Choice method = (Choice) dialog.getChoices().get(0);
			shownFirst[0] = method.getSelectedItem();
			method.select("Sum Slices");
		});
		assertNotEquals("Sum Slices", shownFirst[0], "the dialog must not already show the choice made here");
		assertEquals("run(\"Z Project...\", \"projection=[Sum Slices]\");", recording.line());
		assertArrayEquals(before, pixelsOf(stack), "recording left the input unchanged");
		final ImagePlus total = recording.result().onlyCreated();
		for (int i = 0; i < 20; i++) {
			assertEquals(before[0][i] + before[1][i] + before[2][i], total.getProcessor().getf(i), 1e-4,
				"sum over slices at index " + i);
		}
		ImageJHarness.assertSamePixels(total, ImageJHarness.replay(smallStack(), recording.line()).onlyCreated(), 0);
		ImageJHarness.assertSamePixels(total, ImageJHarness.replayInHeadlessJvm(smallStack(), recording.line()), 0);
	}

	@Test
	void recordingWithoutADisplayIsRefused() {
		Assumptions.assumeFalse(ImageJHarness.hasDisplay(), "this JVM has a display");
		assertThrows(IllegalStateException.class,
			() -> ImageJHarness.record(impulse(), "Gaussian Blur...", ImageJHarness.DialogInput.defaults()));
	}

	// -- (c) macros --

	@Test
	void macroSeesItsArgumentAndItsLogIsReturned() {
		final HeadlessMacro.Outcome outcome = ImageJHarness.runMacro(String.join("\n",
			"print(\"arg=\" + getArgument());",
			"newImage(\"plate\", \"32-bit black\", 8, 8, 1);",
			"setPixel(3, 4, 2);",
			"run(\"Add...\", \"value=5\");",
			"print(\"v=\" + getPixel(3, 4) + \" corner=\" + getPixel(0, 0));"), "well-B7");
		assertEquals(List.of("arg=well-B7", "v=7 corner=5"), outcome.log());
	}

	@Test
	void failingMacroIsAFailureWithMessageAndLine() {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
			() -> ImageJHarness.runMacro("x = 1;\ny = notDefinedAnywhere + x;\nprint(\"not reached\");", null));
		assertEquals("Macro failed: Undefined variable (line 2)", e.getMessage());
	}

	/** Parfocal's batch convention: exit("Error: ...") fails the run; a plain exit or another message does not. */
	@Test
	void exitWithAnErrorMessageIsAFailureAndOtherExitsAreNot() {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
			() -> ImageJHarness.runMacro("print(1);\nexit(\"Error: no stacks in /data/in\");\nprint(2);", null));
		assertTrue(e.getMessage().startsWith("Macro failed: no stacks in /data/in"), e.getMessage());
		assertEquals(List.of("1", "all done"), ImageJHarness.runMacro("print(1);\nexit(\"all done\");", null).log());
		assertEquals(List.of("1"), ImageJHarness.runMacro("print(1);\nexit;\nprint(2);", null).log());
	}

	@Test
	void unknownCommandInAMacroFailsAtItsLine() {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
			() -> ImageJHarness.runMacro("print(1);\nrun(\"Not A Command\");\nprint(2);", null));
		assertEquals("Macro failed: Unrecognized command: \"Not A Command\" (line 2)", e.getMessage());
	}

	@Test
	void javaExceptionInAMacroIsAFailureNotJustALogLine() {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
			() -> ImageJHarness.runMacro("a = 1;\ncall(\"java.lang.Integer.parseInt\", \"twelve\");\nprint(\"after\");", null));
		assertEquals("Macro failed: java.lang.NumberFormatException: For input string: \"twelve\" (line 2)",
			e.getMessage());
	}

	@Test
	void macroFileRuns(@TempDir final Path dir) throws IOException {
		final Path file = dir.resolve("count.ijm");
		Files.writeString(file, "n = 0;\nfor (i = 1; i <= 4; i++) n += i;\nprint(n);\n");
		assertEquals(List.of("10"), ImageJHarness.runMacroFile(file, null).log());
	}

	// -- the batch entry, in a child JVM --

	@Test
	void headlessEntryExitsNonZeroWithOneLineOnFailure(@TempDir final Path dir) throws Exception {
		final Path file = dir.resolve("broken.ijm");
		Files.writeString(file, "print(\"started \" + getArgument());\nrun(\"Gaussian Blur...\", \"sigma=1\");\n");
		final ImageJHarness.HeadlessRun run = ImageJHarness.runHeadlessJvm(file, "cells");
		assertEquals(1, run.exitCode(), run.stderr());
		assertEquals("started cells", run.stdout().strip());
		assertEquals("Macro failed: There are no images open (line 2)", run.stderr().strip());
	}

	@Test
	void headlessEntryExitsZeroAndPrintsTheLog(@TempDir final Path dir) throws Exception {
		final Path file = dir.resolve("ok.ijm");
		Files.writeString(file, "newImage(\"a\", \"8-bit ramp\", 64, 2, 1);\nprint(getArgument() + \":\" + getPixel(32, 0));\n");
		final ImageJHarness.HeadlessRun run = ImageJHarness.runHeadlessJvm(file, "ramp");
		assertEquals(0, run.exitCode(), run.stderr());
		assertEquals("ramp:128", run.stdout().strip());
	}
}
