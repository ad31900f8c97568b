package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Deconvolve...}; with no PSF image the PSF is computed from the optics inputs as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Deconvolve (Parfocal)", name = "parfocal.deconvolve")
public class DeconvolveCommand extends WatchedInputs {

	@Parameter(label = "Stack", persist = false)
	private ImagePlus image;

	@Parameter(required = false, label = "PSF (empty: from the optics)", persist = false)
	private ImagePlus psf;

	@Parameter(description = "richardson-lucy, richardson-lucy-tv, accelerated-richardson-lucy, wiener", persist = false)
	private String method = "accelerated-richardson-lucy"; // the default run (DefaultRun), as a macro line without method

	@Parameter(min = "1", persist = false)
	private Integer iterations = 100;

	@Parameter(min = "0", persist = false)
	private Double regularization = 0.002;

	@Parameter(description = "fixed, relative-change, held-out", persist = false)
	private String stop = "held-out";

	@Parameter(min = "0", persist = false)
	private Double threshold = 0.001;

	@Parameter(persist = false)
	private String edges = "non-circulant";

	@Parameter(description = "auto or a number", persist = false)
	private String offset = "auto";

	@Parameter(description = "dark, auto, fit, fit-smooth or a number", persist = false)
	private String background = "dark"; // DefaultRun.BACKGROUND

	@Parameter(persist = false)
	private boolean plot;

	@Parameter(persist = false)
	private boolean watch;

	@Parameter(persist = false)
	private boolean recentre;

	@Parameter(description = "32-bit or 16-bit (offset and scale recorded)", persist = false)
	private String output = "32-bit";

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus result;

	@Override
	public String menuLabel() {
		return "Deconvolve...";
	}

	@Override
	protected boolean fromOptics() {
		return psf == null;
	}

	@Override
	protected boolean watching() {
		return watch;
	}

	@Override
	protected Map<String, String> extraOptions() {
		return psf == null ? Map.of("psf", org.parfocal.ij1.Deconvolve.FROM_OPTICS) : Map.of();
	}
}
