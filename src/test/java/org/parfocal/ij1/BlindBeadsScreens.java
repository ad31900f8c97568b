package org.parfocal.ij1;

import java.awt.Choice;
import java.awt.Component;
import java.awt.Point;
import java.awt.Robot;
import java.awt.event.InputEvent;
import java.awt.event.KeyEvent;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.Executer;
import ij.IJ;
import ij.ImageJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;

/**
 * Screenshots of Blind Deconvolve's and PSF from Beads' dialogs in a real ImageJ (its own window, menus from the
 * plugin jar), for people to look at; not a test. Run as {@link DeconvolveScreens} is run (a virtual display, the
 * jar in {@code plugins.dir/plugins}); a screen of 1600 × 1400 holds Blind Deconvolve's dialog.
 * <p>
 * Makes the sample stacks from the menu command, a PSF from the optics of the widefield sample, then opens each
 * dialog as a menu click does and takes the whole screen with ImageMagick's {@code import -window root}: the
 * dialog, and its lists opened with the mouse (Blind: the starting PSF and the estimate; Beads: the image).
 * Both dialogs are cancelled, so nothing is made.
 */
public final class BlindBeadsScreens {

	private BlindBeadsScreens() {}

	public static void main(final String[] args) throws Exception {
		final Path out = Path.of(args.length > 0 ? args[0] : "screens");
		Files.createDirectories(out);
		final ImageJ ij = new ImageJ();
		ij.setLocation(0, 0);
		IJ.run("Make Sample Stacks");
		IJ.selectWindow("quillwort-widefield.tif");
		final ImagePlus wf = IJ.getImage();
		final ij.measure.Calibration c = wf.getCalibration();
		IJ.run(wf, "PSF from Optics...", "model=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 coverslip_index=1.522 "
				+ "coverslip_thickness=170 depth=0 immersion_index_design=1.333 coverslip_index_design=1.522 coverslip_thickness_design=170 "
				+ "working_distance=150 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=" + c.pixelWidth + " voxel_z=" + c.pixelDepth
				+ " size_xy=33 size_z=" + (wf.getNSlices() | 1));
		IJ.selectWindow("quillwort-widefield.tif");
		final Robot robot = new Robot();
		robot.setAutoDelay(60);

		GenericDialog gd = open("Blind Deconvolve...", wf);
		shot(out.resolve("1-blind-dialog.png"));
		System.out.println("Blind PSF items: " + items((Choice) gd.getChoices().get(1)) + "; selected " + ((Choice) gd.getChoices().get(1)).getSelectedItem());
		System.out.println("Blind estimate items: " + items((Choice) gd.getChoices().get(4)));
		listShot(robot, (Choice) gd.getChoices().get(1), out.resolve("2-blind-psf-list.png"));
		listShot(robot, (Choice) gd.getChoices().get(4), out.resolve("3-blind-estimate-list.png"));
		click(robot, gd.getButtons()[1]); // Cancel
		Thread.sleep(1000);

		IJ.selectWindow("quillwort-widefield.tif"); // not the bead recording: the list still puts it first
		gd = open("PSF from Beads...", WindowManager.getCurrentImage());
		shot(out.resolve("4-beads-dialog.png"));
		System.out.println("Beads image items: " + items((Choice) gd.getChoices().get(0)) + "; selected " + ((Choice) gd.getChoices().get(0)).getSelectedItem());
		listShot(robot, (Choice) gd.getChoices().get(0), out.resolve("5-beads-image-list.png"));
		listShot(robot, (Choice) gd.getChoices().get(1), out.resolve("6-beads-background-list.png"));
		click(robot, gd.getButtons()[1]);
		Thread.sleep(1000);
		System.exit(0);
	}

	/** Runs the command as a menu click does (its own thread) and waits for its dialog, placed beside ImageJ's window. */
	private static GenericDialog open(final String command, final ImagePlus imp) throws InterruptedException {
		new Executer(command, imp);
		GenericDialog gd = null;
		for (int i = 0; i < 300 && (gd == null || !gd.isShowing()); i++) {
			Thread.sleep(100);
			gd = GenericDialog.getInstance();
		}
		if (gd == null) throw new IllegalStateException("no dialog for " + command);
		gd.setLocation(620, 10);
		Thread.sleep(1500);
		return gd;
	}

	private static String items(final Choice c) {
		final StringBuilder s = new StringBuilder("[");
		for (int i = 0; i < c.getItemCount(); i++) s.append(i > 0 ? " | " : "").append(c.getItem(i));
		return s.append(']').toString();
	}

	/** Opens a list with the mouse, takes the screen, closes the list with Esc. */
	private static void listShot(final Robot robot, final Choice c, final Path png) throws Exception {
		click(robot, c);
		Thread.sleep(1200);
		shot(png);
		robot.keyPress(KeyEvent.VK_ESCAPE);
		robot.keyRelease(KeyEvent.VK_ESCAPE);
		Thread.sleep(500);
	}

	private static void click(final Robot robot, final Component c) {
		final Point p = c.getLocationOnScreen();
		robot.mouseMove(p.x + Math.min(8, c.getWidth() / 2), p.y + c.getHeight() / 2);
		robot.mousePress(InputEvent.BUTTON1_DOWN_MASK);
		robot.mouseRelease(InputEvent.BUTTON1_DOWN_MASK);
	}

	private static void shot(final Path png) throws Exception {
		new ProcessBuilder("import", "-window", "root", png.toString()).inheritIO().start().waitFor();
		System.out.println("screenshot " + png);
	}
}
