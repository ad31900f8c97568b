import ij.IJ;
import ij.ImageJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.io.FileSaver;

import java.awt.Button;
import java.awt.Component;
import java.awt.Container;
import java.awt.Dialog;
import java.awt.EventQueue;
import java.awt.Frame;
import java.awt.Rectangle;
import java.awt.Robot;
import java.awt.Toolkit;
import java.awt.Window;
import java.awt.event.ActionEvent;
import java.awt.event.ActionListener;
import java.awt.image.BufferedImage;
import java.io.File;
import java.nio.file.Files;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.List;
import java.util.Set;

import javax.imageio.ImageIO;

/**
 * Screenshots of every Parfocal dialog (with its Help page) and of the windows its commands open, taken in a real
 * ImageJ 1.x under a (virtual) display, for a person to look at. Not a test: it asserts nothing; it fails only
 * when a dialog or window does not appear. Run by {@code tools/screens/take-screens OUT}, which starts Xvfb,
 * builds the classpath and installs the plugin jar into a throw-away ImageJ folder.
 * <p>
 * Dialogs are opened on a second thread (they are modal to the thread that asks), captured with
 * {@link Robot}, and closed with their own Cancel button, so nothing they would run is run.
 */
public class Screens {

	static File out;
	static Robot robot;
	static int n;
	static final List<String> problems = new ArrayList<>();

	public static void main(final String[] args) throws Exception {
		out = new File(args[0]);
		out.mkdirs();
		final String part = args.length > 1 ? args[1] : "all"; // dialogs, outputs or all
		robot = new Robot();
		// a modal message (an error ImageJ shows) would stop this run for good: give up after 15 minutes
		final Thread watchdog = new Thread(() -> {
			pause(15 * 60 * 1000);
			System.out.println("screens: gave up after 15 minutes (a dialog left open?)");
			try {
				screen("gave-up");
			} catch (final Exception e) {
				// nothing more to save
			}
			System.exit(2);
		}, "screens-watchdog");
		watchdog.setDaemon(true);
		watchdog.start();
		new ImageJ();
		pause(2500);
		screen("imagej-bar");

		// the sample stacks (no dialog), tiled
		IJ.run("Make Sample Stacks");
		pause(1500);
		IJ.run("Tile");
		pause(1500);
		screen("sample-stacks-tiled");

		// every dialog with its Help page, cancelled
		if (!"outputs".equals(part)) dialogs();
		if (!"dialogs".equals(part)) outputs();
		IJ.log("Screens: " + n + " screenshots in " + out + (problems.isEmpty() ? "" : "; problems: " + problems));
		System.out.println("screens: " + n + " in " + out + (problems.isEmpty() ? "" : "\nproblems: " + String.join("\n", problems)));
		Files.writeString(new File(out, "problems.txt").toPath(), String.join("\n", problems) + "\n");
		System.exit(0);
	}

	static void dialogs() throws Exception {
		dialog("convolve", "Convolve with PSF...");
		dialog("psf-from-optics", "PSF from Optics...");
		IJ.selectWindow("quillwort-beads.tif");
		dialog("psf-from-beads", "PSF from Beads...");
		IJ.selectWindow("quillwort-widefield.tif");
		dialog("deconvolve", "Deconvolve...");
		dialog("blind-deconvolve", "Blind Deconvolve...");
		dialog("compare", "Compare with Sharp References...");
		dialog("options", "Parfocal Options...");
	}

	static void outputs() throws Exception {

		// outputs: a default run, a watched run, a blind run with its PSF history, a comparison, a report
		closeAllBut();
		IJ.run("Make Sample Stacks");
		pause(1000);
		final String psf = "quillwort-psf.tif";
		output("deconvolve-default", "Deconvolve...", "image=quillwort-widefield.tif psf=" + psf + " offset=100");
		final ImagePlus result = WindowManager.getCurrentImage();
		result.setTitle("quillwort-deconvolved.tif");
		final File refs = Files.createTempDirectory("parfocal-refs").toFile();
		new FileSaver(WindowManager.getImage("quillwort-truth.tif")).saveAsTiffStack(new File(refs, "sharp-1.tif").getPath());
		output("deconvolve-watch", "Deconvolve...", "image=quillwort-widefield.tif psf=" + psf
				+ " method=richardson-lucy-tv iterations=30 regularization=0.002 stop=fixed threshold=0.001 edges=non-circulant"
				+ " offset=100 background=dark watch every=5 reference_folder=[" + refs + "] reference_images=[] photons=1 read_noise=0 estimate_noise");
		output("blind", "Blind Deconvolve...", "image=quillwort-widefield.tif psf=gaussian fwhm_xy=0.3 fwhm_z=0.8 iterations=6 snapshot_interval=2 offset=100");
		output("compare-output", "Compare with Sharp References...", "result=quillwort-deconvolved.tif reference_folder=[" + refs
				+ "] input=quillwort-widefield.tif psf=" + psf + " offset=100 background=3 patches=2048 bootstrap=20 seed=3");
		IJ.selectWindow("quillwort-deconvolved.tif");
		final File report = new File(out, "report.html");
		final File macro = new File(out, "rebuild.ijm");
		IJ.run("Write Report...", "file=[" + report + "]");
		IJ.run("Export Provenance as Macro...", "macro=[" + macro + "]");
		pause(1000);
		screen("after-report-and-macro");
	}

	/** Opens a command's dialog on another thread, captures it and its Help page, then presses its Cancel. */
	static void dialog(final String name, final String command) throws Exception {
		final Set<Window> before = visibleWindows();
		final Thread t = new Thread(() -> IJ.run(command), "screens-" + name);
		t.start();
		final Window d = waitForNew(before, Dialog.class, 30000);
		if (d == null) {
			problems.add(command + ": no dialog appeared");
			t.interrupt();
			return;
		}
		pause(1200);
		window(name + "-dialog", d);
		final Button help = button(d, "Help");
		if (help == null) problems.add(command + ": no Help button");
		else {
			final Set<Window> withDialog = visibleWindows();
			press(help);
			final Window h = waitForNew(withDialog, Window.class, 10000);
			if (h == null) problems.add(command + ": Help opened no window");
			else {
				pause(1500);
				window(name + "-help", h);
				EventQueue.invokeLater(h::dispose);
				pause(500);
			}
		}
		final Button cancel = button(d, "Cancel");
		if (cancel == null) {
			problems.add(command + ": no Cancel button");
			d.dispose();
		} else press(cancel);
		t.join(30000);
		// some commands ask a second question after the first dialog (cancel those too)
		final Window second = waitForNew(before, Dialog.class, 1500);
		if (second != null) {
			window(name + "-second", second);
			final Button c2 = button(second, "Cancel");
			if (c2 != null) press(c2);
			else second.dispose();
		}
	}

	/** Runs a command with options (no dialog) and captures every window it opened, one by one. */
	static void output(final String name, final String command, final String options) throws Exception {
		final Set<Window> before = visibleWindows();
		IJ.run(command, options);
		pause(2000);
		int i = 0;
		for (final Window w : visibleWindows())
			if (!before.contains(w)) window(name + "-" + (++i), w);
		if (i == 0) problems.add(command + " (" + name + "): opened no window");
		else screen(name + "-screen");
	}

	static void closeAllBut() {
		IJ.run("Close All");
		for (final Frame f : Frame.getFrames())
			if (f.isVisible() && !(f instanceof ImageJ) && !"Log".equals(f.getTitle())) f.dispose();
		pause(800);
	}

	static Set<Window> visibleWindows() {
		final Set<Window> s = new HashSet<>();
		for (final Window w : Window.getWindows())
			if (w.isShowing()) s.add(w);
		return s;
	}

	static Window waitForNew(final Set<Window> before, final Class<?> kind, final long ms) {
		final long end = System.currentTimeMillis() + ms;
		while (System.currentTimeMillis() < end) {
			for (final Window w : Window.getWindows())
				if (w.isShowing() && !before.contains(w) && kind.isInstance(w)) return w;
			pause(100);
		}
		return null;
	}

	static Button button(final Container c, final String label) {
		for (final Component k : c.getComponents()) {
			if (k instanceof Button b && label.equals(b.getLabel())) return b;
			if (k instanceof Container cc) {
				final Button b = button(cc, label);
				if (b != null) return b;
			}
		}
		return null;
	}

	/** Presses a button on the event thread without waiting: what it opens may be modal. */
	static void press(final Button b) throws Exception {
		EventQueue.invokeLater(() -> {
			for (final ActionListener l : b.getActionListeners())
				l.actionPerformed(new ActionEvent(b, ActionEvent.ACTION_PERFORMED, b.getLabel()));
		});
		pause(500);
	}

	static void window(final String name, final Window w) throws Exception {
		EventQueue.invokeLater(w::toFront); // not invokeAndWait: the event thread may be inside a modal dialog's loop
		pause(700);
		// under Xvfb (no window manager) a dialog can report (0, 0) while it is drawn where ImageJ centred it
		// (seen for the Blind Deconvolve, bead and options dialogs, not every run): wait a little for its place,
		// else take the whole screen, which shows it wherever it is
		for (int i = 0; i < 10 && w.getX() == 0 && w.getY() == 0; i++) pause(100);
		final Rectangle screen = new Rectangle(Toolkit.getDefaultToolkit().getScreenSize());
		final Rectangle r = w.getX() == 0 && w.getY() == 0 && w instanceof Dialog ? screen : w.getBounds().intersection(screen);
		save(name, robot.createScreenCapture(r));
	}

	static void screen(final String name) throws Exception {
		save(name, robot.createScreenCapture(new Rectangle(Toolkit.getDefaultToolkit().getScreenSize())));
	}

	static void save(final String name, final BufferedImage img) throws Exception {
		ImageIO.write(img, "png", new File(out, String.format("%02d-%s.png", ++n, name)));
	}

	static void pause(final long ms) {
		try {
			Thread.sleep(ms);
		} catch (final InterruptedException e) {
			Thread.currentThread().interrupt();
		}
	}
}
