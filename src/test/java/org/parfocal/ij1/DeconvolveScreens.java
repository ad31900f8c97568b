package org.parfocal.ij1;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.Component;
import java.awt.Dialog;
import java.awt.Point;
import java.awt.Robot;
import java.awt.Window;
import java.awt.event.InputEvent;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.Executer;
import ij.IJ;
import ij.ImageJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;

/**
 * Screenshots of Deconvolve's dialog in a real ImageJ (its own window, menus from the plugin jar), for people
 * to look at; not a test. Run under a virtual display with the jar in {@code plugins.dir/plugins}:
 *
 * <pre>
 * xvfb-run -a -s "-screen 0 1280x1024x24" java -Dplugins.dir=DIR -cp ij.jar:Parfocal_.jar:DEPS:target/test-classes \
 *     org.parfocal.ij1.DeconvolveScreens OUT_FOLDER
 * </pre>
 *
 * Makes the sample stacks, a PSF from the optics of the widefield sample, opens Deconvolve from the menu as a user
 * does, and takes the whole screen with ImageMagick's {@code import -window root}: the dialog, the PSF list
 * opened, and the preview after ticking its box with the mouse.
 */
public final class DeconvolveScreens {

	private DeconvolveScreens() {}

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
		WindowManager.getCurrentWindow().setLocation(20, 560);
		final Robot robot = new Robot();
		robot.setAutoDelay(60);
		new Executer("Deconvolve...", wf); // as a menu click: its own thread, the dialog shown
		GenericDialog gd = null;
		for (int i = 0; i < 200 && (gd == null || !gd.isShowing()); i++) {
			Thread.sleep(100);
			gd = GenericDialog.getInstance();
		}
		if (gd == null) throw new IllegalStateException("no dialog");
		gd.setLocation(380, 60);
		Thread.sleep(1500);
		shot(out.resolve("1-deconvolve-dialog.png"));
		final Choice psf = (Choice) gd.getChoices().get(1);
		click(robot, psf);
		Thread.sleep(1200);
		shot(out.resolve("2-psf-list-open.png"));
		robot.keyPress(java.awt.event.KeyEvent.VK_ESCAPE); // closes the list only
		robot.keyRelease(java.awt.event.KeyEvent.VK_ESCAPE);
		Thread.sleep(500);
		if (!gd.isShowing()) throw new IllegalStateException("Esc on the open list closed the dialog");
		final Checkbox box = gd.getPreviewCheckbox();
		click(robot, box);
		Dialog preview = null;
		for (int i = 0; i < 600 && preview == null; i++) {
			Thread.sleep(100);
			for (final Window w : Window.getWindows())
				if (w instanceof Dialog d && d.isShowing() && d.getTitle().startsWith("Preview of")) preview = d;
		}
		Thread.sleep(1000);
		shot(out.resolve("3-preview.png"));
		System.out.println("preview window: " + (preview == null ? "none" : preview.getTitle() + " " + preview.getSize()));
		// Cancel: nothing is made
		click(robot, gd.getButtons()[1]);
		Thread.sleep(1000);
		System.out.println("dialog open after Cancel: " + gd.isShowing() + "; preview open: " + (preview != null && preview.isShowing()));
		System.exit(0);
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
