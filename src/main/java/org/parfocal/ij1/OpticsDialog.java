package org.parfocal.ij1;

import java.util.Map;

import ij.ImagePlus;
import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.command.DeconvolveKeys;
import org.parfocal.command.KeyTable;
import org.parfocal.command.OtherKeys;
import org.parfocal.command.PsfFromOpticsRequest;

import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Modality;
import org.parfocal.psf.OpticsFields.Group;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * PSF from Optics' dialog, also shown by Deconvolve and Blind Deconvolve for a PSF computed from the optics:
 * model, modality, the optics under headings, the sampling; read into key → text and through {@link PsfFromOpticsRequest#from}.
 */
final class OpticsDialog {

	private static final String COMMAND = PsfFromOptics.COMMAND;
	private static final String PREFS = "parfocal.psfoptics.";

	/** The numeric fields before the sizes, in dialog order. */
	private static final String[] NUMBERS = { "na", "immersion_index", "sample_index", "coverslip_index", "coverslip_thickness", "depth",
			"immersion_index_design", "coverslip_index_design", "coverslip_thickness_design", "working_distance", "emission", "excitation", "pinhole",
			"sheet_thickness", "voxel_xy", "voxel_z" };
	/** Remembered numbers: {@code Prefs} name (after the prefix) → key. */
	private static final String[][] REMEMBERED = { { "na", "na" }, { "ni", "immersion_index" }, { "nid", "immersion_index_design" },
			{ "ns", "sample_index" }, { "depth", "depth" }, { "emission", "emission" }, { "excitation", "excitation" } };

	private OpticsDialog() {}

	/**
	 * The dialog, or null if cancelled. Voxel sizes default to {@code cur}'s (may be null).
	 * {@code withProfiles} adds the show_profiles checkbox; Deconvolve, which asks for the optics with this
	 * same dialog when the PSF is to be computed, leaves it out.
	 */
	static PsfFromOpticsRequest show(final ImagePlus cur, final boolean withProfiles) {
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
		// read into key → macro text, then through the one reader of the keys, as for a record's replay
		final KeyFields f = new KeyFields(gd, PsfFromOpticsRequest.KEYS, PREFS);
		f.readChoice("model", "PSF model (" + String.join(", ", PsfModels.keys()) + ")");
		f.readChoice("modality", "modality");
		for (final String n : NUMBERS) f.readNumber(n);
		f.readWhole("size_xy"); // cut to the whole part, as the dialog always did
		f.readWhole("size_z");
		if (withProfiles) f.readCheckbox("show_profiles");
		final Map<String, String> values = f.values();
		if (!Commands.isMacro()) { // Prefs only outside macros, under their current names
			Prefs.set(PREFS + "model", values.get("model"));
			Prefs.set(PREFS + "modality", values.get("modality"));
			for (final String[] p : REMEMBERED) Prefs.set(PREFS + p[0], Double.parseDouble(values.get(p[1])));
		}
		return PsfFromOpticsRequest.from(values);
	}
}
