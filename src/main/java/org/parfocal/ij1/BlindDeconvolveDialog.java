package org.parfocal.ij1;

import static org.parfocal.command.BlindRequest.ESTIMATES;
import static org.parfocal.command.BlindRequest.FREE_FORM;
import static org.parfocal.command.BlindRequest.FROM_OPTICS;
import static org.parfocal.command.BlindRequest.GAUSSIAN;
import static org.parfocal.command.BlindRequest.MICRONS;
import static org.parfocal.ij1.BlindDeconvolve.PREFS;
import static org.parfocal.command.BlindRequest.VOXELS;

import java.util.LinkedHashMap;
import java.util.Map;

import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.parfocal.command.BlindKeys;
import org.parfocal.command.BlindRequest;
import org.parfocal.command.KeyTable;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.provenance.MacroOptions;

/**
 * Blind Deconvolve's dialogs: the main one (labels' first words are the macro keys), then PSF from Optics' dialog
 * for {@code psf=from_optics}, the band-limit optics for another start, and Deconvolve's watch dialog. Values are
 * remembered only outside macros ({@link Commands#remembered}).
 */
final class BlindDeconvolveDialog {

	private BlindDeconvolveDialog() {}


	/** The main dialog, then the optics, band-limit or watch dialog it asks for; null if one was cancelled. */
	static BlindRequest show() {
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
		final String image = f.readChoice("image", "image title");
		final String psf = f.readChoice("psf", "starting PSF (an open image, " + FROM_OPTICS + " or " + GAUSSIAN + ")");
		for (final String n : new String[] { "fwhm_xy", "fwhm_z", "iterations", "object_updates", "psf_updates", "object_tv", "psf_tv" }) f.readNumber(n);
		final boolean band = f.readCheckbox("band_limit");
		f.readCheckbox("symmetric");
		f.readCheckbox("centring");
		f.readNumber("support_xy");
		f.readNumber("support_z");
		f.readChoice("support_units", "support unit (" + VOXELS + " or " + MICRONS + ")");
		f.readNumber("snapshot_interval");
		f.readChoice("edges", "edge mode");
		Deconvolve.level("offset", f.readText("offset")); // refused before a second dialog shows, as always
		Deconvolve.level("background", f.readText("background"));
		f.readChoice("estimate", "PSF estimate (" + String.join(", ", ESTIMATES) + ")");
		f.readNumber("trust_radius");
		final boolean watch = f.readCheckbox("watch");
		final Map<String, String> values = new LinkedHashMap<>(f.values());
		if (FROM_OPTICS.equals(psf)) {
			final org.parfocal.command.PsfFromOpticsRequest optics = PsfFromOptics.showDialog(Commands.image(image, "image"), false);
			if (optics == null) return null;
			values.putAll(MacroOptions.parse(optics.macroOptions())); // the dialog's values as their recorded text
		} else if (band) {
			final Map<String, String> b = showBandDialog(bandDefaults(image, psf));
			if (b == null) return null;
			values.putAll(b);
		}
		if (watch) {
			final Deconvolve.Watch w = DeconvolveDialog.showWatch(); // the same dialog, keys and defaults as Deconvolve's watch mode
			if (w == null) return null;
			values.putAll(MacroOptions.parse(w.macroOptions()));
		}
		final BlindRequest request = BlindRequest.from(values); // the one reader of the keys, as for a record's replay
		f.remember("fwhm_xy", "fwhm_z", "iterations", "object_updates", "psf_updates", "object_tv", "psf_tv", "estimate", "trust_radius", "band_limit",
				"symmetric", "centring", "support_xy", "support_z", "support_units", "snapshot_interval", "edges", "offset", "background");
		if (!Commands.isMacro()) Prefs.set(PREFS + "start", FROM_OPTICS.equals(psf) || GAUSSIAN.equals(psf) ? psf : "image");
		return request;
	}

	/**
	 * Interactive defaults of the band-limit optics: those of the starting PSF's record, else of the image's (or
	 * of their inputs' records, {@link OpticsDefaults}); empty in a macro.
	 */
	static Map<String, String> bandDefaults(final String image, final String psf) {
		final Map<String, String> fromPsf = GAUSSIAN.equals(psf) ? Map.of() : OpticsDefaults.of(WindowManager.getImage(psf));
		return fromPsf.isEmpty() ? OpticsDefaults.of(WindowManager.getImage(image)) : fromPsf;
	}

	/** The optics the band limit needs, asked for when the start is not computed from them, as key → text; null if cancelled. */
	private static Map<String, String> showBandDialog(final Map<String, String> rec) {
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
		final Map<String, String> values = new LinkedHashMap<>();
		for (final String n : new String[] { "na", "immersion_index", "emission" }) values.put(n, MacroOptions.number(Commands.number(gd, n)));
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		BlindRequest.BandOptics.from(B.read(values)); // validates now, with the optics' one-line messages
		if (!Commands.isMacro()) for (final Map.Entry<String, String> e : values.entrySet()) Prefs.set(PREFS + e.getKey(), e.getValue());
		return values;
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
