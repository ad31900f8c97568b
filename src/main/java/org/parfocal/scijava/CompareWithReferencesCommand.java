package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Compare with Sharp References...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Compare with Sharp References (Parfocal)", name = "parfocal.comparewithreferences")
public class CompareWithReferencesCommand extends MenuCommand {

	/** The defaults below are the table's ({@link org.parfocal.command.CompareKeys}). */
	private static final org.parfocal.command.KeyTable K = org.parfocal.command.CompareKeys.MAIN;

	@Parameter(label = "Result", persist = false)
	private ImagePlus result;

	@Parameter(required = false, style = "directory", persist = false)
	private File reference_folder;

	@Parameter(description = "title pattern of open reference images", persist = false)
	private String reference_images = K.key("reference_images").defaultValue();

	@Parameter(required = false, label = "Input stack (re-blur check)", persist = false)
	private ImagePlus input;

	@Parameter(required = false, label = "PSF (re-blur check)", persist = false)
	private ImagePlus psf;

	@Parameter(description = "auto or a number", persist = false)
	private String offset = K.key("offset").defaultValue();

	@Parameter(description = "auto or a number", persist = false)
	private String background = K.key("background").defaultValue();

	@Parameter(min = "0", persist = false)
	private Double photons = K.key("photons").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double read_noise = K.key("read_noise").defaultNumber();

	@Parameter(min = "1", persist = false)
	private Integer patch_size = (int) K.key("patch_size").defaultNumber();

	@Parameter(min = "1", persist = false)
	private Integer patches = (int) K.key("patches").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Integer bootstrap = (int) K.key("bootstrap").defaultNumber();

	@Parameter(persist = false)
	private Integer seed = (int) K.key("seed").defaultNumber();

	@Parameter(persist = false)
	private boolean ignore_calibration;

	@Parameter(persist = false)
	private boolean estimate_noise;

	@Parameter(persist = false, description = "blur the references to the result's expected resolution (PSF FWHM / 2)")
	private boolean match_resolution;

	@Override
	public String menuLabel() {
		return "Compare with Sharp References...";
	}

}
