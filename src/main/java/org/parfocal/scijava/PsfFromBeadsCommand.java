package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code PSF from Beads...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "PSF from Beads (Parfocal)", name = "parfocal.psffrombeads")
public class PsfFromBeadsCommand extends MenuCommand {

	/** The defaults below are the table's ({@link org.parfocal.command.BeadsKeys}). */
	private static final org.parfocal.command.KeyTable K = org.parfocal.command.BeadsKeys.MAIN;

	@Parameter(label = "Bead image", persist = false)
	private ImagePlus image;

	@Parameter(min = "0", label = "Box xy (µm; 0 = from the optics)", persist = false)
	private Double box_xy = K.key("box_xy").defaultNumber();

	@Parameter(min = "0", label = "Box z (µm; 0 = a 2D image, or from the optics)", persist = false)
	private Double box_z = K.key("box_z").defaultNumber();

	@Parameter(min = "0", label = "Bead diameter (µm)", persist = false)
	private Double bead_diameter = K.key("bead_diameter").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double threshold = K.key("threshold").defaultNumber();

	@Parameter(persist = false)
	private boolean reject_saturated;

	@Parameter(min = "0", persist = false)
	private Double outlier_z = K.key("outlier_z").defaultNumber();

	@Parameter(persist = false)
	private String background = K.key("background").defaultValue();

	@Parameter(persist = false)
	private String averaging = K.key("averaging").defaultValue();

	@Parameter(persist = false)
	private boolean symmetrize;

	@Parameter(min = "0", label = "Voxel xy (µm)", persist = false)
	private Double voxel_xy = K.key("voxel_xy").defaultNumber();

	@Parameter(min = "0", label = "Voxel z (µm)", persist = false)
	private Double voxel_z = K.key("voxel_z").defaultNumber();

	@Parameter(persist = false)
	private String optics = K.key("optics").defaultValue();

	@Parameter(persist = false)
	private String modality = K.key("modality").defaultValue();

	@Parameter(label = "NA", persist = false)
	private Double na = K.key("na").defaultNumber();

	@Parameter(min = "1", persist = false)
	private Double immersion_index = K.key("immersion_index").defaultNumber();

	@Parameter(min = "1", persist = false)
	private Double sample_index = K.key("sample_index").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double depth = K.key("depth").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double emission = K.key("emission").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double excitation = K.key("excitation").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double pinhole = K.key("pinhole").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double sheet_thickness = K.key("sheet_thickness").defaultNumber();

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus result;

	@Override
	public String menuLabel() {
		return "PSF from Beads...";
	}
}
