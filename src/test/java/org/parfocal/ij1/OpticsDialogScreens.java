package org.parfocal.ij1;

import java.awt.Choice;
import java.awt.Component;
import java.awt.EventQueue;
import java.awt.Point;
import java.awt.Robot;
import java.awt.event.InputEvent;
import java.awt.event.ItemEvent;
import java.awt.event.ItemListener;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.Executer;
import ij.IJ;
import ij.ImageJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;

/**
 * Screenshots of the optics dialog (PSF from Optics, and Deconvolve with the PSF from the optics) in a real ImageJ,
 * for people to look at; not a test. Run as {@link DeconvolveScreens} says (jar in {@code plugins.dir/plugins},
 * under a virtual display). Opens the dialogs from the menu as a user does, changes Model and Modality as a user
 * does (the choices' listeners hear of it), and takes the screen with ImageMagick's {@code import -window root}.
 */
public final class OpticsDialogScreens {

	private OpticsDialogScreens() {}

	public static void main(final String[] args) throws Exception {
		final Path out = Path.of(args.length > 0 ? args[0] : "screens");
		Files.createDirectories(out);
		final ImageJ ij = new ImageJ();
		ij.setLocation(0, 0);
		IJ.run("Make Sample Stacks");
		IJ.selectWindow("quillwort-widefield.tif");
		final ImagePlus wf = IJ.getImage();
		WindowManager.getCurrentWindow().setLocation(20, 560);
		final Robot robot = new Robot();
		robot.setAutoDelay(60);

		new Executer("PSF from Optics...", wf);
		GenericDialog gd = dialog("PSF from Optics", null);
		shot(out.resolve("1-psf-from-optics-as-opened.png"));
		pick(gd, 1, ChoiceWords.word("modality", "widefield"));
		pick(gd, 0, ChoiceWords.word("model", "gibson-lanni"));
		shot(out.resolve("2-psf-from-optics-gibson-lanni-widefield.png"));
		pick(gd, 1, ChoiceWords.word("modality", "confocal"));
		shot(out.resolve("3-psf-from-optics-gibson-lanni-confocal.png"));
		pick(gd, 0, ChoiceWords.word("model", "born-wolf"));
		pick(gd, 1, ChoiceWords.word("modality", "light-sheet"));
		shot(out.resolve("4-psf-from-optics-born-wolf-light-sheet.png"));
		click(robot, gd.getButtons()[1]); // Cancel
		Thread.sleep(800);

		IJ.selectWindow("quillwort-widefield.tif");
		new Executer("Deconvolve...", wf);
		final GenericDialog main = dialog("Deconvolve", null);
		pick(main, 1, ChoiceWords.word("psf", Deconvolve.FROM_OPTICS));
		shot(out.resolve("5-deconvolve-psf-from-optics-chosen.png"));
		click(robot, main.getButtons()[0]); // OK: the optics dialog follows
		gd = dialog("PSF from Optics", main);
		shot(out.resolve("6-deconvolve-optics-dialog.png"));
		pick(gd, 0, ChoiceWords.word("model", "gibson-lanni"));
		pick(gd, 1, ChoiceWords.word("modality", "two-photon"));
		shot(out.resolve("7-deconvolve-optics-gibson-lanni-two-photon.png"));
		click(robot, gd.getButtons()[1]); // Cancel: nothing is made
		Thread.sleep(800);
		System.out.println("images open after Cancel: " + WindowManager.getImageCount());
		System.exit(0);
	}

	/** Waits for a shown GenericDialog with this title other than {@code not}, places it and lets it paint. */
	private static GenericDialog dialog(final String title, final GenericDialog not) throws Exception {
		GenericDialog gd = null;
		for (int i = 0; i < 300; i++) {
			Thread.sleep(100);
			final GenericDialog g = GenericDialog.getInstance();
			if (g != null && g != not && g.isShowing() && title.equals(g.getTitle())) {
				gd = g;
				break;
			}
		}
		if (gd == null) throw new IllegalStateException("no dialog " + title);
		gd.setLocation(360, 0);
		Thread.sleep(1500);
		return gd;
	}

	/** Selects an item of the dialog's i-th choice as a user does: its listeners hear of it. */
	private static void pick(final GenericDialog gd, final int i, final String item) throws Exception {
		final Choice c = (Choice) gd.getChoices().get(i);
		EventQueue.invokeAndWait(() -> {
			c.select(item);
			for (final ItemListener l : c.getItemListeners()) l.itemStateChanged(new ItemEvent(c, ItemEvent.ITEM_STATE_CHANGED, item, ItemEvent.SELECTED));
		});
		Thread.sleep(700);
	}

	private static void click(final Robot robot, final Component c) {
		final Point p = c.getLocationOnScreen();
		robot.mouseMove(p.x + c.getWidth() / 2, p.y + c.getHeight() / 2);
		robot.mousePress(InputEvent.BUTTON1_DOWN_MASK);
		robot.mouseRelease(InputEvent.BUTTON1_DOWN_MASK);
	}

	private static void shot(final Path png) throws Exception {
		new ProcessBuilder("import", "-window", "root", png.toString()).inheritIO().start().waitFor();
		System.out.println("screenshot " + png);
	}
}
