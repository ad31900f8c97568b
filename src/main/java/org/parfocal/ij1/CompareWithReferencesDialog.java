package org.parfocal.ij1;

import java.util.Map;

import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.command.CompareKeys;
import org.parfocal.command.CompareRequest;
import org.parfocal.command.KeyTable;

/** Compare with Sharp References' dialog → {@link CompareRequest} (through {@link CompareRequest#from}, as a record's replay): fields, labels and first-use defaults from {@link CompareKeys}. */
final class CompareWithReferencesDialog {

	private static final String PREFS = "parfocal.compare.";

	private CompareWithReferencesDialog() {}

	/** The dialog; in a macro, keys not given take the table's defaults (the folder and pattern are remembered only outside macros). */
	static CompareRequest show() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open the result to judge first");
		final String[] optional = new String[titles.length + 1];
		optional[0] = CompareWithReferences.NONE;
		System.arraycopy(titles, 0, optional, 1, titles.length);
		final boolean macro = Commands.isMacro();
		final GenericDialog gd = new GenericDialog(CompareWithReferences.COMMAND);
		final KeyTable K = CompareKeys.MAIN; // labels and first-use defaults: the one description of the keys
		gd.addChoice(K.key("result").label(), titles, Commands.currentTitle(titles));
		gd.addStringField(K.key("reference_folder").label(), macro ? K.key("reference_folder").shownValue() : Commands.remembered(PREFS + "folder", K.key("reference_folder").shownValue()), 30);
		gd.addStringField(K.key("reference_images").label(), macro ? K.key("reference_images").shownValue() : Commands.remembered(PREFS + "pattern", K.key("reference_images").shownValue()), 20);
		gd.addChoice(K.key("input").label(), optional, K.key("input").shownValue());
		gd.addChoice(K.key("psf").label(), optional, K.key("psf").shownValue());
		gd.addStringField(K.key("offset").label(), K.key("offset").shownValue(), 8);
		gd.addStringField(K.key("background").label(), K.key("background").shownValue(), 8);
		gd.addNumericField(K.key("photons").label(), K.key("photons").shownNumber(), 4, 8, "per intensity unit (1 = photon counts)");
		gd.addNumericField(K.key("read_noise").label(), K.key("read_noise").shownNumber(), 3, 8, "sigma, intensity units");
		gd.addNumericField(K.key("patch_size").label(), K.key("patch_size").shownNumber(), 0, 4, "voxels");
		gd.addNumericField(K.key("patches").label(), K.key("patches").shownNumber(), 0, 8, "sampled per side");
		gd.addNumericField(K.key("bootstrap").label(), K.key("bootstrap").shownNumber(), 0, 6, "resamples (0 = no intervals)");
		gd.addNumericField(K.key("seed").label(), K.key("seed").shownNumber(), 0);
		gd.addCheckbox(K.key("ignore_calibration").label(), K.key("ignore_calibration").shownChecked());
		gd.addCheckbox(K.key("estimate_noise").label(), !macro && K.key("estimate_noise").shownChecked());
		gd.addCheckbox(K.key("match_resolution").label(), !macro && K.key("match_resolution").shownChecked());
		gd.addHelp(DialogHelp.compare().html());
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final KeyFields f = new KeyFields(gd, K, PREFS); // read into key → macro text for the one reader of the keys
		f.readChoice("result", "image title");
		f.readText("reference_folder");
		f.readText("reference_images");
		f.readChoice("input", "input (an open image or none)");
		f.readChoice("psf", "PSF (an open image or none)");
		f.readText("offset");
		f.readText("background");
		for (final String n : new String[] { "photons", "read_noise", "patch_size", "patches", "bootstrap", "seed" }) f.readNumber(n);
		for (final String n : new String[] { "ignore_calibration", "estimate_noise", "match_resolution" }) f.readCheckbox(n);
		final Map<String, String> values = f.values();
		final CompareRequest r = CompareRequest.from(values);
		if (!macro) {
			Prefs.set(PREFS + "folder", values.get("reference_folder"));
			Prefs.set(PREFS + "pattern", values.get("reference_images"));
		}
		return r;
	}
}
