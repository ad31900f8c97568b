package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Convolve with PSF...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Convolve with PSF (Parfocal)", name = "parfocal.convolvewithpsf")
public class ConvolveWithPsfCommand extends MenuCommand {

	/** The defaults below are the table's ({@link org.parfocal.command.ConvolveKeys}). */
	private static final org.parfocal.command.KeyTable K = org.parfocal.command.ConvolveKeys.MAIN;

	@Parameter(label = "Object image", persist = false)
	private ImagePlus image;

	@Parameter(label = "PSF", persist = false)
	private ImagePlus psf;

	@Parameter(choices = { "mirror", "zero", "periodic" }, persist = false)
	private String boundary = K.key("boundary").defaultValue();

	@Parameter(label = "Normalize PSF to unit sum", persist = false)
	private boolean normalize;

	@Parameter(min = "0", persist = false)
	private Double background = K.key("background").defaultNumber();

	@Parameter(min = "0", label = "Photons per unit (0 = no noise)", persist = false)
	private Double photons = K.key("photons").defaultNumber();

	@Parameter(persist = false)
	private Integer seed = (int) K.key("seed").defaultNumber();

	@Parameter(persist = false)
	private Double offset = K.key("offset").defaultNumber();

	@Parameter(persist = false)
	private boolean recentre;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus result;

	@Override
	public String menuLabel() {
		return "Convolve with PSF...";
	}
}
