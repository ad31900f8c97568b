package org.parfocal.ij1;

import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.beads.Averaging;
import org.parfocal.command.BeadsKeys;
import org.parfocal.command.KeyTable;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfModels;

/**
 * PSF from Beads' dialog (labels' first words are the macro keys): the bead stack, the box and bead size, the
 * detection and rejection rules, and the optics to compare with. Values are remembered only outside macros.
 */
final class PsfFromBeadsDialog {

	private static final String PREFS = "parfocal.beads.";

	private PsfFromBeadsDialog() {}

	/** The dialog; null if cancelled. */
	static PsfFromBeads.Options show() {
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
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final double boxXY = Commands.number(gd, "box_xy"), boxZ = Commands.number(gd, "box_z"), diameter = Commands.number(gd, "bead_diameter");
		final double threshold = Commands.number(gd, "threshold");
		final boolean saturated = gd.getNextBoolean();
		final double outlier = Commands.number(gd, "outlier_z");
		final BackgroundMode background = BackgroundMode.parse(Commands.checkChoice("background", gd.getNextChoice(), "background (border or stack)"));
		final Averaging averaging = Averaging.parse(Commands.checkChoice("averaging", gd.getNextChoice(), "averaging (mean or median)"));
		final boolean symmetrize = gd.getNextBoolean();
		final double vxy = Commands.number(gd, "voxel_xy"), vz = Commands.number(gd, "voxel_z");
		final String model = Commands.checkChoice("optics", gd.getNextChoice(), "optics model (none, " + String.join(", ", PsfModels.keys()) + ")");
		final Modality modality = Modality.parse(Commands.checkChoice("modality", gd.getNextChoice(), "modality"));
		final double na = Commands.number(gd, "na"), ni = Commands.number(gd, "immersion_index"), ns = Commands.number(gd, "sample_index");
		final double depth = Commands.number(gd, "depth"), emission = Commands.number(gd, "emission"), excitation = Commands.number(gd, "excitation");
		final double pinhole = Commands.number(gd, "pinhole"), sheet = Commands.number(gd, "sheet_thickness");
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "boxxy", boxXY);
			Prefs.set(PREFS + "boxz", boxZ);
			Prefs.set(PREFS + "diameter", diameter);
			Prefs.set(PREFS + "threshold", threshold);
			Prefs.set(PREFS + "saturated", saturated);
			Prefs.set(PREFS + "outlier", outlier);
			Prefs.set(PREFS + "background", background.key());
			Prefs.set(PREFS + "averaging", averaging.key());
			Prefs.set(PREFS + "model", model);
			Prefs.set(PREFS + "modality", modality.key());
			Prefs.set(PREFS + "na", na);
			Prefs.set(PREFS + "ni", ni);
			Prefs.set(PREFS + "ns", ns);
			Prefs.set(PREFS + "emission", emission);
			Prefs.set(PREFS + "excitation", excitation);
		}
		final Optics optics = PsfFromBeads.NONE.equals(model) ? null
				: Optics.builder().modality(modality).na(na).immersionIndex(ni).sampleIndex(ns).depth(depth)
						.emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
						.excitationWavelength(modality.usesExcitation() || excitation > 0 ? excitation : Double.NaN).pinholeAiryUnits(pinhole)
						.sheetThickness(modality == Modality.LIGHT_SHEET || sheet > 0 ? sheet : Double.NaN).build();
		return new PsfFromBeads.Options(image, boxXY, boxZ, diameter, threshold, saturated, outlier, background, averaging, symmetrize, vxy, vz, model, optics);
	}
}
