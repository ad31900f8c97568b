package org.parfocal.ij1;

import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;

import java.util.Map;

import org.parfocal.command.DeconvolveKeys;
import org.parfocal.command.DeconvolveRequest;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DefaultRun;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.ij1.Deconvolve.Options;
import org.parfocal.ij1.Deconvolve.Watch;

/**
 * Deconvolve's dialogs: the main one (image, PSF, method and its numbers, levels, output; with its choice words,
 * PSF list, hints and preview), then PSF from Optics' dialog for {@code psf=from_optics} and the watch-mode
 * dialog, read into {@link Options}. Remembered values ({@code Prefs}) are used and stored only outside macros.
 */
final class DeconvolveDialog {

	private static final String COMMAND = Deconvolve.COMMAND, FROM_OPTICS = Deconvolve.FROM_OPTICS;
	private static final String PREFS = "parfocal.deconvolve.";

	private DeconvolveDialog() {}

	/** The main dialog (and the optics and watch dialogs it leads to), or null if cancelled. */
	static Options show() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the stack to deconvolve first");
		final String imageDefault = Commands.currentNonPsfTitle(titles);
		final String[] psfChoices = PsfChoices.items(WindowManager.getImage(imageDefault)); // plausible PSFs, newest Parfocal PSF first
		Commands.acceptOldValue("edges", EdgeMode.OLD_NON_CIRCULANT_KEY, EdgeMode.NON_CIRCULANT.key());
		final GenericDialog gd = new GenericDialog(COMMAND);
		// labels and defaults from the one description of the keys (DeconvolveKeys); the screen adds items, digits and hints
		final KeyFields f = new KeyFields(gd, DeconvolveKeys.MAIN, PREFS);
		f.choice("image", titles, imageDefault).choice("psf", psfChoices, psfChoices[0]);
		f.choice("method", DeconvolutionMethod.keys(), null);
		f.number("iterations", 0, 6, "at most, with relative-change or held-out stop");
		f.number("regularization", 4, 8, "TV weight (RL-TV) or Wiener weight");
		// the default run (DefaultRun) when stop is left out: a macro line that gives iterations without stop runs them all
		final boolean iterationsGiven = Commands.isMacro() && ij.Macro.getValue(ij.Macro.getOptions(), "iterations", null) != null;
		f.choice("stop", new String[] { Stopping.FIXED.key(), Stopping.RELATIVE_CHANGE.key(), Stopping.HELD_OUT.key() },
				Commands.remembered(PREFS + "stop", DefaultRun.stop(iterationsGiven).key()));
		f.number("threshold", 5, 8, "relative change that stops");
		f.choice("edges", EdgeMode.keys(), null).text("offset", 8).text("background", 8).choice("output", OutputDepth.keys(), null);
		f.checkbox("plot").checkbox("watch").checkbox("recentre");
		gd.addHelp(DialogHelp.deconvolve().html());
		ChoiceWords.show(gd, "image", "psf", "method", "stop", "edges", "output");
		PsfChoices.follow(gd);
		DeconvolveHints.follow(gd);
		final DeconvolvePreview preview = DeconvolvePreview.attach(gd);
		try {
			gd.showDialog();
		} finally {
			if (preview != null) preview.close();
		}
		if (gd.wasCanceled()) return null;
		final String image = f.readChoice("image", "image title");
		final String psf = f.readChoice("psf", "PSF (an open image or " + FROM_OPTICS + ")");
		f.readChoice("method", "method");
		f.readNumber("iterations");
		f.readNumber("regularization");
		f.readChoice("stop", "stopping rule (fixed, relative-change or held-out)");
		f.readNumber("threshold");
		f.readChoice("edges", "edge mode");
		f.readText("offset");
		f.readText("background");
		final boolean plot = f.readCheckbox("plot"), watch = f.readCheckbox("watch"), recentre = f.readCheckbox("recentre");
		final OutputDepth output = OutputDepth.parse(f.readChoice("output", "output depth (32-bit or 16-bit)"));
		if (output == OutputDepth.FLOAT) ChoiceWords.forgetRecorded("output"); // the default is left out, as in lines recorded before the key
		final Map<String, String> values = f.values();
		final DeconvolutionOptions d = DeconvolveRequest.deconvolution(DeconvolveKeys.MAIN.read(values)); // the reader of the command line too
		org.parfocal.command.OpticsRequest optics = null;
		if (FROM_OPTICS.equals(psf)) {
			final org.parfocal.command.PsfFromOpticsRequest o = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (o == null) return null;
			optics = o.optics();
		}
		Watch w = null;
		if (watch) {
			w = showWatch();
			if (w == null) return null;
		}
		f.remember("method", "iterations", "regularization", "stop", "threshold", "edges", "offset", "background", "output");
		return new Options(image, psf, optics, d, plot, w, recentre, output);
	}

	/** The watch-mode dialog; in a macro, values not given take the defaults (never remembered ones). */
	static Watch showWatch() {
		final GenericDialog gd = new GenericDialog(COMMAND + ": watch quality");
		final KeyFields f = new KeyFields(gd, DeconvolveKeys.WATCH, PREFS);
		f.number("every", 0, 6, "iterations").text("reference_folder", 30).text("reference_images", 20);
		f.number("photons", 4, 8, "per intensity unit (1 = photon counts)").number("read_noise", 3, 8, "sigma, intensity units");
		f.checkbox("stop_at_suggestion").checkbox("ignore_calibration").rememberedCheckbox("estimate_noise").rememberedCheckbox("match_resolution");
		gd.addHelp(DialogHelp.watch().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		f.readNumber("every");
		f.readText("reference_folder");
		f.readText("reference_images");
		f.readNumber("photons");
		f.readNumber("read_noise");
		for (final String flag : new String[] { "stop_at_suggestion", "ignore_calibration", "estimate_noise", "match_resolution" }) f.readCheckbox(flag);
		final Watch w = Watch.from(DeconvolveKeys.WATCH.read(f.values()));
		f.remember("every", "reference_folder", "reference_images", "photons", "read_noise", "estimate_noise", "match_resolution");
		return w;
	}

	/**
	 * In watch mode, references whose calibration differs from the image's: the user is asked whether to compare
	 * voxel for voxel (then {@code ignore_calibration} is set) or to cancel.
	 */
	static Options checkCalibration(final Options o) {
		if (o.watch() == null || o.watch().ignoreCalibration()) return o;
		final ij.ImagePlus imp = Commands.image(o.image(), "image");
		final String problem = CompareWithReferences.calibrationProblem(imp,
				CompareWithReferences.references(o.watch().referenceFolder(), o.watch().openReferences(), java.util.List.of(o.image(), o.psf())), null);
		if (problem == null) return o;
		if (!CompareWithReferences.askIgnoreCalibration(COMMAND, problem)) throw Commands.cancelled();
		return new Options(o.image(), o.psf(), o.optics(), o.deconvolution(), o.plot(), o.watch().withIgnoreCalibration(), o.recentre(), o.output());
	}
}
