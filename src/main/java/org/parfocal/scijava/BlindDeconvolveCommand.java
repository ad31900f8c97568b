package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.parfocal.command.BlindKeys;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Blind Deconvolve...}; with no PSF image the start is psf_start (gaussian or from_optics) as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Blind Deconvolve (Parfocal)", name = "parfocal.blinddeconvolve")
public class BlindDeconvolveCommand extends WatchedInputs {

	/** The defaults below are the table's ({@link BlindKeys}); annotations need constants, so their minimums are checked against it by a test. */
	private static final org.parfocal.command.KeyTable K = BlindKeys.MAIN;

	@Parameter(label = "Stack", persist = false)
	private ImagePlus image;

	@Parameter(required = false, label = "Starting PSF (empty: psf_start)", persist = false)
	private ImagePlus psf;

	@Parameter(choices = { "gaussian", "from_optics" }, label = "Start without a PSF image", persist = false)
	private String psf_start = "gaussian";

	@Parameter(min = "0", persist = false)
	private Double fwhm_xy = K.key("fwhm_xy").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double fwhm_z = K.key("fwhm_z").defaultNumber();

	@Parameter(min = "1", persist = false)
	private Integer iterations = (int) K.key("iterations").defaultNumber();

	@Parameter(min = "1", persist = false)
	private Integer object_updates = (int) K.key("object_updates").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Integer psf_updates = (int) K.key("psf_updates").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double object_tv = K.key("object_tv").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double psf_tv = K.key("psf_tv").defaultNumber();

	@Parameter(persist = false)
	private String estimate = K.key("estimate").defaultValue();

	@Parameter(min = "0", persist = false)
	private Double trust_radius = K.key("trust_radius").defaultNumber();

	@Parameter(persist = false)
	private boolean band_limit;

	@Parameter(persist = false)
	private boolean symmetric;

	@Parameter(persist = false)
	private boolean centring;

	@Parameter(min = "0", persist = false)
	private Double support_xy = K.key("support_xy").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double support_z = K.key("support_z").defaultNumber();

	@Parameter(persist = false)
	private String support_units = K.key("support_units").defaultValue();

	@Parameter(min = "1", persist = false)
	private Integer snapshot_interval = (int) K.key("snapshot_interval").defaultNumber();

	@Parameter(persist = false)
	private String edges = K.key("edges").defaultValue();

	@Parameter(description = "auto or a number", persist = false)
	private String offset = K.key("offset").defaultValue();

	@Parameter(description = "auto or a number", persist = false)
	private String background = K.key("background").defaultValue();

	@Parameter(persist = false)
	private boolean watch;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus result;

	@Parameter(type = ItemIO.OUTPUT, label = "Estimated PSF")
	private ImagePlus estimated_psf;

	@Parameter(type = ItemIO.OUTPUT, label = "PSF history")
	private ImagePlus psf_history;

	@Override
	public String menuLabel() {
		return "Blind Deconvolve...";
	}

	@Override
	protected boolean fromOptics() {
		return psf == null && !"gaussian".equals(psf_start);
	}

	@Override
	protected boolean include(final String key) {
		// the band-limit dialog reads na, immersion_index and emission too
		if (band_limit && (key.equals("na") || key.equals("immersion_index") || key.equals("emission"))) return true;
		return super.include(key);
	}

	@Override
	protected boolean watching() {
		return watch;
	}

	@Override
	protected Map<String, String> extraOptions() {
		return psf == null ? Map.of("psf", psf_start == null ? "gaussian" : psf_start) : Map.of();
	}

	@Override
	protected void collect(final List<ImagePlus> created, final ImagePlus current) {
		super.collect(created, current);
		for (final ImagePlus imp : created) {
			if (imp.getTitle().contains("-blind-psf-history")) psf_history = imp;
			else if (imp.getTitle().contains("-blind-psf")) estimated_psf = imp;
		}
	}
}
