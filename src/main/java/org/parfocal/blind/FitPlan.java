package org.parfocal.blind;

/**
 * How a blind run estimates its PSF from a physical model ({@link ModelFit}) instead of (or before) free-form
 * updates. Immutable.
 *
 * @param refine after the model fit, free-form PSF updates inside a trust region around the fitted model,
 *        each kept only when the held-out voxels' likelihood does not fall
 * @param settings the model fit's schedule
 * @param trustRadius the largest relative L2 distance ‖h − h_model‖/‖h_model‖ of the refined PSF, (0, 1]
 */
public record FitPlan(boolean refine, ModelFit.Settings settings, double trustRadius) {

	public static final double DEFAULT_TRUST_RADIUS = 0.2;

	public FitPlan {
		if (settings == null) settings = ModelFit.Settings.defaults();
		if (!(trustRadius > 0 && trustRadius <= 1))
			throw new IllegalArgumentException("The trust radius around the fitted model must be above 0 and at most 1, got " + trustRadius);
	}

	public static FitPlan model() { return new FitPlan(false, ModelFit.Settings.defaults(), DEFAULT_TRUST_RADIUS); }

	public static FitPlan refined() { return new FitPlan(true, ModelFit.Settings.defaults(), DEFAULT_TRUST_RADIUS); }

	public FitPlan withSettings(final ModelFit.Settings s) { return new FitPlan(refine, s, trustRadius); }

	public FitPlan withTrustRadius(final double r) { return new FitPlan(refine, settings, r); }
}
