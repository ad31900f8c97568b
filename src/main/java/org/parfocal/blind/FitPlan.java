package org.parfocal.blind;

/**
 * How a blind run estimates its PSF from a physical model ({@link ModelFit}) instead of (or before) free-form
 * updates. Immutable.
 *
 * @param refine after the model fit, free-form PSF updates inside a trust region around the fitted model,
 *        each kept only when the held-out voxels' likelihood does not fall
 * @param settings the model fit's schedule
 * @param trustRadius the largest relative L2 distance ‖h − h_model‖/‖h_model‖ of the refined PSF, (0, 1]
 * @param gaussianStart which model family a Gaussian start fits (null: {@link GaussianStart#WIDEFIELD})
 */
public record FitPlan(boolean refine, ModelFit.Settings settings, double trustRadius, GaussianStart gaussianStart) {

	/**
	 * The family fitted from a Gaussian start. Measured on the independent widefield scenes (README): the
	 * Gaussian family ends far too narrow on a widefield recording (−40 % lateral, −62 % axial from a start 30 %
	 * too narrow), and the held-out likelihood still prefers it to the widefield shape, which lands at the true
	 * widths; so the default fits the widefield shape, and choosing by the held-out likelihood is not offered as
	 * a default.
	 */
	public enum GaussianStart {
		/** {@link ModelFit#widefieldShape} of the start's widths (the default). */
		WIDEFIELD,
		/** A Gaussian of free lateral and axial widths (for PSFs without an out-of-focus cone). */
		GAUSSIAN,
		/** Both, keeping the higher held-out likelihood (biased toward the narrow Gaussian on widefield data). */
		BY_HELD_OUT
	}

	public FitPlan(final boolean refine, final ModelFit.Settings settings, final double trustRadius) {
		this(refine, settings, trustRadius, GaussianStart.WIDEFIELD);
	}

	/**
	 * Default trust radius. It was 0.2: on the independent widefield scene filaments-widefield-200 the one
	 * step the held-out test kept went to that radius and made the PSF 15 % / 16 % narrower than the truth
	 * (lateral / axial) for +0.12 dB; the held-out likelihood of a free-form PSF still favours narrower PSFs,
	 * so the radius bounds how far it can go (README).
	 */
	public static final double DEFAULT_TRUST_RADIUS = 0.05;

	public FitPlan {
		if (settings == null) settings = ModelFit.Settings.defaults();
		if (gaussianStart == null) gaussianStart = GaussianStart.WIDEFIELD;
		if (!(trustRadius > 0 && trustRadius <= 1))
			throw new IllegalArgumentException("The trust radius around the fitted model must be above 0 and at most 1, got " + trustRadius);
	}

	public static FitPlan model() { return new FitPlan(false, ModelFit.Settings.defaults(), DEFAULT_TRUST_RADIUS); }

	public static FitPlan refined() { return new FitPlan(true, ModelFit.Settings.defaults(), DEFAULT_TRUST_RADIUS); }

	public FitPlan withSettings(final ModelFit.Settings s) { return new FitPlan(refine, s, trustRadius, gaussianStart); }

	public FitPlan withTrustRadius(final double r) { return new FitPlan(refine, settings, r, gaussianStart); }

	public FitPlan withGaussianStart(final GaussianStart g) { return new FitPlan(refine, settings, trustRadius, g); }
}
