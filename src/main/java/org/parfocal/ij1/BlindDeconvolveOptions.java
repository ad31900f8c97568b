package org.parfocal.ij1;

import static org.parfocal.ij1.BlindDeconvolve.ESTIMATES;
import static org.parfocal.ij1.BlindDeconvolve.FREE_FORM;
import static org.parfocal.ij1.BlindDeconvolve.FROM_OPTICS;
import static org.parfocal.ij1.BlindDeconvolve.GAUSSIAN;
import static org.parfocal.ij1.BlindDeconvolve.MICRONS;
import static org.parfocal.ij1.BlindDeconvolve.MODEL_FIT_REFINED;
import static org.parfocal.ij1.BlindDeconvolve.VOXELS;
import static org.parfocal.ij1.BlindDeconvolve.WIDEFIELD_FIT;
import static org.parfocal.ij1.BlindDeconvolve.WIDEFIELD_FIT_REFINED;

import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.FitPlan;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Optics;

/**
 * What Blind Deconvolve's dialogs decide; {@link #macroOptions} is its recorded line. {@code optics} is set when
 * {@code psf} is {@link BlindDeconvolve#FROM_OPTICS}; {@code band} when the band limit is on and the start is not
 * from the optics. Support sizes 0 mean automatic. Numbers are checked by {@link BlindOptions} when the command
 * runs.
 */
public record BlindDeconvolveOptions(String image, String psf, double fwhmXY, double fwhmZ, int iterations, int objectUpdates, int psfUpdates, double objectTv,
		double psfTv, boolean bandLimit, boolean symmetric, boolean centring, double supportXY, double supportZ, String supportUnits,
		int snapshotInterval, EdgeMode edges, Level offset, Level background, PsfFromOptics.Options optics, BandOptics band, Deconvolve.Watch watch,
		String estimate, double trustRadius) {

	/** NA, immersion index and emission wavelength (µm) for the band limit when the start is not from the optics. */
	public record BandOptics(double na, double immersionIndex, double emission) {

		/** Widefield optics with these values (sample index = immersion index, at the coverslip). */
		public Optics optics() {
			return Optics.builder().na(na).immersionIndex(immersionIndex).emissionWavelength(emission).build();
		}

		public String macroOptions() {
			return "na=" + MacroOptions.number(na) + " immersion_index=" + MacroOptions.number(immersionIndex) + " emission="
					+ MacroOptions.number(emission);
		}
	}

	/** Free-form estimation (the PSF updated voxel by voxel from the start, as before the model fit existed). */
	public BlindDeconvolveOptions(final String image, final String psf, final double fwhmXY, final double fwhmZ, final int iterations, final int objectUpdates,
			final int psfUpdates, final double objectTv, final double psfTv, final boolean bandLimit, final boolean symmetric, final boolean centring,
			final double supportXY, final double supportZ, final String supportUnits, final int snapshotInterval, final EdgeMode edges, final Level offset,
			final Level background, final PsfFromOptics.Options optics, final BandOptics band, final Deconvolve.Watch watch) {
		this(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY, supportZ,
				supportUnits, snapshotInterval, edges, offset, background, optics, band, watch, FREE_FORM, FitPlan.DEFAULT_TRUST_RADIUS);
	}

	/** The same with this estimate (free-form, model-fit, model-fit-refined) and trust radius. */
	public BlindDeconvolveOptions withEstimate(final String e, final double radius) {
		return new BlindDeconvolveOptions(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY,
				supportZ, supportUnits, snapshotInterval, edges, offset, background, optics, band, watch, e, radius);
	}

	/**
	 * The model-fit plan, or null for free-form. A Gaussian start fits the Gaussian family, as recorded lines
	 * of this command always did; {@code estimate=widefield-fit(-refined)} selects the widefield shape.
	 */
	public FitPlan plan() {
		if (FREE_FORM.equals(estimate)) return null;
		final boolean refined = MODEL_FIT_REFINED.equals(estimate) || WIDEFIELD_FIT_REFINED.equals(estimate);
		final boolean widefield = WIDEFIELD_FIT.equals(estimate) || WIDEFIELD_FIT_REFINED.equals(estimate);
		return (refined ? FitPlan.refined() : FitPlan.model()).withTrustRadius(trustRadius)
				.withGaussianStart(widefield ? FitPlan.GaussianStart.WIDEFIELD : FitPlan.GaussianStart.GAUSSIAN);
	}

	/** Without watch mode. */
	public BlindDeconvolveOptions(final String image, final String psf, final double fwhmXY, final double fwhmZ, final int iterations, final int objectUpdates,
			final int psfUpdates, final double objectTv, final double psfTv, final boolean bandLimit, final boolean symmetric, final boolean centring,
			final double supportXY, final double supportZ, final String supportUnits, final int snapshotInterval, final EdgeMode edges, final Level offset,
			final Level background, final PsfFromOptics.Options optics, final BandOptics band) {
		this(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY, supportZ,
				supportUnits, snapshotInterval, edges, offset, background, optics, band, null);
	}

	/** The same with these watch settings (null: off). */
	public BlindDeconvolveOptions withWatch(final Deconvolve.Watch w) {
		return new BlindDeconvolveOptions(image, psf, fwhmXY, fwhmZ, iterations, objectUpdates, psfUpdates, objectTv, psfTv, bandLimit, symmetric, centring, supportXY,
				supportZ, supportUnits, snapshotInterval, edges, offset, background, optics, band, w, estimate, trustRadius);
	}

	public BlindDeconvolveOptions {
		if (estimate == null) estimate = FREE_FORM;
		if (!ESTIMATES.contains(estimate))
			throw new IllegalArgumentException("'" + estimate + "' is not a valid PSF estimate (" + String.join(", ", ESTIMATES) + ") (estimate=)");
		if (!(trustRadius > 0 && trustRadius <= 1))
			throw new IllegalArgumentException("The trust radius must be above 0 and at most 1, got " + trustRadius + " (trust_radius=)");
		if (!FREE_FORM.equals(estimate) && !FROM_OPTICS.equals(psf) && !GAUSSIAN.equals(psf))
			throw new IllegalArgumentException("A model fit starts from " + FROM_OPTICS + " or " + GAUSSIAN + ", not from an open PSF: choose one, or estimate=" + FREE_FORM);
		if (image == null || image.isEmpty()) throw new IllegalArgumentException("No image given");
		if (psf == null || psf.isEmpty()) throw new IllegalArgumentException("No starting PSF given");
		if (!VOXELS.equals(supportUnits) && !MICRONS.equals(supportUnits))
			throw new IllegalArgumentException("'" + supportUnits + "' is not a valid support unit (" + VOXELS + " or " + MICRONS + ") (support_units=)");
		if (!(supportXY >= 0) || !(supportZ >= 0) || !Double.isFinite(supportXY) || !Double.isFinite(supportZ))
			throw new IllegalArgumentException("Support sizes must be 0 (automatic) or positive, got " + supportXY + " and " + supportZ);
		if (edges == null) edges = EdgeMode.NON_CIRCULANT;
		if (offset == null) offset = Level.NONE;
		if (background == null) background = Level.NONE;
		if (FROM_OPTICS.equals(psf) != (optics != null)) throw new IllegalArgumentException("The optics are given exactly when psf=" + FROM_OPTICS);
		if (band != null && (!bandLimit || optics != null))
			throw new IllegalArgumentException("Band-limit optics are given only with band_limit and a start that is not " + FROM_OPTICS);
	}

	public String macroOptions() {
		final String s = "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " fwhm_xy=" + MacroOptions.number(fwhmXY)
				+ " fwhm_z=" + MacroOptions.number(fwhmZ) + " iterations=" + iterations + " object_updates=" + objectUpdates + " psf_updates="
				+ psfUpdates + " object_tv=" + MacroOptions.number(objectTv) + " psf_tv=" + MacroOptions.number(psfTv)
				+ (bandLimit ? " band_limit" : "") + (symmetric ? " symmetric" : "") + (centring ? " centring" : "") + " support_xy="
				+ MacroOptions.number(supportXY) + " support_z=" + MacroOptions.number(supportZ) + " support_units=" + supportUnits
				+ " snapshot_interval=" + snapshotInterval + " edges=" + edges.key() + " offset=" + level(offset) + " background="
				+ level(background) + " estimate=" + estimate + " trust_radius=" + MacroOptions.number(trustRadius) + (watch != null ? " watch" : "");
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
