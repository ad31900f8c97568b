package org.parfocal.ij1;

import java.util.List;
import java.util.Locale;

import org.parfocal.core.Volume;
import org.parfocal.ij1.Deconvolve.Watch;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.StoppingRule;
import org.parfocal.quality.WatchedRun;

/**
 * Watch mode's side of a run (Deconvolve, Blind Deconvolve, Compare with References' χ²): the noise model of the
 * χ² for a recording, and the facts the record keeps (rule, suggestions, returned iterate, curves).
 */
final class WatchFacts {

	private WatchFacts() {}

	/**
	 * {photons per unit, read noise} of the χ² for one recording: estimated from it with
	 * {@code w.estimateNoise()} ({@link org.parfocal.quality.ReblurConsistency.NoiseModel#fromCamera}; the
	 * given values when that fails, with a note), else the given values.
	 */
	static double[] noise(final Watch w, final Volume recording, final double offset, final List<String> notes) {
		return org.parfocal.command.ChiSquareNoise.of(w.estimateNoise(), w.photons(), w.readNoise(), recording, offset, notes);
	}

	/**
	 * With {@code match_resolution}: the resolution the references are blurred to before the comparison, from the
	 * PSF ({@link org.parfocal.quality.MatchedResolution#expectedFromPsf}) or, without one (Blind Deconvolve), from the
	 * recording's apparent FWHM; a note says which. Null when the key is off or the resolution cannot be measured
	 * (then a note says the references were compared as they are).
	 */
	static org.parfocal.quality.MatchedResolution expected(final Watch w, final Volume recording, final Volume psf, final List<String> notes) {
		if (!w.matchResolution()) return null;
		final boolean calibrated = recording.voxelSize().isCalibrated() && !w.ignoreCalibration();
		try {
			final var r = psf != null
					? org.parfocal.quality.MatchedResolution.expectedFromPsf(psf, calibrated ? recording.voxelSize() : org.parfocal.core.VoxelSize.UNCALIBRATED)
					: org.parfocal.quality.MatchedResolution.expectedFromInput(recording, calibrated);
			notes.add(String.format(Locale.ROOT, "watch references blurred to the expected resolution %.3g x %.3g %s (the %s FWHM / %s)", r.lateral(), r.axial(),
					calibrated ? "µm" : "voxels", psf != null ? "PSF's" : "recording's apparent", MacroOptions.number(org.parfocal.quality.MatchedResolution.DECONVOLUTION_GAIN)));
			return r;
		} catch (final IllegalArgumentException e) {
			notes.add("watch references compared at their own resolution: " + e.getMessage());
			return null;
		}
	}

	/** Watch-mode facts: the rule, the suggestion(s), what was returned, and the curve(s). */
	static void record(final org.parfocal.provenance.Provenance.Builder prov, final Watch w, final List<? extends WatchedRun> watches,
			final List<CompareWithReferences.Reference> refs) {
		prov.run("watch_rule", StoppingRule.DESCRIPTION).run("watch_references", refs.size());
		for (final CompareWithReferences.Reference r : refs) prov.input(ImageProvenance.input("reference", r.image()));
		final int n = watches.size();
		for (int i = 0; i < n; i++) {
			final WatchedRun q = watches.get(i);
			final String suffix = n > 1 ? "_" + (i + 1) : "";
			final StoppingRule.Suggestion s = q.suggestion();
			prov.run("suggested_iteration" + suffix, s.iteration()).run("suggestion" + suffix, s.reason()).run("suggestion_interior" + suffix, s.interior());
			if (w.stopAtSuggestion()) prov.run("returned_iteration" + suffix, q.best() != null ? s.iteration() : q.points().isEmpty() ? 0 : q.points().get(q.points().size() - 1).iteration());
			if (!Double.isNaN(q.floor())) prov.run("watch_floor" + suffix, q.floor());
			final StringBuilder sb = new StringBuilder();
			for (final StoppingRule.Point p : q.points()) {
				if (sb.length() > 0) sb.append("; ");
				sb.append(String.format(Locale.ROOT, "%d: d %.5g chi2 %.5g", p.iteration(), p.distance(), p.chiSquare()));
			}
			prov.run("watch_curve" + suffix, sb.toString());
		}
	}
}
