package org.parfocal.command;

import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DefaultRun;
import org.parfocal.deconv.EdgeMode;

/**
 * The keys of {@code Deconvolve...} and of its two second dialogs, PSF from Optics ({@link #OPTICS}, also the
 * whole of {@code PSF from Optics...} but its {@code show_profiles}) and the watch ({@link #WATCH}, shared with
 * Blind Deconvolve), each described once ({@link Key}). Defaults of the default run come from
 * {@link DefaultRun}, where they were chosen on the independent scenes.
 */
public final class DeconvolveKeys {

	private DeconvolveKeys() {}

	/** "a number, auto or 0": the values an offset or background takes. */
	public static final String LEVEL = "a number, <code>auto</code> (estimated from the data) or 0 (none)";

	/** The edge modes in words. */
	public static final String EDGES = "<code>extended</code> (default; the old value <code>non-circulant</code> still works): the object is estimated "
			+ "on a domain larger than the stack, so light from just outside the field is accounted for and the edges do not ring "
			+ "(Bertero &amp; Boccacci, Astron. Astrophys. 2005); <code>periodic</code>: the stack repeats itself (fast, rings at real edges); "
			+ "<code>zero</code>: nothing outside (for comparison with other software)";

	/** The main dialog of Deconvolve, in dialog order. */
	public static final KeyTable MAIN = KeyTable.of("Deconvolve")
			.text("image", "Image:", "", "", "the recording (widefield, confocal or light-sheet stack; RGB is refused)")
			.text("psf", "PSF:", "", "", "an open PSF (one for all channels, or one channel per image channel), or <code>from_optics</code> "
					+ "to compute it from the optics in the next dialog")
			.word("method", "Method:", DefaultRun.METHOD.key(), "<code>richardson-lucy</code> (Richardson 1972, Lucy 1974); <code>richardson-lucy-tv</code> with "
					+ "total variation against noise (Dey et al., Microsc. Res. Tech. 2006); <code>accelerated-richardson-lucy</code> "
					+ "(Biggs &amp; Andrews, Appl. Opt. 1997; the default); <code>wiener</code>: one-step linear filter")
			.number("iterations", "Iterations:", DefaultRun.CAP, 1, DeconvolutionOptions.MAX_ITERATIONS, "",
					"number of iterations; with Stop = relative-change or held-out, the most it may run")
			.number("regularization", "Regularization:", 0.002, 0, Double.NaN, "", "weight of total variation (richardson-lucy-tv, at most "
					+ DeconvolutionOptions.MAX_TV_WEIGHT + ") or of the Wiener filter (above 0); ignored by the other methods. Larger = smoother")
			.word("stop", "Stop:", DefaultRun.stop(false).key(), "<code>fixed</code>: run all iterations; <code>relative-change</code>: stop when the iterate changes less than Threshold; "
					+ "<code>held-out</code> (default): the photons are split at random into two halves, the method runs on each half and "
					+ "stops where its iterate, re-blurred, is closest to the other half at the frequencies the optics pass (cross-validation, "
					+ "Coakley, IEEE Trans. Nucl. Sci. 1991); the full data then get 1.17 times that many iterations. The Log says when no interior peak was found within Iterations. A macro line that gives "
					+ "<code>iterations</code> without <code>stop</code> runs them all (<code>fixed</code>), as before")
			.number("threshold", "Threshold:", 0.001, Double.NaN, Double.NaN, "relative change",
					"relative change between two iterates below which the run stops (with relative-change only; strictly between 0 and 1)")
			.word("edges", "Edges:", EdgeMode.NON_CIRCULANT.key(), "what lies past the stack's edges: " + EDGES)
			.text("offset", "Offset:", "auto", "intensity units", "camera offset subtracted first: " + LEVEL + "; auto = the 0.1 % quantile")
			.text("background", "Background:", DefaultRun.BACKGROUND, "intensity units", "constant b in the image model H&middot;x + b: " + LEVEL
					+ "; auto = sigma-clipped median after the offset; <code>dark</code> = the darkest region (<code>auto</code> takes "
					+ "out-of-focus light for background); <code>dark-or-median</code> = the larger of the two; <code>by-psf</code> (the default) = "
					+ "<code>dark</code> for a PSF that keeps its light out of focus (widefield), <code>dark-or-median</code> for one whose outer "
					+ "planes hold less than a quarter of its brightest plane's light and whose box edge is dim (confocal-like); <code>fit</code> = fitted with the object inside Richardson&ndash;Lucy (maximum-likelihood "
					+ "EM step, Shepp &amp; Vardi 1982; the fitted value goes into the Log and the provenance); <code>fit-smooth</code> = a slowly "
					+ "varying background fitted the same way (piecewise linear over a 3 &times; 3 &times; 2 grid)")
			.word("output", "Output:", "32-bit", "<code>32-bit</code> (default; left out of recorded lines and records, so a macro without the key gets it): the computed values; <code>16-bit</code>: "
					+ "for tools that expect camera-like data, stored as value = offset + scale &times; stored, with offset (the smallest value) "
					+ "and scale (the range &divide; 65535) in the record, the Info and ImageJ's calibration; each value is within half a step "
					+ "(scale &divide; 2) of the 32-bit one")
			.flag("plot", "Plot convergence", true, "show the relative change per iteration")
			.flag("watch", "Watch quality every few iterations (next dialog)", false,
					"every few iterations, compare the iterate with sharp references and the data (next dialog)")
			.flag("recentre", "Recentre the PSF (shift its centre of mass to the centre voxel)", false,
					"shift an open PSF so its centre of mass sits on the centre voxel (a PSF off centre shifts the result)")
			.build();

	/** The optics, in dialog order: PSF from Optics' fields but {@code show_profiles}, also the second dialog of Deconvolve and Blind Deconvolve. */
	public static final KeyTable OPTICS = KeyTable.of("PSF from Optics")
			.word("model", "Model:", "gibson-lanni", "<code>gaussian</code>: Gaussian fit to the widefield/confocal PSF (Zhang et al., Appl. Opt. 2007); "
					+ "<code>born-wolf</code>: scalar diffraction, in focus in a matched sample; <code>gibson-lanni</code>: scalar, with the "
					+ "aberration of a sample or coverslip that differs from what the objective was made for, growing with depth "
					+ "(Gibson &amp; Lanni, J. Opt. Soc. Am. A 1991); <code>richards-wolf</code>: vectorial, for high NA (Richards &amp; Wolf, "
					+ "Proc. R. Soc. A 1959)")
			.word("modality", "Modality:", "widefield", "<code>widefield</code>, <code>confocal</code> (pinhole), <code>two-photon</code> "
					+ "(excitation only) or <code>light-sheet</code> (sheet thickness)")
			.number("na", "NA:", 1.4, Double.NaN, Double.NaN, "", "numerical aperture of the objective; below the immersion index")
			.number("immersion_index", "Immersion_index:", 1.518, 1, Double.NaN, "",
					"refractive index of the immersion medium actually used (oil 1.518, water 1.333, glycerol 1.47)")
			.number("sample_index", "Sample_index:", 1.518, 1, Double.NaN, "",
					"refractive index of the sample around the emitters (the models without depth aberration use it only to size an automatic box)")
			.number("coverslip_index", "Coverslip_index:", 1.522, 1, Double.NaN, "", "refractive index of the coverslip used")
			.number("coverslip_thickness", "Coverslip_thickness:", 170, 0, Double.NaN, "&micro;m", "thickness of the coverslip used (No. 1.5: 170)")
			.number("depth", "Depth:", 0, 0, Double.NaN, "&micro;m",
					"depth of the emitters below the coverslip (the models without depth aberration use it only to size an automatic box)")
			.number("immersion_index_design", "Immersion_index_design:", 1.518, 1, Double.NaN, "", "immersion index the objective is corrected for (printed on it)")
			.number("coverslip_index_design", "Coverslip_index_design:", 1.522, 1, Double.NaN, "", "coverslip index the objective is corrected for")
			.number("coverslip_thickness_design", "Coverslip_thickness_design:", 170, 0, Double.NaN, "&micro;m",
					"coverslip thickness the objective is corrected for (on the barrel)")
			.number("working_distance", "Working_distance:", 150, 0, Double.NaN, "&micro;m", "free working distance of the objective")
			.number("emission", "Emission:", 0.52, 0, Double.NaN, "&micro;m", "emission wavelength (e.g. 0.52 for a green dye)")
			.number("excitation", "Excitation:", 0.488, 0, Double.NaN, "&micro;m", "excitation wavelength; used by confocal and two-photon only")
			.number("pinhole", "Pinhole:", 1, 0, Double.NaN, "Airy units", "pinhole diameter; used by confocal only")
			.number("sheet_thickness", "Sheet_thickness:", 2, 0, Double.NaN, "&micro;m (FWHM)", "thickness of the light sheet; used by light-sheet only")
			.number("voxel_xy", "Voxel_xy:", 0, 0, Double.NaN, "&micro;m",
					"lateral voxel size of the stack to be deconvolved (the dialog takes it from the current image; the command line needs it)")
			.number("voxel_z", "Voxel_z:", 0, 0, Double.NaN, "&micro;m", "axial step of the stack")
			.number("size_xy", "Size_xy:", 0, 0, Double.NaN, "voxels (odd)", "PSF width; 0 = enough for the model's rings (from the optics)")
			.number("size_z", "Size_z:", 0, 0, Double.NaN, "voxels (odd)", "PSF depth; 0 = from the optics")
			.build();

	/** The watch-mode dialog of Deconvolve and Blind Deconvolve. */
	public static final KeyTable WATCH = KeyTable.of("Watch quality")
			.number("every", "Every:", 5, 1, DeconvolutionOptions.MAX_ITERATIONS, "iterations", "evaluate every this many iterations")
			.text("reference_folder", "Reference_folder:", "", "folder", "folder whose .tif/.tiff files are the sharp references; may be empty "
					+ "(formerly <code>references</code>)", "references")
			.text("reference_images", "Reference_images:", "", "title pattern", "open images whose title matches (* and ? wildcards); may be empty "
					+ "(formerly <code>open_references</code>)", "open_references")
			.number("photons", "Photons:", 1, Double.NaN, Double.NaN, "photons per intensity unit",
					"noise model of the chi-square (1 = the data are photon counts; above 0)")
			.number("read_noise", "Read_noise:", 0, 0, Double.NaN, "intensity units (&sigma;)", "camera read noise")
			.flag("stop_at_suggestion", "Stop_at_suggestion (return the suggested iterate)", false,
					"return the suggested iterate instead of the last one (kept in memory during the run)")
			.flag("ignore_calibration", "Ignore_calibration of the references", false,
					"compare voxel for voxel when the references' calibration is missing or differs")
			.flag("estimate_noise", "Estimate_noise from the recording (camera gain and read noise, instead of Photons and Read_noise)", true,
					"take the camera gain and read noise of the chi-square from the recording itself "
							+ "(Poisson&ndash;Gaussian fit of the local variance against the local mean, Foi et al., IEEE TIP 2008) instead of Photons and "
							+ "Read_noise, which stay the fallback when the fit fails; the values go into the Log and the provenance. Ticked in the "
							+ "dialog; absent from a macro line: the given values")
			.flag("match_resolution", "Match_resolution (blur the references to the result's expected resolution)", false,
					"blur each reference to the result's expected resolution (the PSF's FWHM / 2; "
							+ "Blind Deconvolve: the recording's apparent FWHM / 2) before comparing, so references much sharper than any result can be "
							+ "(another modality, finer pixels) cannot favour the noisiest iterate. Off by default: on independent test scenes with sharp "
							+ "references on the recording's grid it changed 6 of 20 suggested stops, 5 of them for the worse (by 4.4&ndash;6.5 dB), one for the better (1.5 dB); "
							+ "tick it for references of another modality or much finer pixels")
			.build();
}
