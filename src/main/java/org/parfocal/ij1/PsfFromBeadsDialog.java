package org.parfocal.ij1;

import java.util.Map;

import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.command.BeadsKeys;
import org.parfocal.command.BeadsRequest;
import org.parfocal.command.KeyTable;
import org.parfocal.psf.Modality;
import org.parfocal.psf.PsfModels;

/**
 * PSF from Beads' dialog (labels' first words are the macro keys): the bead stack, the box and bead size, the
 * detection and rejection rules, and the optics to compare with. Values are remembered only outside macros.
 */
final class PsfFromBeadsDialog {

	private static final String PREFS = "parfocal.beads.";

	private PsfFromBeadsDialog() {}

	/** The dialog; null if cancelled. */
	static BeadsRequest show() {
		final String[] titles = BeadStackChoices.items(); // recordings first, never RGB
		if (titles.length == 0)
			throw new IllegalArgumentException(Commands.imageTitles().length == 0 ? "Open a bead stack first"
					: "No open image can be measured: open a bead stack (one channel, one time point, not RGB)");
		final String[] models = new String[PsfModels.keys().length + 1];
		models[0] = PsfFromBeads.NONE;
		System.arraycopy(PsfModels.keys(), 0, models, 1, models.length - 1);
		final GenericDialog gd = new GenericDialog(PsfFromBeads.COMMAND);
		final KeyTable K = BeadsKeys.MAIN; // labels and first-use defaults: the one description of the keys
		gd.addChoice(K.key("image").label(), titles, BeadStackChoices.preselected(titles));
		gd.addMessage("PSF box and beads (µm)");
		gd.addNumericField(K.key("box_xy").label(), Commands.remembered(PREFS + "boxxy", K.key("box_xy").shownNumber()), 3, 8, "µm; 0 = from the optics");
		gd.addNumericField(K.key("box_z").label(), Commands.remembered(PREFS + "boxz", K.key("box_z").shownNumber()), 3, 8, "µm; 0 = 2D image, or from the optics");
		gd.addNumericField(K.key("bead_diameter").label(), Commands.remembered(PREFS + "diameter", K.key("bead_diameter").shownNumber()), 3, 8, "µm; 0 = unknown");
		gd.addMessage("Detection and rejection");
		gd.addNumericField(K.key("threshold").label(), Commands.remembered(PREFS + "threshold", K.key("threshold").shownNumber()), 2, 8, "× noise above the background");
		gd.addCheckbox(K.key("reject_saturated").label(), Commands.remembered(PREFS + "saturated", K.key("reject_saturated").shownChecked()));
		gd.addNumericField(K.key("outlier_z").label(), Commands.remembered(PREFS + "outlier", K.key("outlier_z").shownNumber()), 2, 8, "robust z-score limit; 0 = off");
		gd.addChoice(K.key("background").label(), BackgroundMode.keys(), Commands.remembered(PREFS + "background", K.key("background").shownValue()));
		gd.addChoice(K.key("averaging").label(), Averaging.keys(), Commands.remembered(PREFS + "averaging", K.key("averaging").shownValue()));
		gd.addCheckbox(K.key("symmetrize").label(), K.key("symmetrize").shownChecked());
		gd.addNumericField(K.key("voxel_xy").label(), K.key("voxel_xy").shownNumber(), 4, 8, "µm; 0 = from the image");
		gd.addNumericField(K.key("voxel_z").label(), K.key("voxel_z").shownNumber(), 4, 8, "µm; 0 = from the image");
		gd.addMessage("Optics for comparison (optional)");
		gd.addChoice(K.key("optics").label(), models, Commands.remembered(PREFS + "model", K.key("optics").shownValue()));
		gd.addChoice(K.key("modality").label(), Modality.keys(), Commands.remembered(PREFS + "modality", K.key("modality").shownValue()));
		gd.addNumericField(K.key("na").label(), Commands.remembered(PREFS + "na", K.key("na").shownNumber()), 3);
		gd.addNumericField(K.key("immersion_index").label(), Commands.remembered(PREFS + "ni", K.key("immersion_index").shownNumber()), 4);
		gd.addNumericField(K.key("sample_index").label(), Commands.remembered(PREFS + "ns", K.key("sample_index").shownNumber()), 4);
		gd.addNumericField(K.key("depth").label(), K.key("depth").shownNumber(), 2, 6, "µm below the coverslip");
		gd.addNumericField(K.key("emission").label(), Commands.remembered(PREFS + "emission", K.key("emission").shownNumber()), 3, 6, "µm");
		gd.addNumericField(K.key("excitation").label(), Commands.remembered(PREFS + "excitation", K.key("excitation").shownNumber()), 3, 6, "µm (confocal, two-photon)");
		gd.addNumericField(K.key("pinhole").label(), K.key("pinhole").shownNumber(), 2, 6, "Airy units (confocal)");
		gd.addNumericField(K.key("sheet_thickness").label(), K.key("sheet_thickness").shownNumber(), 2, 6, "µm FWHM (light-sheet)");
		gd.addHelp(DialogHelp.beads().html());
		ChoiceWords.show(gd, "image", "background", "averaging", "optics", "modality"); // in words, recorded as the macro values
		DeconvolveHints.followBeads(gd, PsfFromBeads.NONE); // "0 = from the optics" only when optics are chosen
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		// read into key → macro text, then the one reader of the keys (BeadsRequest), as for a record's replay
		final KeyFields f = new KeyFields(gd, K, PREFS);
		f.readChoice("image", "image title");
		for (final String n : new String[] { "box_xy", "box_z", "bead_diameter", "threshold" }) f.readNumber(n);
		f.readCheckbox("reject_saturated");
		f.readNumber("outlier_z");
		f.readChoice("background", "background (border or stack)");
		f.readChoice("averaging", "averaging (mean or median)");
		f.readCheckbox("symmetrize");
		f.readNumber("voxel_xy");
		f.readNumber("voxel_z");
		f.readChoice("optics", "optics model (none, " + String.join(", ", PsfModels.keys()) + ")");
		f.readChoice("modality", "modality");
		for (final String n : new String[] { "na", "immersion_index", "sample_index", "depth", "emission", "excitation", "pinhole", "sheet_thickness" })
			f.readNumber(n);
		final Map<String, String> values = f.values();
		final BeadsRequest r = BeadsRequest.from(values);
		if (!Commands.isMacro()) // remembered under their earlier Prefs names
			for (final String[] p : REMEMBERED) Prefs.set(PREFS + p[1], values.get(p[0]));
		return r;
	}

	/** Key → Prefs name (after {@link #PREFS}) of the values remembered outside macros. */
	private static final String[][] REMEMBERED = { { "box_xy", "boxxy" }, { "box_z", "boxz" }, { "bead_diameter", "diameter" },
			{ "threshold", "threshold" }, { "reject_saturated", "saturated" }, { "outlier_z", "outlier" }, { "background", "background" },
			{ "averaging", "averaging" }, { "optics", "model" }, { "modality", "modality" }, { "na", "na" }, { "immersion_index", "ni" },
			{ "sample_index", "ns" }, { "emission", "emission" }, { "excitation", "excitation" } };
}
