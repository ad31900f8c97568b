package org.parfocal.ij1;

import ij.IJ;
import ij.ImagePlus;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.parfocal.command.ConvolveKeys;
import org.parfocal.command.KeyTable;
import ij.plugin.PlugIn;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;

import org.parfocal.conv.Acquisition;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Boundary;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;

/**
 * {@code Plugins > Parfocal > Convolve with PSF...}: simulates an acquisition, blurring an object image with a
 * PSF and optionally adding a background and Poisson noise. The output is a new 32-bit image with the
 * object's calibration; the inputs are not changed.
 * <p>
 * Macro keys (public API, keep them): {@code image psf boundary normalize background photons seed offset}.
 */
public class ConvolveWithPsf implements PlugIn {

	static final String COMMAND = "Convolve with PSF";
	private static final String PREFS = "parfocal.convolve.";

	/** Everything the dialog decides. */
	public record Options(String image, String psf, Acquisition.Options acquisition, boolean recentre) {

		/** Without re-centring the PSF. */
		public Options(final String image, final String psf, final Acquisition.Options acquisition) {
			this(image, psf, acquisition, false);
		}

		/** The options string a macro passes to {@code run("Convolve with PSF...", ...)}. */
		public String macroOptions() {
			final Acquisition.Options a = acquisition;
			return "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " boundary=" + a.boundary().key()
					+ (a.normalizePsf() ? " normalize" : "") + " background=" + MacroOptions.number(a.background()) + " photons="
					+ MacroOptions.number(a.photons()) + " seed=" + a.seed() + " offset=" + MacroOptions.number(a.offset()) + (recentre ? " recentre" : "");
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.CONVOLVE, () -> {
			final Options o = showDialog();
			if (o == null) throw Commands.cancelled();
			WindowManagerShow.show(run(o));
		});
	}

	/** The dialog, or null if cancelled. */
	Options showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open an object image and a PSF first");
		final GenericDialog gd = new GenericDialog(COMMAND);
		final KeyTable K = ConvolveKeys.MAIN; // labels and first-use defaults: the one description of the keys
		gd.addChoice(K.key("image").label(), titles, guessObject(titles));
		gd.addChoice(K.key("psf").label(), titles, guessPsf(titles));
		gd.addChoice(K.key("boundary").label(), Boundary.keys(), Commands.remembered(PREFS + "boundary", K.key("boundary").shownValue()));
		gd.addCheckbox(K.key("normalize").label(), Commands.remembered(PREFS + "normalize", K.key("normalize").shownChecked()));
		gd.addNumericField(K.key("background").label(), K.key("background").shownNumber(), 3, 8, "added after blurring");
		gd.addNumericField(K.key("photons").label(), K.key("photons").shownNumber(), 3, 8, "0 = no noise");
		gd.addNumericField(K.key("seed").label(), K.key("seed").shownNumber(), 0);
		gd.addNumericField(K.key("offset").label(), K.key("offset").shownNumber(), 3, 8, "camera offset, added without noise");
		gd.addCheckbox(K.key("recentre").label(), K.key("recentre").shownChecked());
		gd.addHelp(DialogHelp.convolve().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "PSF image title");
		final String boundary = Commands.checkChoice("boundary", gd.getNextChoice(), "boundary (zero, mirror or periodic)");
		final boolean normalize = gd.getNextBoolean();
		final double background = Commands.number(gd, "background");
		final double photons = Commands.number(gd, "photons");
		final double seed = Commands.number(gd, "seed");
		final double offset = Commands.number(gd, "offset");
		final boolean recentre = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "boundary", boundary);
			Prefs.set(PREFS + "normalize", normalize);
		}
		return new Options(image, psf, new Acquisition.Options(Boundary.parse(boundary), normalize, background, photons, (long) seed, offset), recentre);
	}

	/** Runs the command on open images; returns the new image (not shown). */
	public static ImagePlus run(final Options o) {
		final ImagePlus object = Commands.image(o.image(), "image");
		final ImagePlus psfImp = Commands.image(o.psf(), "PSF");
		final Hyperstack in = ImageBridge.toCore(object);
		final Volume given = ImageBridge.toVolume(psfImp, "The PSF");
		final String offCentre = Psfs.centroidWarning(given);
		final Volume psf = o.recentre() ? Psfs.recentred(given) : given;
		if (offCentre != null && !o.recentre()) IJ.log(COMMAND + ": Warning: " + offCentre);
		final long start = System.nanoTime();
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final Hyperstack out = Commands.withImageJThreads(() -> {
			final Acquisition acq = new Acquisition(psf, in.first().shape(), o.acquisition());
			final List<Volume> vols = new ArrayList<>();
			for (int i = 0; i < in.volumes().size(); i++) {
				monitor.progress(i, in.volumes().size(), "volume " + (i + 1) + " of " + in.volumes().size());
				vols.add(acq.record(in.volumes().get(i), monitor));
			}
			return new Hyperstack(in.channels(), in.frames(), vols);
		});
		final ImagePlus result = ImageBridge.toImagePlus(out, WindowManager.makeUniqueName(stripExtension(object.getTitle()) + "-blurred.tif"),
				object.getCalibration());
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", object)).input(ImageProvenance.input("psf", psfImp))
				.run("volumes", in.volumes().size());
		if (o.recentre()) prov.run("psf_centre_of_mass_offset", Arrays.toString(Psfs.centroidOffset(given)));
		else if (offCentre != null) prov.warning(offCentre);
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
