package org.parfocal.ij1;

import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;

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
		gd.addChoice("Image:", titles, imageDefault);
		gd.addChoice("PSF:", psfChoices, psfChoices[0]);
		// the default run (DefaultRun) when method, iterations or stop are left out; a macro line that gives iterations without stop runs them all
		final boolean iterationsGiven = Commands.isMacro() && ij.Macro.getValue(ij.Macro.getOptions(), "iterations", null) != null;
		gd.addChoice("Method:", DeconvolutionMethod.keys(), Commands.remembered(PREFS + "method", DefaultRun.METHOD.key()));
		gd.addNumericField("Iterations:", Commands.remembered(PREFS + "iterations", DefaultRun.CAP), 0, 6, "at most, with relative-change or held-out stop");
		gd.addNumericField("Regularization:", Commands.remembered(PREFS + "regularization", 0.002), 4, 8, "TV weight (RL-TV) or Wiener weight");
		gd.addChoice("Stop:", new String[] { Stopping.FIXED.key(), Stopping.RELATIVE_CHANGE.key(), Stopping.HELD_OUT.key() },
				Commands.remembered(PREFS + "stop", DefaultRun.stop(iterationsGiven).key()));
		gd.addNumericField("Threshold:", Commands.remembered(PREFS + "threshold", 0.001), 5, 8, "relative change that stops");
		gd.addChoice("Edges:", EdgeMode.keys(), Commands.remembered(PREFS + "edges", EdgeMode.NON_CIRCULANT.key()));
		gd.addStringField("Offset:", Commands.remembered(PREFS + "offset", "auto"), 8);
		gd.addStringField("Background:", Commands.remembered(PREFS + "background", DefaultRun.BACKGROUND), 8);
		gd.addChoice("Output:", OutputDepth.keys(), Commands.remembered(PREFS + "output", OutputDepth.FLOAT.key()));
		gd.addCheckbox("Plot convergence", true);
		gd.addCheckbox("Watch quality every few iterations (next dialog)", false);
		gd.addCheckbox("Recentre the PSF (shift its centre of mass to the centre voxel)", false);
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
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "PSF (an open image or " + FROM_OPTICS + ")");
		final DeconvolutionMethod method = DeconvolutionMethod.parse(Commands.checkChoice("method", gd.getNextChoice(), "method"));
		final double iterations = Commands.number(gd, "iterations"), regularization = Commands.number(gd, "regularization");
		final Stopping stop = Stopping.parse(Commands.checkChoice("stop", gd.getNextChoice(), "stopping rule (fixed, relative-change or held-out)"));
		final double threshold = Commands.number(gd, "threshold");
		final EdgeMode edges = EdgeMode.parse(Commands.checkChoice("edges", gd.getNextChoice(), "edge mode"));
		final String offset = gd.getNextString().trim(), background = gd.getNextString().trim();
		final boolean plot = gd.getNextBoolean();
		final boolean watch = gd.getNextBoolean();
		final boolean recentre = gd.getNextBoolean();
		final OutputDepth output = OutputDepth.parse(Commands.checkChoice("output", gd.getNextChoice(), "output depth (32-bit or 16-bit)"));
		if (output == OutputDepth.FLOAT) ChoiceWords.forgetRecorded("output"); // the default is left out, as in lines recorded before the key
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (iterations != Math.rint(iterations)) throw new IllegalArgumentException("Iterations must be a whole number, got " + iterations);
		final DeconvolutionOptions d = new DeconvolutionOptions(method, (int) iterations, regularization, stop,
				stop == Stopping.RELATIVE_CHANGE ? threshold : threshold > 0 && threshold < 1 ? threshold : 0.001, edges, Level.parse("offset", offset, false),
				Level.parse("background", background, true));
		PsfFromOptics.Options optics = null;
		if (FROM_OPTICS.equals(psf)) {
			optics = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (optics == null) return null;
		}
		Watch w = null;
		if (watch) {
			w = showWatch();
			if (w == null) return null;
		}
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "method", method.key());
			Prefs.set(PREFS + "iterations", (int) iterations);
			Prefs.set(PREFS + "regularization", regularization);
			Prefs.set(PREFS + "stop", stop.key());
			Prefs.set(PREFS + "threshold", threshold);
			Prefs.set(PREFS + "edges", edges.key());
			Prefs.set(PREFS + "offset", offset);
			Prefs.set(PREFS + "background", background);
			Prefs.set(PREFS + "output", output.key());
		}
		return new Options(image, psf, optics, d, plot, w, recentre, output);
	}

	/** The watch-mode dialog; in a macro, values not given take the defaults (never remembered ones). */
	static Watch showWatch() {
		final boolean macro = Commands.isMacro();
		final GenericDialog gd = new GenericDialog(COMMAND + ": watch quality");
		gd.addNumericField("Every:", macro ? 5 : Commands.remembered(PREFS + "every", 5), 0, 6, "iterations");
		gd.addStringField("Reference_folder:", macro ? "" : Commands.remembered(PREFS + "references", ""), 30);
		gd.addStringField("Reference_images:", macro ? "" : Commands.remembered(PREFS + "open_references", ""), 20);
		gd.addNumericField("Photons:", macro ? 1 : Commands.remembered(PREFS + "photons", 1), 4, 8, "per intensity unit (1 = photon counts)");
		gd.addNumericField("Read_noise:", macro ? 0 : Commands.remembered(PREFS + "read_noise", 0), 3, 8, "sigma, intensity units");
		gd.addCheckbox("Stop_at_suggestion (return the suggested iterate)", false);
		gd.addCheckbox("Ignore_calibration of the references", false);
		gd.addCheckbox("Estimate_noise from the recording (camera gain and read noise, instead of Photons and Read_noise)",
				!macro && Commands.remembered(PREFS + "estimate_noise", true));
		gd.addCheckbox("Match_resolution (blur the references to the result's expected resolution)", !macro && Commands.remembered(PREFS + "match_resolution", true));
		gd.addHelp(DialogHelp.watch().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final double every = Commands.number(gd, "every");
		final String folder = gd.getNextString().trim(), pattern = gd.getNextString().trim();
		final double photons = Commands.number(gd, "photons"), readNoise = Commands.number(gd, "read_noise");
		final boolean stop = gd.getNextBoolean(), ignore = gd.getNextBoolean(), estimate = gd.getNextBoolean(), match = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (every != Math.rint(every)) throw new IllegalArgumentException("Every must be a whole number of iterations, got " + every + " (every=)");
		if (!macro) {
			Prefs.set(PREFS + "every", (int) every);
			Prefs.set(PREFS + "references", folder);
			Prefs.set(PREFS + "open_references", pattern);
			Prefs.set(PREFS + "photons", photons);
			Prefs.set(PREFS + "read_noise", readNoise);
			Prefs.set(PREFS + "estimate_noise", estimate);
			Prefs.set(PREFS + "match_resolution", match);
		}
		return new Watch((int) every, folder, pattern, photons, readNoise, stop, ignore, estimate, match);
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
