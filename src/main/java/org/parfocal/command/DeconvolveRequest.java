package org.parfocal.command;

import java.util.Map;

import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DefaultRun;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;

/**
 * What one {@code Deconvolve...} run is asked to do, read from its macro options through {@link DeconvolveKeys}:
 * the one reader of those keys, used alike by the dialog (in and outside macros), the command line, the cluster
 * runner and the record's replay. No {@code ij.*}, no AWT.
 *
 * @param image the recording's title or file
 * @param psf the PSF's title or file, or {@link #FROM_OPTICS}
 * @param optics the PSF from the optics (with {@code psf=from_optics}), else null
 * @param deconvolution method, iterations, stopping, edges and levels
 * @param plot show the convergence plot
 * @param watch watch mode (its own keys, {@link DeconvolveKeys#WATCH})
 * @param recentre shift an open PSF's centre of mass to its centre voxel
 * @param output {@code 32-bit} or {@code 16-bit}
 */
public record DeconvolveRequest(String image, String psf, OpticsRequest optics, DeconvolutionOptions deconvolution, boolean plot, boolean watch,
		boolean recentre, String output) {

	/** The {@code psf=} value that computes the PSF from the optics. */
	public static final String FROM_OPTICS = "from_optics";

	/**
	 * Reads the options (keys checked and old names translated by {@link CommandKeys#check}, or known to be the
	 * command's); keys not given take the table's defaults. The optics are read only with {@code psf=from_optics}.
	 *
	 * @throws IllegalArgumentException one line naming the key
	 */
	public static DeconvolveRequest from(final Map<String, String> options) {
		final KeyTable.Values v = DeconvolveKeys.MAIN.read(options);
		final String psf = v.text("psf");
		final OpticsRequest optics = FROM_OPTICS.equalsIgnoreCase(psf) ? OpticsRequest.from(DeconvolveKeys.OPTICS.read(options)) : null;
		return new DeconvolveRequest(v.text("image"), psf, optics, deconvolution(v), v.flag("plot"), v.flag("watch"), v.flag("recentre"),
				v.text("output"));
	}

	/**
	 * The deconvolution options of a run. A line without {@code stop} gets the default run's rule
	 * ({@link DefaultRun#stop}: fixed when it gives its iterations); the threshold matters only to the
	 * relative-change stop, so another stop with a threshold out of (0, 1) keeps the default one.
	 */
	public static DeconvolutionOptions deconvolution(final KeyTable.Values v) {
		final DeconvolutionMethod method = DeconvolutionMethod.parse(v.text("method"));
		final Stopping stop = Stopping.parse(v.given("stop") ? v.text("stop") : DefaultRun.stop(v.given("iterations")).key());
		final double threshold = v.number("threshold");
		final double usedThreshold = stop == Stopping.RELATIVE_CHANGE || threshold > 0 && threshold < 1 ? threshold
				: DeconvolveKeys.MAIN.key("threshold").defaultNumber();
		return new DeconvolutionOptions(method, v.whole("iterations"), v.number("regularization"), stop, usedThreshold, EdgeMode.parse(v.text("edges")),
				Level.parse("offset", v.text("offset"), false), Level.parse("background", v.text("background"), true));
	}
}
