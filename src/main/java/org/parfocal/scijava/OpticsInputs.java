package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** The optics keys that {@code PSF from Optics...} and the deconvolution commands' optics dialog share. */
public abstract class OpticsInputs extends MenuCommand {

	@Parameter(label = "PSF model", description = "gibson-lanni, born-wolf, gaussian, ... (from_optics only)", persist = false)
	private String model = "gibson-lanni";

	@Parameter(description = "widefield, confocal, two-photon, light-sheet, ...", persist = false)
	private String modality = "widefield";

	@Parameter(label = "NA", min = "0.01", max = "1.7", persist = false)
	private Double na = 1.4;

	@Parameter(min = "1", persist = false)
	private Double immersion_index = 1.518;

	@Parameter(min = "1", persist = false)
	private Double immersion_index_design = 1.518;

	@Parameter(min = "1", persist = false)
	private Double sample_index = 1.518;

	@Parameter(min = "1", persist = false)
	private Double coverslip_index = 1.522;

	@Parameter(min = "1", persist = false)
	private Double coverslip_index_design = 1.522;

	@Parameter(min = "0", label = "Coverslip thickness (µm)", persist = false)
	private Double coverslip_thickness = 170.0;

	@Parameter(min = "0", label = "Coverslip thickness design (µm)", persist = false)
	private Double coverslip_thickness_design = 170.0;

	@Parameter(min = "0", label = "Working distance (µm)", persist = false)
	private Double working_distance = 150.0;

	@Parameter(min = "0", label = "Depth below the coverslip (µm)", persist = false)
	private Double depth = 0.0;

	@Parameter(min = "0", label = "Emission wavelength (µm)", persist = false)
	private Double emission = 0.52;

	@Parameter(min = "0", label = "Excitation wavelength (µm)", persist = false)
	private Double excitation = 0.488;

	@Parameter(min = "0", label = "Pinhole (Airy units)", persist = false)
	private Double pinhole = 1.0;

	@Parameter(min = "0", label = "Sheet thickness FWHM (µm)", persist = false)
	private Double sheet_thickness = 2.0;

	@Parameter(persist = false, label = "Voxel xy (µm; NaN = from the image)")
	private Double voxel_xy = Double.NaN;

	@Parameter(persist = false, label = "Voxel z (µm; NaN = from the image)")
	private Double voxel_z = Double.NaN;

	@Parameter(min = "0", label = "Size xy (voxels, odd; 0 = from the optics)", persist = false)
	private Integer size_xy = 0;

	@Parameter(min = "0", label = "Size z (voxels, odd; 0 = from the optics)", persist = false)
	private Integer size_z = 0;
}
