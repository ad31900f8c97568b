package org.parfocal.command;

import java.util.List;
import java.util.Locale;

import org.parfocal.core.CameraNoise;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.ReblurConsistency;

/**
 * The noise model of a re-blur χ² for one recording (watch mode of the deconvolution commands, Compare with Sharp
 * References): the given photons per unit and read noise, or, with {@code estimate_noise}, gain and read noise
 * estimated from the recording ({@link CameraNoise}, {@link ReblurConsistency.NoiseModel#fromCamera}; the given
 * values when that fails, with a note). No {@code ij.*}, no AWT.
 */
public final class ChiSquareNoise {

	private ChiSquareNoise() {}

	/** {photons per unit, read noise}; the notes start with "watch " (Compare says "chi-square " instead). */
	public static double[] of(final boolean estimate, final double photons, final double readNoise, final Volume recording, final double offset,
			final List<String> notes) {
		if (!estimate) return new double[] { photons, readNoise };
		try {
			final CameraNoise c = CameraNoise.estimate(recording, offset);
			final var m = ReblurConsistency.NoiseModel.fromCamera(c, 0, offset);
			final String note = String.format(Locale.ROOT, "watch noise model estimated from the recording: %.4g photons per unit, read noise %.4g units",
					m.photonsPerUnit(), m.readNoise());
			if (!notes.contains(note)) notes.add(note);
			return new double[] { m.photonsPerUnit(), m.readNoise() };
		} catch (final IllegalArgumentException e) {
			notes.add("watch noise model not estimated (" + e.getMessage() + "): photons=" + MacroOptions.number(photons) + " read_noise="
					+ MacroOptions.number(readNoise) + " used");
			return new double[] { photons, readNoise };
		}
	}
}
