package org.parfocal.command;

/** The keys of {@code Compare with Sharp References...}, in dialog order, each described once ({@link Key}). */
public final class CompareKeys {

	private CompareKeys() {}

	public static final KeyTable MAIN = KeyTable.of("Compare with Sharp References")
			.text("result", "Result:", "", "", "the image to judge")
			.text("reference_folder", "Reference_folder:", "", "folder", "folder of sharp reference .tif/.tiff files; may be empty "
					+ "(formerly <code>references</code>)", "references")
			.text("reference_images", "Reference_images:", "", "title pattern", "open images whose title matches (* and ? wildcards) "
					+ "(formerly <code>open_references</code>)", "open_references")
			.text("input", "Input:", "none", "", "the blurred recording the result came from, or <code>none</code>")
			.text("psf", "PSF:", "none", "", "the PSF used, or <code>none</code>; with Input: the re-blur chi-square and whiteness")
			.text("offset", "Offset:", "auto", "intensity units", "camera offset of the input: " + DeconvolveKeys.LEVEL)
			.text("background", "Background:", "auto", "intensity units", "background of the input: " + DeconvolveKeys.LEVEL)
			.number("photons", "Photons:", 1, Double.NaN, Double.NaN, "photons per intensity unit", "noise model of the input (1 = photon counts; above 0)")
			.number("read_noise", "Read_noise:", 0, 0, Double.NaN, "intensity units (&sigma;)", "camera read noise of the input")
			.number("patch_size", "Patch_size:", 7, Double.NaN, Double.NaN, "voxels", "edge of the cubic (or square) patches compared")
			.number("patches", "Patches:", 8192, Double.NaN, Double.NaN, "", "patches sampled from each side")
			.number("bootstrap", "Bootstrap:", 50, Double.NaN, Double.NaN, "resamples", "resamples for the intervals; 0 = no intervals")
			.number("seed", "Seed:", 1, Double.NaN, Double.NaN, "", "seed of the sampling (same seed, same figures)")
			.flag("ignore_calibration", "Ignore_calibration (compare voxel for voxel)", false,
					"compare voxel for voxel when calibrations are missing or differ")
			.flag("estimate_noise", "Estimate_noise from the input (camera gain and read noise, instead of Photons and Read_noise)", true,
					"take the chi-square's camera gain and read noise from the input itself "
							+ "(Poisson&ndash;Gaussian fit, Foi et al., IEEE TIP 2008) instead of Photons and Read_noise (the fallback; values in the Log). "
							+ "Absent from a macro line: the given values")
			.flag("match_resolution", "Match_resolution (blur the references to the result's expected resolution: PSF FWHM / 2)", true,
					"blur each reference to the result's expected resolution before the "
							+ "comparison: the PSF's FWHM / 2 (else the input's apparent FWHM / 2), so that references sharper than any result can be "
							+ "(another modality, much finer pixels) cannot rank a blurrier or noisier result higher. Absent from a macro line: "
							+ "references as they are")
			.build();
}
