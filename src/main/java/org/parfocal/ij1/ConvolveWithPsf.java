package org.parfocal.ij1;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.plugin.PlugIn;

import java.util.Arrays;

import org.parfocal.command.ConvolveKeys;
import org.parfocal.command.ConvolveRequest;
import org.parfocal.command.ConvolveRunner;
import org.parfocal.core.Boundary;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;

/**
 * {@code Plugins > Parfocal > Convolve with PSF...}: simulates an acquisition, blurring an object image with a
 * PSF and optionally adding a background and Poisson noise. The output is a new 32-bit image with the
 * object's calibration; the inputs are not changed.
 * <p>
 * This class only translates: dialog or macro options → {@link ConvolveRequest} (the one reader of
 * {@link ConvolveKeys}), images ↔ volumes, and the result image with its record; {@link ConvolveRunner} runs it.
 * Macro keys (public API, keep them): {@code image psf boundary normalize background photons seed offset recentre}.
 */
public class ConvolveWithPsf implements PlugIn {

	static final String COMMAND = "Convolve with PSF";
	private static final String PREFS = "parfocal.convolve.";

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.CONVOLVE, () -> {
			final ConvolveRequest r = showDialog();
			if (r == null) throw Commands.cancelled();
			WindowManagerShow.show(run(r));
		});
	}

	/** The dialog, or null if cancelled. */
	ConvolveRequest showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open an object image and a PSF first");
		final GenericDialog gd = new GenericDialog(COMMAND);
		// labels and first-use defaults from the one description of the keys (ConvolveKeys); boundary and normalize remembered outside macros
		final KeyFields f = new KeyFields(gd, ConvolveKeys.MAIN, PREFS);
		f.choice("image", titles, guessObject(titles)).choice("psf", titles, guessPsf(titles)).choice("boundary", Boundary.keys(), null);
		f.rememberedCheckbox("normalize");
		f.number("background", 3, 8, "added after blurring").number("photons", 3, 8, "0 = no noise").number("seed", 0, 6, null);
		f.number("offset", 3, 8, "camera offset, added without noise").checkbox("recentre");
		gd.addHelp(DialogHelp.convolve().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		f.readChoice("image", "image title");
		f.readChoice("psf", "PSF image title");
		f.readChoice("boundary", "boundary (zero, mirror or periodic)");
		f.readCheckbox("normalize");
		for (final String n : new String[] { "background", "photons", "seed", "offset" }) f.readNumber(n);
		f.readCheckbox("recentre");
		final ConvolveRequest r = ConvolveRequest.from(f.values()); // the one reader of the keys, as for a record's replay
		f.remember("boundary", "normalize");
		return r;
	}

	/** Runs the command on open images; returns the new image (not shown). */
	public static ImagePlus run(final ConvolveRequest r) {
		final ImagePlus object = Commands.image(r.image(), "image");
		final ImagePlus psfImp = Commands.image(r.psf(), "PSF");
		final Hyperstack in = ImageBridge.toCore(object);
		final Volume given = ImageBridge.toVolume(psfImp, "The PSF");
		final long start = System.nanoTime();
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final ConvolveRunner.Outcome out = Commands.withImageJThreads(() -> ConvolveRunner.run(r, in, given, monitor));
		if (out.offCentre() != null && !r.recentre()) IJ.log(COMMAND + ": Warning: " + out.offCentre());
		final ImagePlus result = ImageBridge.toImagePlus(out.image(), WindowManager.makeUniqueName(stripExtension(object.getTitle()) + "-blurred.tif"),
				object.getCalibration());
		final var prov = ImageProvenance.start(COMMAND, r.macroOptions()).input(ImageProvenance.input("image", object)).input(ImageProvenance.input("psf", psfImp))
				.run("volumes", in.volumes().size());
		if (r.recentre()) prov.run("psf_centre_of_mass_offset", Arrays.toString(out.centreOffset()));
		else if (out.offCentre() != null) prov.warning(out.offCentre());
		ImageProvenance.attach(result, prov, start);
		monitor.done("done");
		return result;
	}

	/** The current image unless it looks like a PSF; then the first image that does not. */
	private static String guessObject(final String[] titles) {
		final String current = Commands.currentTitle(titles);
		if (!current.toLowerCase().contains("psf")) return current;
		for (final String t : titles)
			if (!t.toLowerCase().contains("psf")) return t;
		return current;
	}

	private static String guessPsf(final String[] titles) {
		for (final String t : titles)
			if (t.toLowerCase().contains("psf")) return t;
		return titles[titles.length - 1];
	}

	static String stripExtension(final String title) {
		final int dot = title.lastIndexOf('.');
		return dot > 0 && title.length() - dot <= 5 ? title.substring(0, dot) : title;
	}

	/** Shows a result unless nothing was made. */
	static final class WindowManagerShow {
		static void show(final ImagePlus imp) {
			if (imp != null) imp.show();
			IJ.showStatus(COMMAND + ": created " + (imp == null ? "nothing" : imp.getTitle()));
		}
	}
}
