package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * The deconvolution commands' optics (sent only with {@code psf=from_optics}) and watch-mode keys (sent only with
 * {@code watch}).
 */
public abstract class WatchedInputs extends OpticsInputs {

	@Parameter(min = "1", label = "Watch every (iterations)", persist = false)
	private Integer every = (int) org.parfocal.command.DeconvolveKeys.WATCH.key("every").defaultNumber();

	@Parameter(required = false, style = "directory", persist = false)
	private File reference_folder;

	@Parameter(description = "title pattern of open reference images", persist = false)
	private String reference_images = "";

	@Parameter(min = "0", persist = false)
	private Double photons = org.parfocal.command.DeconvolveKeys.WATCH.key("photons").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double read_noise = org.parfocal.command.DeconvolveKeys.WATCH.key("read_noise").defaultNumber();

	@Parameter(persist = false)
	private boolean stop_at_suggestion;

	@Parameter(persist = false)
	private boolean ignore_calibration;

	@Parameter(persist = false)
	private boolean estimate_noise;

	@Parameter(persist = false)
	private boolean match_resolution;

	/** True when the command computes its PSF from the optics (no PSF image given). */
	protected abstract boolean fromOptics();

	/** True when watch mode is on. */
	protected abstract boolean watching();

	@Override
	protected boolean include(final String key) {
		if (org.parfocal.command.CommandKeys.OPTICS.stream().anyMatch(s -> s.startsWith(key + ":"))) return fromOptics();
		if (org.parfocal.command.CommandKeys.WATCH.stream().anyMatch(s -> s.startsWith(key + ":"))) return watching();
		return true;
	}
}
