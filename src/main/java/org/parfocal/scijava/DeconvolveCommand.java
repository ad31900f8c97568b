package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.parfocal.command.DeconvolveKeys;
import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Deconvolve...}; with no PSF image the PSF is computed from the optics inputs as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Deconvolve (Parfocal)", name = "parfocal.deconvolve")
public class DeconvolveCommand extends WatchedInputs {

	/** The defaults below are the table's ({@link DeconvolveKeys}); annotations need constants, so their ranges are checked against it by a test. */
	private static final org.parfocal.command.KeyTable K = DeconvolveKeys.MAIN;


	@Parameter(label = "Stack", persist = false)
	private ImagePlus image;

	@Parameter(required = false, label = "PSF (empty: from the optics)", persist = false)
	private ImagePlus psf;

	@Parameter(description = "richardson-lucy, richardson-lucy-tv, accelerated-richardson-lucy, wiener", persist = false)
	private String method = K.key("method").defaultValue(); // the default run (DefaultRun), as a macro line without method

	@Parameter(min = "1", persist = false)
	private Integer iterations = (int) K.key("iterations").defaultNumber();

	@Parameter(min = "0", persist = false)
	private Double regularization = K.key("regularization").defaultNumber();

	@Parameter(description = "fixed, relative-change, held-out", persist = false)
	private String stop = K.key("stop").defaultValue();

	@Parameter(min = "0", persist = false)
	private Double threshold = K.key("threshold").defaultNumber();

	@Parameter(persist = false)
	private String edges = K.key("edges").defaultValue();

	@Parameter(description = "auto or a number", persist = false)
	private String offset = K.key("offset").defaultValue();

	@Parameter(description = "dark, auto, fit, fit-smooth or a number", persist = false)
	private String background = K.key("background").defaultValue();

	@Parameter(persist = false)
	private boolean plot;

	@Parameter(persist = false)
	private boolean watch;

	@Parameter(persist = false)
	private boolean recentre;

	@Parameter(description = "32-bit or 16-bit (offset and scale recorded)", persist = false)
	private String output = K.key("output").defaultValue();

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
