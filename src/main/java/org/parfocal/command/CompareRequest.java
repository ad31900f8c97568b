package org.parfocal.command;

import java.util.Map;

import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.PatchOptions;
import org.parfocal.quality.ReferenceComparison;

/**
 * What one {@code Compare with Sharp References...} run is asked to do, read from its macro options through
 * {@link CompareKeys} (old names {@code references}, {@code open_references} accepted): the one reader of those keys,
 * for the dialog (in and outside macros), the record's replay and any other front end. {@link CompareRunner} runs it.
 * No {@code ij.*}, no AWT.
 *
 * @param referenceFolder folder whose TIFFs are references ("" for none)
 * @param openReferences wildcard pattern of open image titles used as references ("" for none)
 * @param input the blurred recording the result came from, or {@link #NONE}
 * @param psf the PSF, or {@link #NONE} (χ² needs input and PSF)
 * @param estimateNoise the χ²'s gain and read noise estimated from the input (absent from old macro lines:
 *        {@code photons} and {@code read_noise}, which stay the fallback)
 * @param matchResolution the references blurred to the result's expected resolution before the comparison
 *        ({@link org.parfocal.quality.MatchedResolution}; absent from old macro lines: references as they are)
 */
public record CompareRequest(String result, String referenceFolder, String openReferences, String input, String psf, Level offset, Level background,
		double photons, double readNoise, int patchSize, int patches, int bootstrap, long seed, boolean ignoreCalibration, boolean estimateNoise,
		boolean matchResolution) {

	/** The {@code input=} and {@code psf=} value for none. */
	public static final String NONE = "none";

	public CompareRequest {
		if (referenceFolder.isBlank() && openReferences.isBlank())
			throw new IllegalArgumentException("No reference images given: name a folder of TIFFs (reference_folder=) or a title pattern of open images (reference_images=)");
		if (!(photons > 0) || !Double.isFinite(photons))
			throw new IllegalArgumentException("Photons per unit must be positive, got " + MacroOptions.number(photons) + " (photons=)");
		if (!(readNoise >= 0) || !Double.isFinite(readNoise))
			throw new IllegalArgumentException("Read noise must be 0 or more, got " + MacroOptions.number(readNoise) + " (read_noise=)");
	}

	/**
	 * Reads the options (keys checked and old names translated by {@link CommandKeys#check}, or known to be the
	 * command's; old names are read here too); keys not given take the table's defaults.
	 *
	 * @throws IllegalArgumentException one line naming the key
	 */
	public static CompareRequest from(final Map<String, String> options) {
		final KeyTable.Values v = CompareKeys.MAIN.read(options);
		final double seed = v.number("seed");
		if (seed != Math.rint(seed) || Math.abs(seed) > Long.MAX_VALUE) throw new IllegalArgumentException("Seed must be a whole number, got " + seed + " (seed=)");
		return new CompareRequest(v.text("result"), v.text("reference_folder"), v.text("reference_images"), v.text("input"), v.text("psf"),
				Level.parse("offset", v.text("offset"), false), Level.parse("background", v.text("background"), false), v.number("photons"),
				v.number("read_noise"), v.whole("patch_size"), v.whole("patches"), v.whole("bootstrap"), (long) seed, v.flag("ignore_calibration"),
				v.flag("estimate_noise"), v.flag("match_resolution"));
	}

	/** The options string a macro passes to {@code run("Compare with Sharp References...", ...)} (the record's options). */
	public String macroOptions() {
		return "result=" + MacroOptions.quote(result) + " reference_folder=" + MacroOptions.quote(referenceFolder) + " reference_images="
				+ MacroOptions.quote(openReferences) + " input=" + MacroOptions.quote(input) + " psf=" + MacroOptions.quote(psf) + " offset="
				+ offset.macroValue() + " background=" + background.macroValue() + " photons=" + MacroOptions.number(photons) + " read_noise="
				+ MacroOptions.number(readNoise) + " patch_size=" + patchSize + " patches=" + patches + " bootstrap=" + bootstrap + " seed=" + seed
				+ (ignoreCalibration ? " ignore_calibration" : "") + (estimateNoise ? " estimate_noise" : "") + (matchResolution ? " match_resolution" : "");
	}

	/** The same request comparing voxel for voxel or not. */
	public CompareRequest withIgnoreCalibration(final boolean ignore) {
		return new CompareRequest(result, referenceFolder, openReferences, input, psf, offset, background, photons, readNoise, patchSize, patches, bootstrap,
				seed, ignore, estimateNoise, matchResolution);
	}

	/** The comparison's options: the defaults with this request's patch size, counts, seed and calibration choice. */
	public ReferenceComparison.Options comparison() {
		final ReferenceComparison.Options d = ReferenceComparison.Options.defaults();
		final PatchOptions p = d.patches();
		return d.withPatches(new PatchOptions(patchSize, p.depth(), p.scales(), p.contrastNormalized(), p.volumetric()))
				.withCounts(patches, d.marginalSamples(), bootstrap).withSeed(seed).withIgnoreCalibration(ignoreCalibration);
	}
}
