package org.parfocal.command;

import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.provenance.MacroOptions;

/**
 * Watch mode's settings, as the keys of {@link DeconvolveKeys#WATCH} describe them (Deconvolve's and Blind
 * Deconvolve's watch dialog): evaluate every {@code every} iterations against the references in
 * {@code referenceFolder} and the open images matching {@code openReferences}, the χ²'s noise model, and whether
 * the suggested iterate is returned. No {@code ij.*}, no AWT.
 */
public record WatchRequest(int every, String referenceFolder, String openReferences, double photons, double readNoise, boolean stopAtSuggestion,
		boolean ignoreCalibration, boolean estimateNoise, boolean matchResolution) {

	public WatchRequest {
		if (every < 1 || every > DeconvolutionOptions.MAX_ITERATIONS)
			throw new IllegalArgumentException("Evaluate every 1 to " + DeconvolutionOptions.MAX_ITERATIONS + " iterations, got " + every + " (every=)");
		if (!(photons > 0) || !Double.isFinite(photons)) throw new IllegalArgumentException("Photons per unit must be positive, got " + photons + " (photons=)");
		if (!(readNoise >= 0) || !Double.isFinite(readNoise)) throw new IllegalArgumentException("Read noise must be 0 or more, got " + readNoise + " (read_noise=)");
	}

	/** The watch settings of a run's options (defaults for keys not given). */
	public static WatchRequest from(final KeyTable.Values v) {
		return new WatchRequest(v.whole("every"), v.text("reference_folder"), v.text("reference_images"), v.number("photons"), v.number("read_noise"),
				v.flag("stop_at_suggestion"), v.flag("ignore_calibration"), v.flag("estimate_noise"), v.flag("match_resolution"));
	}

	/** The same with {@code ignore_calibration} on. */
	public WatchRequest withIgnoreCalibration() {
		return new WatchRequest(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, true, estimateNoise, matchResolution);
	}

	/** The watch dialog's part of a recorded line. */
	public String macroOptions() {
		return "every=" + every + " reference_folder=" + MacroOptions.quote(referenceFolder) + " reference_images=" + MacroOptions.quote(openReferences)
				+ " photons=" + MacroOptions.number(photons) + " read_noise=" + MacroOptions.number(readNoise) + (stopAtSuggestion ? " stop_at_suggestion" : "")
				+ (ignoreCalibration ? " ignore_calibration" : "") + (estimateNoise ? " estimate_noise" : "") + (matchResolution ? " match_resolution" : "");
	}
}
