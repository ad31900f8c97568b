package org.parfocal.command;

import java.util.List;
import java.util.Map;

import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.FitPlan;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Optics;

/**
 * What one {@code Blind Deconvolve...} run is asked to do, read from its macro options through {@link BlindKeys}
 * (the optics through {@link DeconvolveKeys#OPTICS} with {@code psf=from_optics}, the band-limit optics through
 * {@link BlindKeys#BAND} with another start, the watch through {@link DeconvolveKeys#WATCH}): the one reader of
 * those keys, for the dialogs (in and outside macros), the record's replay and any other front end;
 * {@link #macroOptions} is the recorded line. {@link BlindRunner} runs it. Support sizes 0 mean automatic; the
 * numbers are checked by {@link BlindOptions} when the run starts. No {@code ij.*}, no AWT.
 *
 * @param optics the PSF from the optics, exactly when {@code psf=from_optics}
 * @param band the band limit's optics, when {@code band_limit} is on and the start is not from the optics
 * @param watch watch mode, or null when off
 */
public record BlindRequest(String image, String psf, double fwhmXY, double fwhmZ, int iterations, int objectUpdates, int psfUpdates, double objectTv,
		double psfTv, boolean bandLimit, boolean symmetric, boolean centring, double supportXY, double supportZ, String supportUnits, int snapshotInterval,
		EdgeMode edges, Level offset, Level background, String estimate, double trustRadius, OpticsRequest optics, BandOptics band, WatchRequest watch) {

	/** Starting-PSF choices besides the open images. */
	public static final String FROM_OPTICS = DeconvolveRequest.FROM_OPTICS, GAUSSIAN = "gaussian";
	/**
	 * Values of {@code estimate=}: free-form updates (the behaviour of macros recorded before the key), a model fit,
	 * a model fit then a trust-region refinement; the two widefield words fit a Gaussian start as a widefield shape
	 * (Born &amp; Wolf of the start's widths; the plain fit words keep fitting a Gaussian, as recorded lines did).
	 */
	public static final String FREE_FORM = "free-form", MODEL_FIT = "model-fit", MODEL_FIT_REFINED = "model-fit-refined",
			WIDEFIELD_FIT = "widefield-fit", WIDEFIELD_FIT_REFINED = "widefield-fit-refined";
	public static final List<String> ESTIMATES = List.of(FREE_FORM, MODEL_FIT, MODEL_FIT_REFINED, WIDEFIELD_FIT, WIDEFIELD_FIT_REFINED);
	/** Units of the support box. */
	public static final String VOXELS = "voxels", MICRONS = "microns";

	/** NA, immersion index and emission wavelength (µm) for the band limit when the start is not from the optics. */
	public record BandOptics(double na, double immersionIndex, double emission) {

		/** The band-limit optics of a run's options ({@link BlindKeys#BAND}; defaults for keys not given), checked by {@link #optics}. */
		public static BandOptics from(final KeyTable.Values v) {
			final BandOptics b = new BandOptics(v.number("na"), v.number("immersion_index"), v.number("emission"));
			b.optics(); // validates now, with the optics' one-line messages
			return b;
		}

		/** Widefield optics with these values (sample index = immersion index, at the coverslip). */
		public Optics optics() {
			return Optics.builder().na(na).immersionIndex(immersionIndex).emissionWavelength(emission).build();
		}

		public String macroOptions() {
			return "na=" + MacroOptions.number(na) + " immersion_index=" + MacroOptions.number(immersionIndex) + " emission=" + MacroOptions.number(emission);
		}
	}

	public BlindRequest {
		if (estimate == null) estimate = FREE_FORM;
		if (!ESTIMATES.contains(estimate))
			throw new IllegalArgumentException("'" + estimate + "' is not a valid PSF estimate (" + String.join(", ", ESTIMATES) + ") (estimate=)");
		if (!(trustRadius > 0 && trustRadius <= 1))
			throw new IllegalArgumentException("The trust radius must be above 0 and at most 1, got " + trustRadius + " (trust_radius=)");
		if (!FREE_FORM.equals(estimate) && !FROM_OPTICS.equals(psf) && !GAUSSIAN.equals(psf))
			throw new IllegalArgumentException("A model fit starts from " + FROM_OPTICS + " or " + GAUSSIAN + ", not from an open PSF: choose one, or estimate=" + FREE_FORM);
		if (image == null || image.isEmpty()) throw new IllegalArgumentException("No image given (image=)");
		if (psf == null || psf.isEmpty()) throw new IllegalArgumentException("No starting PSF given (psf=)");
		if (!VOXELS.equals(supportUnits) && !MICRONS.equals(supportUnits))
			throw new IllegalArgumentException("'" + supportUnits + "' is not a valid support unit (" + VOXELS + " or " + MICRONS + ") (support_units=)");
		if (!(supportXY >= 0) || !Double.isFinite(supportXY))
			throw new IllegalArgumentException("Support sizes must be 0 (automatic) or positive, got " + supportXY + " (support_xy=)");
		if (!(supportZ >= 0) || !Double.isFinite(supportZ))
			throw new IllegalArgumentException("Support sizes must be 0 (automatic) or positive, got " + supportZ + " (support_z=)");
		if (edges == null) edges = EdgeMode.NON_CIRCULANT;
		if (offset == null) offset = Level.NONE;
		if (background == null) background = Level.NONE;
		if (FROM_OPTICS.equals(psf) != (optics != null)) throw new IllegalArgumentException("The optics are given exactly when psf=" + FROM_OPTICS);
		if (band != null && (!bandLimit || optics != null))
			throw new IllegalArgumentException("Band-limit optics are given only with band_limit and a start that is not " + FROM_OPTICS);
	}

	/**
	 * Reads the options (keys checked and old names translated by {@link CommandKeys#check}, or known to be the
	 * command's); keys not given take the tables' defaults.
	 *
	 * @throws IllegalArgumentException one line naming the key
	 */
	public static BlindRequest from(final Map<String, String> options) {
		final KeyTable.Values v = BlindKeys.MAIN.read(options);
		final String psf = v.text("psf");
		final boolean bandLimit = v.flag("band_limit");
		final OpticsRequest optics = FROM_OPTICS.equals(psf) ? OpticsRequest.from(DeconvolveKeys.OPTICS.read(options)) : null;
		final BandOptics band = optics == null && bandLimit ? BandOptics.from(BlindKeys.BAND.read(options)) : null;
		final WatchRequest watch = v.flag("watch") ? WatchRequest.from(DeconvolveKeys.WATCH.read(options)) : null;
		return new BlindRequest(v.text("image"), psf, v.number("fwhm_xy"), v.number("fwhm_z"), whole(v, "iterations", "Iterations"),
				whole(v, "object_updates", "Object updates per iteration"), whole(v, "psf_updates", "PSF updates per iteration"), v.number("object_tv"),
				v.number("psf_tv"), bandLimit, v.flag("symmetric"), v.flag("centring"), v.number("support_xy"), v.number("support_z"), v.text("support_units"),
				whole(v, "snapshot_interval", "The snapshot interval"), v.parsed("edges", EdgeMode::parse), Level.parse("offset", v.text("offset"), false),
				Level.parse("background", v.text("background"), false), v.text("estimate"), v.number("trust_radius"), optics, band, watch);
	}

	/** A whole number, with the message the dialog always gave and the key. */
	private static int whole(final KeyTable.Values v, final String key, final String what) {
		final double d = v.number(key);
		if (d != Math.rint(d) || Math.abs(d) > Integer.MAX_VALUE) throw new IllegalArgumentException(what + " must be a whole number, got " + d + " (" + key + "=)");
		return (int) d;
	}

	/**
	 * The model-fit plan, or null for free-form. A Gaussian start fits the Gaussian family, as recorded lines of
	 * this command always did; {@code estimate=widefield-fit(-refined)} selects the widefield shape.
	 */
	public FitPlan plan() {
		if (FREE_FORM.equals(estimate)) return null;
		final boolean refined = MODEL_FIT_REFINED.equals(estimate) || WIDEFIELD_FIT_REFINED.equals(estimate);
		final boolean widefield = WIDEFIELD_FIT.equals(estimate) || WIDEFIELD_FIT_REFINED.equals(estimate);
		return (refined ? FitPlan.refined() : FitPlan.model()).withTrustRadius(trustRadius)
				.withGaussianStart(widefield ? FitPlan.GaussianStart.WIDEFIELD : FitPlan.GaussianStart.GAUSSIAN);
	}

	/** The same with these watch settings (null: off). */
	public BlindRequest withWatch(final WatchRequest w) {
		return new BlindRequest(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY,
				supportZ, supportUnits, snapshotInterval, edges, offset, background, estimate, trustRadius, optics, band, w);
	}

	/** The options string a macro passes to {@code run("Blind Deconvolve...", ...)} (the record's options): main dialog, then the second dialogs. */
	public String macroOptions() {
		final String s = "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " fwhm_xy=" + MacroOptions.number(fwhmXY) + " fwhm_z="
				+ MacroOptions.number(fwhmZ) + " iterations=" + iterations + " object_updates=" + objectUpdates + " psf_updates=" + psfUpdates + " object_tv="
				+ MacroOptions.number(objectTv) + " psf_tv=" + MacroOptions.number(psfTv) + (bandLimit ? " band_limit" : "") + (symmetric ? " symmetric" : "")
				+ (centring ? " centring" : "") + " support_xy=" + MacroOptions.number(supportXY) + " support_z=" + MacroOptions.number(supportZ)
				+ " support_units=" + supportUnits + " snapshot_interval=" + snapshotInterval + " edges=" + edges.key() + " offset=" + level(offset)
				+ " background=" + level(background) + " estimate=" + estimate + " trust_radius=" + MacroOptions.number(trustRadius) + (watch != null ? " watch" : "");
		return s + (optics != null ? " " + optics.macroOptions() : "") + (band != null ? " " + band.macroOptions() : "")
				+ (watch != null ? " " + watch.macroOptions() : "");
	}

	private static String level(final Level l) {
		return switch (l.kind()) {
		case ESTIMATED -> "auto";
		case DARK -> "dark";
		case NONE -> "0";
		default -> MacroOptions.number(l.value());
		};
	}
}
