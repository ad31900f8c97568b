package org.parfocal.command;

import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.FitPlan;
import org.parfocal.deconv.EdgeMode;

/**
 * The keys of {@code Blind Deconvolve...}: its main dialog ({@link #MAIN}) and the optics the band limit asks for
 * when the start is not computed from them ({@link #BAND}); the optics and the watch are Deconvolve's
 * ({@link DeconvolveKeys#OPTICS}, {@link DeconvolveKeys#WATCH}). Each key is described once ({@link Key}).
 */
public final class BlindKeys {

	private BlindKeys() {}

	/** The main dialog of Blind Deconvolve, in dialog order (headings: Schedule, PSF constraints, Output and data, How the PSF is estimated). */
	public static final KeyTable MAIN = KeyTable.of("Blind Deconvolve")
			.text("image", "Image:", "", "", "the recording")
			.text("psf", "PSF:", "", "", "the starting estimate: an open PSF, <code>from_optics</code> (next dialog) or <code>gaussian</code> (the two widths below)")
			.number("fwhm_xy", "FWHM_xy:", 0.25, Double.NaN, Double.NaN, "&micro;m", "lateral full width at half maximum of a gaussian start (ignored otherwise)")
			.number("fwhm_z", "FWHM_z:", 0.7, Double.NaN, Double.NaN, "&micro;m", "axial FWHM of a gaussian start (ignored otherwise)")
			.number("iterations", "Iterations:", BlindOptions.DEFAULT_ITERATIONS, 1, BlindOptions.MAX_ITERATIONS, "",
					"outer iterations (each updates the object, then the PSF)")
			.number("object_updates", "Object_updates:", 1, 1, BlindOptions.MAX_UPDATES, "", "object updates per outer iteration")
			.number("psf_updates", "PSF_updates:", 1, 0, BlindOptions.MAX_UPDATES, "", "PSF updates per outer iteration; 0 keeps the PSF fixed")
			.number("object_tv", "Object_TV:", BlindOptions.DEFAULT_OBJECT_TV, 0, BlindOptions.MAX_TV_WEIGHT, "", "total-variation weight of the object (against noise)")
			.number("psf_tv", "PSF_TV:", 0, 0, BlindOptions.MAX_TV_WEIGHT, "", "total-variation weight of the PSF (0 = none)")
			.flag("band_limit", "Band_limit (optical cutoff 2 NA / wavelength; widefield)", true,
					"remove PSF frequencies above the widefield cutoff 2&middot;NA/&lambda; (asks for NA, immersion index and emission unless the start is from_optics)")
			.flag("symmetric", "Symmetric (cylindrical about the optical axis)", false, "keep the PSF cylindrically symmetric about the optical axis")
			.flag("centring", "Centring (keep the centre of mass of the start)", true, "keep the PSF's centre of mass where the start had it")
			.number("support_xy", "Support_xy:", 0, 0, Double.NaN, "Support_units", "width of the box the PSF lives in; 0 = automatic (the start's extent)")
			.number("support_z", "Support_z:", 0, 0, Double.NaN, "Support_units", "depth of the box; 0 = automatic")
			.word("support_units", "Support_units:", "voxels", "<code>voxels</code> (odd sizes) or <code>microns</code>")
			.number("snapshot_interval", "Snapshot_interval:", BlindOptions.DEFAULT_SNAPSHOT_INTERVAL, 1, Double.NaN, "iterations",
					"iterations between frames of the PSF history (at most Iterations)")
			.word("edges", "Edges:", EdgeMode.NON_CIRCULANT.key(), DeconvolveKeys.EDGES)
			.text("offset", "Offset:", "auto", "intensity units", "camera offset subtracted first: " + DeconvolveKeys.LEVEL + "; auto = the 0.1 % quantile")
			.text("background", "Background:", "dark", "intensity units", "constant b in the image model H&middot;x + b: " + DeconvolveKeys.LEVEL
					+ "; <code>dark</code> (the default since 2026-12-04) = the darkest region after the offset, which leaves out-of-focus light to the object; "
					+ "auto = sigma-clipped median after the offset")
			.word("estimate", "Estimate:", "free-form", "<code>free-form</code> (voxel by voxel), <code>model-fit</code> (fit the PSF model's parameters, "
					+ "scored on held-out data), <code>model-fit-refined</code> (then free-form within the trust radius); "
					+ "<code>widefield-fit</code> / <code>widefield-fit-refined</code>: the same, but a Gaussian start is fitted as a widefield shape "
					+ "(Born &amp; Wolf of the start's widths, which holds the out-of-focus cone a Gaussian lacks)")
			.number("trust_radius", "Trust_radius:", FitPlan.DEFAULT_TRUST_RADIUS, Double.NaN, 1, "",
					"largest relative distance of a refined PSF to the fitted model (above 0)")
			.flag("watch", "Watch quality every few iterations (next dialog)", false, "the watch dialog of Deconvolve, on the object with the current PSF estimate")
			.build();

	/** The optics the band limit needs when the start is not computed from them (a subset of {@link DeconvolveKeys#OPTICS}' keys). */
	public static final KeyTable BAND = KeyTable.of("Optics for the band limit")
			.number("na", "NA:", 1.4, Double.NaN, Double.NaN, "", "numerical aperture of the objective")
			.number("immersion_index", "Immersion_index:", 1.518, Double.NaN, Double.NaN, "", "immersion medium index (oil 1.518, water 1.333)")
			.number("emission", "Emission:", 0.52, Double.NaN, Double.NaN, "&micro;m", "emission wavelength")
			.build();
}
