package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.Dialog;
import java.awt.TextField;
import java.awt.Window;
import java.awt.event.ItemEvent;
import java.awt.event.ItemListener;
import java.util.ArrayList;
import java.util.List;

import ij.ImagePlus;
import ij.gui.NewImage;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.testing.ImageJHarness;

/**
 * Deconvolve's real dialog under a display: the filtered PSF list with the newest Parfocal PSF preselected,
 * choices in words whose recorded line holds the released macro values and replays headless bit for bit, hints
 * that follow Stop and Method, and the preview (shown, then gone, never recorded). Outside reference: the
 * macro Recorder of ImageJ 1.54 (what a user's recorded line is) and a headless replay in a fresh JVM.
 */
@Tag("display")
class DeconvolveDialogTest {

	private static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static ImagePlus opticsPsf() {
		return ImageJHarness.run(null, "PSF from Optics...", PsfFromOpticsCommandTest.OPTIONS.replace("size_xy=33 size_z=21", "size_xy=9 size_z=5"))
				.onlyCreated();
	}

	private static List<String> items(final Choice c) {
		final List<String> l = new ArrayList<>();
		for (int i = 0; i < c.getItemCount(); i++) l.add(c.getItem(i));
		return l;
	}

	/** Selects an item as a user does: the choice's listeners hear of it. */
	private static void pick(final Choice c, final String item) {
		c.select(item);
		assertEquals(item, c.getSelectedItem(), "no such item: " + item + " in " + items(c));
		for (final ItemListener l : c.getItemListeners()) l.itemStateChanged(new ItemEvent(c, ItemEvent.ITEM_STATE_CHANGED, item, ItemEvent.SELECTED));
	}

	@Test
	void wordsAreShownTheReleasedValuesRecordedAndTheLineReplaysHeadless() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus measured = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(VOXEL), "measured-psf.tif");
		final ImagePlus rgb = NewImage.createRGBImage("plot.png", 9, 9, 1, NewImage.FILL_WHITE);
		ImageJHarness.open(img, measured, rgb);
		final ImagePlus psf = opticsPsf();
		ImageJHarness.open(psf);
		final List<String> shownPsfs = new ArrayList<>();
		final String[] selectedPsf = new String[1], iterationHint = new String[2];
		final ImageJHarness.Recording rec = ImageJHarness.record(img, "Deconvolve...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			shownPsfs.addAll(items(ch.get(1)));
			selectedPsf[0] = ch.get(1).getSelectedItem();
			pick(ch.get(0), "cell.tif");
			pick(ch.get(2), ChoiceWords.word("method", "accelerated-richardson-lucy"));
			pick(ch.get(3), ChoiceWords.word("stop", "fixed"));
			final TextField iterations = (TextField) dialog.getNumericFields().get(0);
			iterationHint[0] = DeconvolveHints.unitLabel(iterations).getText().trim();
			pick(ch.get(3), ChoiceWords.word("stop", "relative-change"));
			iterationHint[1] = DeconvolveHints.unitLabel(iterations).getText().trim();
			pick(ch.get(4), ChoiceWords.word("edges", "periodic"));
			pick(ch.get(5), ChoiceWords.word("output", "16-bit"));
			iterations.setText("8");
			((TextField) dialog.getStringFields().get(0)).setText("100");
		});
		assertEquals(List.of(psf.getTitle(), "measured-psf.tif", ChoiceWords.word("psf", Deconvolve.FROM_OPTICS)), shownPsfs,
				"the PSF list: Parfocal PSF, small stack, the optics; not the image, not the RGB plot");
		assertEquals(psf.getTitle(), selectedPsf[0], "the newest Parfocal PSF is preselected");
		assertEquals("all of them run", iterationHint[0]);
		assertEquals("at most; stops earlier below the threshold", iterationHint[1]);
		final String opts = ImageJHarness.parseRunLine(rec.line())[1];
		final var given = MacroOptions.parse(opts);
		assertEquals("accelerated-richardson-lucy", given.get("method"), rec.line());
		assertEquals("relative-change", given.get("stop"), rec.line());
		assertEquals("periodic", given.get("edges"), rec.line());
		assertEquals("16-bit", given.get("output"), rec.line());
		assertEquals(psf.getTitle(), given.get("psf"), rec.line());
		final ImagePlus out = rec.result().created().stream().filter(i -> i.getTitle().equals("cell-deconvolved.tif")).findFirst().orElseThrow();
		assertEquals(ImagePlus.GRAY16, out.getType());
		assertEquals(List.copyOf(given.keySet()), List.copyOf(ImageProvenance.of(out).orElseThrow().options().keySet()), "the record holds the recorded keys");
		ImageJHarness.assertSamePixels(out, ImageJHarness.replayInHeadlessJvm(rec.line(), img, psf), 0);
	}

	@Test
	void thePreviewShowsAFewIterationsInATemporaryWindowAndIsNeverRecorded() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		img.setSlice(5);
		final ImagePlus psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		ImageJHarness.open(img, psf);
		final Dialog[] seen = new Dialog[1];
		final ImageJHarness.Recording rec = ImageJHarness.record(img, "Deconvolve...", dialog -> {
			pick((Choice) dialog.getChoices().get(1), "psf.tif");
			((TextField) dialog.getStringFields().get(0)).setText("100");
			final Checkbox box = dialog.getPreviewCheckbox();
			assertNotNull(box, "ImageJ's preview checkbox");
			box.setState(true);
			for (final ItemListener l : box.getItemListeners()) l.itemStateChanged(new ItemEvent(box, ItemEvent.ITEM_STATE_CHANGED, box, ItemEvent.SELECTED));
		}, dialog -> {
			final long end = System.nanoTime() + 120_000_000_000L;
			while (System.nanoTime() < end && seen[0] == null) {
				for (final Window w : Window.getWindows())
					if (w instanceof Dialog d && d.isVisible() && d.getTitle().startsWith("Preview of cell.tif")) seen[0] = d;
				try {
					Thread.sleep(50);
				} catch (final InterruptedException e) {
					Thread.currentThread().interrupt();
					return;
				}
			}
			final String keep = System.getProperty("parfocal.keepScreenshots");
			if (keep != null && seen[0] != null) Screens.grab(java.nio.file.Path.of(keep, "deconvolve-preview-test.png"));
		});
		assertNotNull(seen[0], "the preview window appeared");
		assertFalse(seen[0].isDisplayable(), "the preview window is gone once the dialog closed");
		assertTrue(ij.WindowManager.getImage(seen[0].getTitle()) == null, "the preview is no image window");
		final String all = rec.text().strip();
		assertEquals(rec.line(), all, "the Recorder wrote only the command's line");
		assertFalse(all.contains("preview"), all);
	}

	@Test
	void beadBoxHintsSayZeroMeansFromTheOpticsOnlyWhenOpticsAreChosen() {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("beads.tif");
		ImageJHarness.open(img);
		final String[] hints = new String[2];
		final String text = ImageJHarness.recorderTextOf(img, "PSF from Beads...", dialog -> {
			final Choice optics = (Choice) dialog.getChoices().get(3);
			final TextField box = (TextField) dialog.getNumericFields().get(0);
			pick(optics, PsfFromBeads.NONE);
			hints[0] = DeconvolveHints.unitLabel(box).getText().trim();
			pick(optics, "born-wolf");
			hints[1] = DeconvolveHints.unitLabel(box).getText().trim();
		}, true, null);
		assertEquals("µm (no optics chosen below: enter it)", hints[0]);
		assertEquals("µm; 0 = from the optics", hints[1]);
		assertFalse(text.contains("PSF from Beads"), "a cancelled dialog records nothing: " + text);
	}

	/** Screenshots of the whole virtual screen with ImageMagick's import (Debian imagemagick), when asked for. */
	static final class Screens {
		static void grab(final java.nio.file.Path png) {
			try {
				java.nio.file.Files.createDirectories(png.getParent());
				new ProcessBuilder("import", "-window", "root", png.toString()).inheritIO().start().waitFor();
			} catch (final java.io.IOException e) {
				System.out.println("no screenshot: " + e.getMessage());
			} catch (final InterruptedException e) {
				Thread.currentThread().interrupt();
			}
		}
	}
}
