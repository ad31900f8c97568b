package org.parfocal.ij1;

import ij.ImagePlus;
import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.command.DeconvolveKeys;
import org.parfocal.command.KeyTable;
import org.parfocal.command.OtherKeys;

import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.OpticsFields.Group;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * PSF from Optics' dialog, also shown by Deconvolve and Blind Deconvolve for a PSF computed from the optics:
 * model, modality, the optics under headings, the sampling; read into {@link PsfFromOptics.Options}.
 */
final class OpticsDialog {

	private static final String COMMAND = PsfFromOptics.COMMAND;
	private static final String PREFS = "parfocal.psfoptics.";

	private OpticsDialog() {}

	/**
	 * The dialog, or null if cancelled. Voxel sizes default to {@code cur}'s (may be null).
	 * {@code withProfiles} adds the show_profiles checkbox; Deconvolve, which asks for the optics with this
	 * same dialog when the PSF is to be computed, leaves it out.
	 */
	static PsfFromOptics.Options show(final ImagePlus cur, final boolean withProfiles) {
		VoxelSize vs = cur == null ? VoxelSize.UNCALIBRATED : ImageBridge.voxelSize(cur.getCalibration());
		double dxy = 0, dz = 0;
		try {
			final double f = PsfGrid.micronsPer(vs);
			dxy = vs.dx() * f;
			dz = vs.dz() * f;
		} catch (final IllegalArgumentException e) {
			// uncalibrated: the user must type the voxel size; 0 is refused with a message
		}
		// interactively, the optics of the image's record (or of its inputs' records) come first (OpticsDefaults)
		final java.util.Map<String, String> rec = OpticsDefaults.of(cur);
		final GenericDialog gd = new GenericDialog(COMMAND);
		final KeyTable O = DeconvolveKeys.OPTICS; // labels and first-use defaults: the one description of the optics keys
		gd.addChoice(O.key("model").label(), PsfModels.keys(), OpticsDefaults.word(rec, "model", PsfModels.keys(), Commands.remembered(PREFS + "model", O.key("model").shownValue())));
		gd.addChoice(O.key("modality").label(), Modality.keys(), OpticsDefaults.word(rec, "modality", Modality.keys(), Commands.remembered(PREFS + "modality", O.key("modality").shownValue())));
		gd.addMessage(Group.OBJECTIVE.heading());
		gd.addNumericField(O.key("na").label(), OpticsDefaults.number(rec, "na", Commands.remembered(PREFS + "na", O.key("na").shownNumber())), 3);
		gd.addNumericField(O.key("immersion_index").label(), OpticsDefaults.number(rec, "immersion_index", Commands.remembered(PREFS + "ni", O.key("immersion_index").shownNumber())), 4, 8, "medium in use");
		gd.addNumericField(O.key("sample_index").label(), OpticsDefaults.number(rec, "sample_index", Commands.remembered(PREFS + "ns", O.key("sample_index").shownNumber())), 4);
		gd.addMessage(Group.LAYERS.heading());
		gd.addNumericField(O.key("coverslip_index").label(), OpticsDefaults.number(rec, "coverslip_index", O.key("coverslip_index").shownNumber()), 4, 8, "glass in use");
		gd.addNumericField(O.key("coverslip_thickness").label(), OpticsDefaults.number(rec, "coverslip_thickness", O.key("coverslip_thickness").shownNumber()), 1, 8, "µm, glass in use");
		gd.addNumericField(O.key("depth").label(), OpticsDefaults.number(rec, "depth", Commands.remembered(PREFS + "depth", O.key("depth").shownNumber())), 2, 8, "µm below the coverslip");
		gd.addMessage(Group.DESIGN.heading());
		gd.addNumericField(O.key("immersion_index_design").label(), OpticsDefaults.number(rec, "immersion_index_design", Commands.remembered(PREFS + "nid", O.key("immersion_index_design").shownNumber())), 4, 8, "on the objective");
		gd.addNumericField(O.key("coverslip_index_design").label(), OpticsDefaults.number(rec, "coverslip_index_design", O.key("coverslip_index_design").shownNumber()), 4);
		gd.addNumericField(O.key("coverslip_thickness_design").label(), OpticsDefaults.number(rec, "coverslip_thickness_design", O.key("coverslip_thickness_design").shownNumber()), 1, 8, "µm, on the barrel");
		gd.addNumericField(O.key("working_distance").label(), OpticsDefaults.number(rec, "working_distance", O.key("working_distance").shownNumber()), 1, 8, "µm");
		gd.addMessage(Group.LIGHT.heading());
		gd.addNumericField(O.key("emission").label(), OpticsDefaults.number(rec, "emission", Commands.remembered(PREFS + "emission", O.key("emission").shownNumber())), 3, 6, "µm");
		gd.addMessage(Group.SCANNING.heading());
		gd.addNumericField(O.key("excitation").label(), OpticsDefaults.number(rec, "excitation", Commands.remembered(PREFS + "excitation", O.key("excitation").shownNumber())), 3, 6, "µm (laser line; two-photon: the laser wavelength)");
		gd.addNumericField(O.key("pinhole").label(), OpticsDefaults.number(rec, "pinhole", O.key("pinhole").shownNumber()), 2, 6, "Airy units (confocal only)");
		gd.addMessage(Group.SHEET.heading());
		gd.addNumericField(O.key("sheet_thickness").label(), OpticsDefaults.number(rec, "sheet_thickness", O.key("sheet_thickness").shownNumber()), 2, 6, "µm FWHM along z");
		gd.addMessage(Group.SAMPLING.heading());
		gd.addNumericField(O.key("voxel_xy").label(), dxy, 4, 8, "µm (from the current image)");
		gd.addNumericField(O.key("voxel_z").label(), dz, 4, 8, "µm");
		gd.addNumericField(O.key("size_xy").label(), O.key("size_xy").shownNumber(), 0, 6, "voxels, odd; 0 = from the optics");
		gd.addNumericField(O.key("size_z").label(), O.key("size_z").shownNumber(), 0, 6, "voxels, odd; 0 = from the optics");
		if (withProfiles) gd.addCheckbox(OtherKeys.PROFILES.key("show_profiles").label(), OtherKeys.PROFILES.key("show_profiles").shownChecked());
		gd.addHelp(DialogHelp.psfFromOptics(withProfiles).html());
		ChoiceWords.show(gd, "model", "modality"); // shown in words, recorded as the macro values
		OpticsGreying.follow(gd); // fields the chosen model and modality do not use are greyed out
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String model = Commands.checkChoice("model", gd.getNextChoice(), "PSF model (" + String.join(", ", PsfModels.keys()) + ")");
		final Modality modality = Modality.parse(Commands.checkChoice("modality", gd.getNextChoice(), "modality"));
		final double na = Commands.number(gd, "na"), ni = Commands.number(gd, "immersion_index");
		final double ns = Commands.number(gd, "sample_index"), ng = Commands.number(gd, "coverslip_index");
		final double tg = Commands.number(gd, "coverslip_thickness"), depth = Commands.number(gd, "depth");
		final double nid = Commands.number(gd, "immersion_index_design"), ngd = Commands.number(gd, "coverslip_index_design");
		final double tgd = Commands.number(gd, "coverslip_thickness_design"), wd = Commands.number(gd, "working_distance");
		final double emission = Commands.number(gd, "emission"), excitation = Commands.number(gd, "excitation");
		final double pinhole = Commands.number(gd, "pinhole"), sheet = Commands.number(gd, "sheet_thickness");
		final double vxy = Commands.number(gd, "voxel_xy"), vz = Commands.number(gd, "voxel_z");
		final double sxy = Commands.number(gd, "size_xy"), sz = Commands.number(gd, "size_z");
		final boolean show = withProfiles && gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "model", model);
			Prefs.set(PREFS + "modality", modality.key());
			Prefs.set(PREFS + "na", na);
			Prefs.set(PREFS + "ni", ni);
			Prefs.set(PREFS + "nid", nid);
			Prefs.set(PREFS + "ns", ns);
			Prefs.set(PREFS + "depth", depth);
			Prefs.set(PREFS + "emission", emission);
			Prefs.set(PREFS + "excitation", excitation);
		}
		final Optics optics = Optics.builder().modality(modality).na(na).immersionIndex(ni).immersionIndexDesign(nid).sampleIndex(ns)
				.coverslipIndex(ng).coverslipIndexDesign(ngd).coverslipThickness(tg).coverslipThicknessDesign(tgd).workingDistance(wd)
				.depth(depth).emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
				.excitationWavelength(modality.usesExcitation() || excitation > 0 ? excitation : Double.NaN).pinholeAiryUnits(pinhole)
				.sheetThickness(modality == Modality.LIGHT_SHEET || sheet > 0 ? sheet : Double.NaN).build();
		return new PsfFromOptics.Options(model, optics, vxy, vz, (int) sxy, (int) sz, show);
	}
}
