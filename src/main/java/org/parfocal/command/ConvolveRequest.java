package org.parfocal.command;

import java.util.Map;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.provenance.MacroOptions;

/**
 * What one {@code Convolve with PSF...} run is asked to do, read from its macro options through
 * {@link ConvolveKeys}: the one reader of those keys, for the dialog (in and outside macros), the record's replay and
 * any other front end. {@link ConvolveRunner} runs it. No {@code ij.*}, no AWT.
 *
 * @param image the object's title or file
 * @param psf the PSF's title or file
 * @param acquisition boundary, normalisation, background, photons, seed and offset
 * @param recentre shift the PSF's centre of mass to its centre voxel first
 */
public record ConvolveRequest(String image, String psf, Acquisition.Options acquisition, boolean recentre) {

	public ConvolveRequest {
		if (acquisition == null) throw new IllegalArgumentException("No acquisition options given");
	}

	/** Without re-centring the PSF. */
	public ConvolveRequest(final String image, final String psf, final Acquisition.Options acquisition) {
		this(image, psf, acquisition, false);
	}

	/**
	 * Reads the options (keys checked and old names translated by {@link CommandKeys#check}, or known to be the
	 * command's); keys not given take the table's defaults. A fractional seed is cut to its whole part, as the
	 * dialog always did.
	 *
	 * @throws IllegalArgumentException one line naming the key
	 */
	public static ConvolveRequest from(final Map<String, String> options) {
		final KeyTable.Values v = ConvolveKeys.MAIN.read(options);
		final Boundary boundary = v.parsed("boundary", Boundary::parse);
		final double background = v.number("background"), photons = v.number("photons"), seed = v.number("seed"), offset = v.number("offset");
		if (!(background >= 0) || !Double.isFinite(background))
			throw new IllegalArgumentException("Background must be 0 or more, got " + MacroOptions.number(background) + " (background=)");
		if (!(photons >= 0) || !Double.isFinite(photons))
			throw new IllegalArgumentException("Photons must be 0 (no noise) or more, got " + MacroOptions.number(photons) + " (photons=)");
		if (!Double.isFinite(seed)) throw new IllegalArgumentException("The seed must be a finite number, got " + seed + " (seed=)");
		if (!Double.isFinite(offset)) throw new IllegalArgumentException("Offset must be a finite number, got " + offset + " (offset=)");
		return new ConvolveRequest(v.text("image"), v.text("psf"),
				new Acquisition.Options(boundary, v.flag("normalize"), background, photons, (long) seed, offset), v.flag("recentre"));
	}

	/** The options string a macro passes to {@code run("Convolve with PSF...", ...)} (the record's options). */
	public String macroOptions() {
		final Acquisition.Options a = acquisition;
		return "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " boundary=" + a.boundary().key()
				+ (a.normalizePsf() ? " normalize" : "") + " background=" + MacroOptions.number(a.background()) + " photons="
				+ MacroOptions.number(a.photons()) + " seed=" + a.seed() + " offset=" + MacroOptions.number(a.offset()) + (recentre ? " recentre" : "");
	}
}
