package org.parfocal.ij1;

import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.beads.Averaging;
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
		gd.addChoice("Image:", titles, BeadStackChoices.preselected(titles));
		gd.addMessage("PSF box and beads (µm)");
		gd.addNumericField("Box_xy:", Commands.remembered(PREFS + "boxxy", 0), 3, 8, "µm; 0 = from the optics");
		gd.addNumericField("Box_z:", Commands.remembered(PREFS + "boxz", 0), 3, 8, "µm; 0 = 2D image, or from the optics");
		gd.addNumericField("Bead_diameter:", Commands.remembered(PREFS + "diameter", 0.1), 3, 8, "µm; 0 = unknown");
		gd.addMessage("Detection and rejection");
		gd.addNumericField("Threshold:", Commands.remembered(PREFS + "threshold", 6), 2, 8, "× noise above the background");
		gd.addCheckbox("Reject_saturated beads (peak at the bit-depth maximum)", Commands.remembered(PREFS + "saturated", true));
		gd.addNumericField("Outlier_z:", Commands.remembered(PREFS + "outlier", 3.5), 2, 8, "robust z-score limit; 0 = off");
		gd.addChoice("Background:", BackgroundMode.keys(), Commands.remembered(PREFS + "background", BackgroundMode.STACK.key()));
		gd.addChoice("Averaging:", Averaging.keys(), Commands.remembered(PREFS + "averaging", Averaging.MEAN.key()));
		gd.addCheckbox("Symmetrize radially", false);
		gd.addNumericField("Voxel_xy:", 0, 4, 8, "µm; 0 = from the image");
		gd.addNumericField("Voxel_z:", 0, 4, 8, "µm; 0 = from the image");
		gd.addMessage("Optics for comparison (optional)");
		gd.addChoice("Optics:", models, Commands.remembered(PREFS + "model", PsfFromBeads.NONE));
		gd.addChoice("Modality:", Modality.keys(), Commands.remembered(PREFS + "modality", "widefield"));
		gd.addNumericField("NA:", Commands.remembered(PREFS + "na", 1.4), 3);
		gd.addNumericField("Immersion_index:", Commands.remembered(PREFS + "ni", 1.518), 4);
		gd.addNumericField("Sample_index:", Commands.remembered(PREFS + "ns", 1.518), 4);
		gd.addNumericField("Depth:", 0, 2, 6, "µm below the coverslip");
		gd.addNumericField("Emission:", Commands.remembered(PREFS + "emission", 0.52), 3, 6, "µm");
		gd.addNumericField("Excitation:", Commands.remembered(PREFS + "excitation", 0.488), 3, 6, "µm (confocal, two-photon)");
		gd.addNumericField("Pinhole:", 1, 2, 6, "Airy units (confocal)");
		gd.addNumericField("Sheet_thickness:", 2, 2, 6, "µm FWHM (light-sheet)");
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
