package org.parfocal.ij1;

import static org.parfocal.ij1.BlindDeconvolve.ESTIMATES;
import static org.parfocal.ij1.BlindDeconvolve.FREE_FORM;
import static org.parfocal.ij1.BlindDeconvolve.FROM_OPTICS;
import static org.parfocal.ij1.BlindDeconvolve.GAUSSIAN;
import static org.parfocal.ij1.BlindDeconvolve.MICRONS;
import static org.parfocal.ij1.BlindDeconvolve.PREFS;
import static org.parfocal.ij1.BlindDeconvolve.VOXELS;

import java.util.Map;

import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.parfocal.command.BlindKeys;
import org.parfocal.command.KeyTable;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;

/**
 * Blind Deconvolve's dialogs: the main one (labels' first words are the macro keys), then PSF from Optics' dialog
 * for {@code psf=from_optics}, the band-limit optics for another start, and Deconvolve's watch dialog. Values are
 * remembered only outside macros ({@link Commands#remembered}).
 */
final class BlindDeconvolveDialog {

	private BlindDeconvolveDialog() {}


	/** The main dialog, then the optics, band-limit or watch dialog it asks for; null if one was cancelled. */
	static BlindDeconvolveOptions show() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the image to deconvolve first");
		final String imageDefault = Commands.currentNonPsfTitle(titles);
		// plausible PSFs as Deconvolve lists them (newest Parfocal PSF first), then the optics and the Gaussian
		final String[] starts = PsfChoices.items(WindowManager.getImage(imageDefault), FROM_OPTICS, GAUSSIAN);
		Commands.acceptOldValue("edges", EdgeMode.OLD_NON_CIRCULANT_KEY, EdgeMode.NON_CIRCULANT.key());
		final GenericDialog gd = new GenericDialog(BlindDeconvolve.COMMAND);
		// labels and first-use defaults from the one description of the keys (BlindKeys); the screen adds items, digits, hints, headings
		final KeyFields f = new KeyFields(gd, BlindKeys.MAIN, PREFS);
		f.choice("image", titles, imageDefault);
		f.choice("psf", starts, Commands.isMacro() ? GAUSSIAN
				: defaultStart(starts, PsfChoices.madeAsPsf(starts[0]), Commands.remembered(PREFS + "start", GAUSSIAN), Commands.remembered(PREFS + "estimate", FREE_FORM)));
		f.number("fwhm_xy", 3, 6, "µm, lateral width of a gaussian start").number("fwhm_z", 3, 6, "µm, axial width of a gaussian start");
		gd.addMessage("Schedule");
		f.number("iterations", 0, 6, "outer iterations").number("object_updates", 0, 6, "per iteration").number("psf_updates", 0, 6, "per iteration (0: PSF kept)");
		f.number("object_tv", 4, 8, "total-variation weight").number("psf_tv", 4, 8, "total-variation weight");
		gd.addMessage("PSF constraints");
		f.rememberedCheckbox("band_limit").rememberedCheckbox("symmetric").rememberedCheckbox("centring");
		f.number("support_xy", 2, 6, "PSF box width; 0 = automatic").number("support_z", 2, 6, "PSF box depth; 0 = automatic");
		f.choice("support_units", new String[] { VOXELS, MICRONS }, null);
		gd.addMessage("Output and data");
		f.number("snapshot_interval", 0, 6, "iterations between PSF snapshots");
		f.choice("edges", EdgeMode.keys(), null).text("offset", 8).text("background", 8);
		gd.addMessage("How the PSF is estimated");
		f.choice("estimate", ESTIMATES.toArray(new String[0]), null);
		f.number("trust_radius", 3, 6, "largest distance of a refined PSF to the fitted model");
		f.checkbox("watch");
		gd.addHelp(DialogHelp.blind().html());
		ChoiceWords.show(gd, "image", "psf", "support_units", "edges", "estimate"); // in words, recorded as the macro values
		PsfChoices.follow(gd, FROM_OPTICS, GAUSSIAN);
		BlindHints.follow(gd);
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "starting PSF (an open image, " + FROM_OPTICS + " or " + GAUSSIAN + ")");
		final double fwhmXY = Commands.number(gd, "fwhm_xy"), fwhmZ = Commands.number(gd, "fwhm_z");
		final double iterations = Commands.number(gd, "iterations"), k = Commands.number(gd, "object_updates"), m = Commands.number(gd, "psf_updates");
		final double objectTv = Commands.number(gd, "object_tv"), psfTv = Commands.number(gd, "psf_tv");
		final boolean band = gd.getNextBoolean(), symmetric = gd.getNextBoolean(), centring = gd.getNextBoolean();
		final double sxy = Commands.number(gd, "support_xy"), sz = Commands.number(gd, "support_z");
		final String units = Commands.checkChoice("support_units", gd.getNextChoice(), "support unit (" + VOXELS + " or " + MICRONS + ")");
		final double snapshot = Commands.number(gd, "snapshot_interval");
		final EdgeMode edges = EdgeMode.parse(Commands.checkChoice("edges", gd.getNextChoice(), "edge mode"));
		final String offset = gd.getNextString().trim(), background = gd.getNextString().trim();
		final String estimate = Commands.checkChoice("estimate", gd.getNextChoice(), "PSF estimate (" + String.join(", ", ESTIMATES) + ")");
		final double trust = Commands.number(gd, "trust_radius");
		final boolean watch = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		final Level off = Deconvolve.level("offset", offset), bg = Deconvolve.level("background", background);
		PsfFromOptics.Options optics = null;
		BlindDeconvolveOptions.BandOptics bandOptics = null;
		if (FROM_OPTICS.equals(psf)) {
			optics = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (optics == null) return null;
		} else if (band) {
			bandOptics = showBandDialog(bandDefaults(image, psf));
			if (bandOptics == null) return null;
		}
		Deconvolve.Watch w = null;
		if (watch) {
			w = DeconvolveDialog.showWatch(); // the same dialog, keys and defaults as Deconvolve's watch mode
			if (w == null) return null;
		}
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "fwhm_xy", fwhmXY);
			Prefs.set(PREFS + "fwhm_z", fwhmZ);
			Prefs.set(PREFS + "iterations", iterations);
			Prefs.set(PREFS + "object_updates", k);
			Prefs.set(PREFS + "psf_updates", m);
			Prefs.set(PREFS + "object_tv", objectTv);
			Prefs.set(PREFS + "psf_tv", psfTv);
			Prefs.set(PREFS + "estimate", estimate);
			Prefs.set(PREFS + "trust_radius", trust);
			Prefs.set(PREFS + "band_limit", band);
			Prefs.set(PREFS + "symmetric", symmetric);
			Prefs.set(PREFS + "centring", centring);
			Prefs.set(PREFS + "support_xy", sxy);
			Prefs.set(PREFS + "support_z", sz);
			Prefs.set(PREFS + "support_units", units);
			Prefs.set(PREFS + "snapshot_interval", snapshot);
			Prefs.set(PREFS + "edges", edges.key());
			Prefs.set(PREFS + "offset", offset);
			Prefs.set(PREFS + "background", background);
			if (!FROM_OPTICS.equals(psf) && !GAUSSIAN.equals(psf)) Prefs.set(PREFS + "start", "image");
			else Prefs.set(PREFS + "start", psf);
		}
		return new BlindDeconvolveOptions(image, psf, fwhmXY, fwhmZ, whole("Iterations", iterations), whole("Object updates per iteration", k),
				whole("PSF updates per iteration", m), objectTv, psfTv, band, symmetric, centring, sxy, sz, units, whole("The snapshot interval", snapshot),
				edges, off, bg, optics, bandOptics, w, estimate, trust);
	}

	/**
	 * Interactive defaults of the band-limit optics: those of the starting PSF's record, else of the image's (or
	 * of their inputs' records, {@link OpticsDefaults}); empty in a macro.
	 */
	static Map<String, String> bandDefaults(final String image, final String psf) {
		final Map<String, String> fromPsf = GAUSSIAN.equals(psf) ? Map.of() : OpticsDefaults.of(WindowManager.getImage(psf));
		return fromPsf.isEmpty() ? OpticsDefaults.of(WindowManager.getImage(image)) : fromPsf;
	}

	/** The optics the band limit needs, asked for when the start is not computed from them; null if cancelled. */
	private static BlindDeconvolveOptions.BandOptics showBandDialog(final Map<String, String> rec) {
		final GenericDialog gd = new GenericDialog(BlindDeconvolve.COMMAND + ": optics for the band limit");
		gd.addMessage("The band-limit constraint needs the widefield optics:");
		final KeyTable B = BlindKeys.BAND; // labels and first-use defaults; the image's or the PSF's record first (OpticsDefaults)
		gd.addNumericField(B.key("na").label(), OpticsDefaults.number(rec, "na", Commands.remembered(PREFS + "na", B.key("na").shownNumber())), 3);
		gd.addNumericField(B.key("immersion_index").label(),
				OpticsDefaults.number(rec, "immersion_index", Commands.remembered(PREFS + "immersion_index", B.key("immersion_index").shownNumber())), 4);
		gd.addNumericField(B.key("emission").label(), OpticsDefaults.number(rec, "emission", Commands.remembered(PREFS + "emission", B.key("emission").shownNumber())), 3, 6, "µm");
		gd.addHelp(DialogHelp.band().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final double na = Commands.number(gd, "na"), ni = Commands.number(gd, "immersion_index"), em = Commands.number(gd, "emission");
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "na", na);
			Prefs.set(PREFS + "immersion_index", ni);
			Prefs.set(PREFS + "emission", em);
		}
		final BlindDeconvolveOptions.BandOptics b = new BlindDeconvolveOptions.BandOptics(na, ni, em);
		b.optics(); // validates now, with the optics' one-line messages
		return b;
	}

	static int whole(final String what, final double v) {
		if (v != Math.rint(v) || Math.abs(v) > Integer.MAX_VALUE) throw new IllegalArgumentException(what + " must be a whole number, got " + v);
		return (int) v;
	}

	/**
	 * The start preselected interactively: the newest plausible PSF ({@code starts[0]} when it is an image) if
	 * Parfocal made it or the last run started from an image, unless the last run fitted a model (which starts from
	 * the optics or the Gaussian); else the last run's from_optics or gaussian, the Gaussian at first. A macro gets
	 * the Gaussian, as before the list was filtered.
	 */
	static String defaultStart(final String[] starts, final boolean firstIsParfocalPsf, final String lastStart, final String lastEstimate) {
		final boolean image = !FROM_OPTICS.equals(starts[0]) && !GAUSSIAN.equals(starts[0]);
		if (image && FREE_FORM.equals(lastEstimate) && (firstIsParfocalPsf || "image".equals(lastStart))) return starts[0];
		return FROM_OPTICS.equals(lastStart) ? FROM_OPTICS : GAUSSIAN;
	}
}
