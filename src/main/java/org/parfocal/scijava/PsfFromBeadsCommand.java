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

	@Parameter(label = "Bead image", persist = false)
	private ImagePlus image;

	@Parameter(min = "0", label = "Box xy (µm; 0 = from the optics)", persist = false)
	private Double box_xy = 0.0;

	@Parameter(min = "0", label = "Box z (µm; 0 = a 2D image, or from the optics)", persist = false)
	private Double box_z = 0.0;

	@Parameter(min = "0", label = "Bead diameter (µm)", persist = false)
	private Double bead_diameter = 0.1;

	@Parameter(min = "0", persist = false)
	private Double threshold = 6.0;

	@Parameter(persist = false)
	private boolean reject_saturated;

	@Parameter(min = "0", persist = false)
	private Double outlier_z = 3.5;

	@Parameter(persist = false)
	private String background = "stack";

	@Parameter(persist = false)
	private String averaging = "mean";

	@Parameter(persist = false)
	private boolean symmetrize;

	@Parameter(min = "0", label = "Voxel xy (µm)", persist = false)
	private Double voxel_xy = 0.0;

	@Parameter(min = "0", label = "Voxel z (µm)", persist = false)
	private Double voxel_z = 0.0;

	@Parameter(persist = false)
	private String optics = "none";

	@Parameter(persist = false)
	private String modality = "widefield";

	@Parameter(label = "NA", persist = false)
	private Double na = 1.4;

	@Parameter(min = "1", persist = false)
	private Double immersion_index = 1.518;

	@Parameter(min = "1", persist = false)
	private Double sample_index = 1.518;

	@Parameter(min = "0", persist = false)
	private Double depth = 0.0;

	@Parameter(min = "0", persist = false)
	private Double emission = 0.52;

	@Parameter(min = "0", persist = false)
	private Double excitation = 0.488;

	@Parameter(min = "0", persist = false)
	private Double pinhole = 1.0;

	@Parameter(min = "0", persist = false)
	private Double sheet_thickness = 2.0;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus result;

	@Override
	public String menuLabel() {
		return "PSF from Beads...";
	}
}
