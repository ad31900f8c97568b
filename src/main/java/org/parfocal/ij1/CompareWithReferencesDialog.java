package org.parfocal.ij1;

import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.command.CompareKeys;
import org.parfocal.command.KeyTable;
import org.parfocal.deconv.Level;
import org.parfocal.ij1.CompareWithReferences.Options;

/** Compare with Sharp References' dialog → {@link Options}: fields, labels and first-use defaults from {@link CompareKeys}. */
final class CompareWithReferencesDialog {

	private static final String PREFS = "parfocal.compare.";

	private CompareWithReferencesDialog() {}

	/** The dialog; in a macro, keys not given take the table's defaults (the folder and pattern are remembered only outside macros). */
	static Options show() {
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
		final String result = Commands.checkChoice("result", gd.getNextChoice(), "image title");
		final String folder = gd.getNextString().trim(), pattern = gd.getNextString().trim();
		final String input = Commands.checkChoice("input", gd.getNextChoice(), "input (an open image or none)");
		final String psf = Commands.checkChoice("psf", gd.getNextChoice(), "PSF (an open image or none)");
		final Level offset = Deconvolve.level("offset", gd.getNextString().trim()), background = Deconvolve.level("background", gd.getNextString().trim());
		final double photons = Commands.number(gd, "photons"), readNoise = Commands.number(gd, "read_noise");
		final double size = Commands.number(gd, "patch_size"), patches = Commands.number(gd, "patches"), boot = Commands.number(gd, "bootstrap");
		final double seed = Commands.number(gd, "seed");
		final boolean ignore = gd.getNextBoolean(), estimate = gd.getNextBoolean(), match = gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		for (final double v : new double[] { size, patches, boot, seed })
			if (v != Math.rint(v)) throw new IllegalArgumentException("Patch size, patches, bootstrap and seed must be whole numbers, got " + v);
		if (!macro) {
			Prefs.set(PREFS + "folder", folder);
			Prefs.set(PREFS + "pattern", pattern);
		}
		return new Options(result, folder, pattern, input, psf, offset, background, photons, readNoise, (int) size, (int) patches, (int) boot, (long) seed,
				ignore, estimate, match);
	}
}
