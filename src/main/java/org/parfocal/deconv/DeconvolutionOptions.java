package org.parfocal.deconv;

/**
 * Everything a deconvolution run needs besides the image and the PSF. Immutable; the constructor rejects
 * invalid combinations with a one-line message.
 *
 * @param method algorithm
 * @param iterations number of iterations (fixed stopping) or the most allowed (relative-change stopping), 1 to
 *        {@value #MAX_ITERATIONS}; ignored by {@link DeconvolutionMethod#WIENER}
 * @param regularization for {@link DeconvolutionMethod#RL_TV} the total-variation weight λ (0 to
 *        {@value #MAX_TV_WEIGHT}; 0 gives plain RL, Dey et al. 2006 suggest about 0.002); for
 *        {@link DeconvolutionMethod#WIENER} the Tikhonov weight μ &gt; 0, relative to |Ĥ(0)|² = 1 of a
 *        unit-sum PSF; ignored by the other methods
 * @param stopping stopping rule
 * @param changeThreshold relative change that stops {@link Stopping#RELATIVE_CHANGE} runs, in (0, 1)
 * @param edges what is assumed beyond the stack edges
 * @param offset camera offset, subtracted from the data before anything else
 * @param background constant background b of the Poisson model (Hx + b), in data units after offset
 *        subtraction
 */
public record DeconvolutionOptions(DeconvolutionMethod method, int iterations, double regularization, Stopping stopping,
		double changeThreshold, EdgeMode edges, Level offset, Level background) {

	public static final int MAX_ITERATIONS = 10_000;
	/** Above 1/(2·3) the TV denominator 1 − λ·div could reach zero in 3D (|div| ≤ 2 per axis). */
	public static final double MAX_TV_WEIGHT = 0.1;

	public DeconvolutionOptions {
		if (method == null) throw new IllegalArgumentException("No deconvolution method given");
		if (stopping == null) stopping = Stopping.FIXED;
		if (edges == null) edges = EdgeMode.NON_CIRCULANT;
		if (offset == null) offset = Level.NONE;
		if (background == null) background = Level.NONE;
		if (iterations <= 0 || iterations > MAX_ITERATIONS)
			throw new IllegalArgumentException("Iterations must be between 1 and " + MAX_ITERATIONS + ", got " + iterations);
		if (!(regularization >= 0) || !Double.isFinite(regularization))
			throw new IllegalArgumentException("The regularisation weight must be 0 or more, got " + regularization);
		if (method == DeconvolutionMethod.RL_TV && regularization > MAX_TV_WEIGHT)
			throw new IllegalArgumentException("The total-variation weight must be at most " + MAX_TV_WEIGHT + " (typical 0.001 to 0.01), got " + regularization);
		if (method == DeconvolutionMethod.WIENER && !(regularization > 0))
			throw new IllegalArgumentException("The Wiener filter needs a regularisation weight above 0 (e.g. 0.001), got " + regularization);
		if (stopping == Stopping.RELATIVE_CHANGE && !(changeThreshold > 0 && changeThreshold < 1))
			throw new IllegalArgumentException("The relative-change threshold must be between 0 and 1 (e.g. 0.001), got " + changeThreshold);
		if (background.kind() == Level.Kind.VALUE && background.value() < 0)
			throw new IllegalArgumentException("The background must be 0 or more, got " + background.value());
	}

	/** Plain RL, {@code iterations} fixed, non-circulant edges, no offset or background. */
	public static DeconvolutionOptions of(final DeconvolutionMethod method, final int iterations) {
		return new DeconvolutionOptions(method, iterations, method == DeconvolutionMethod.WIENER ? 1e-3 : method == DeconvolutionMethod.RL_TV ? 0.002 : 0,
				Stopping.FIXED, 0, EdgeMode.NON_CIRCULANT, Level.NONE, Level.NONE);
	}

	public DeconvolutionOptions withMethod(final DeconvolutionMethod m) {
		return new DeconvolutionOptions(m, iterations, regularization, stopping, changeThreshold, edges, offset, background);
	}

	public DeconvolutionOptions withIterations(final int n) {
		return new DeconvolutionOptions(method, n, regularization, stopping, changeThreshold, edges, offset, background);
	}

	public DeconvolutionOptions withRegularization(final double w) {
		return new DeconvolutionOptions(method, iterations, w, stopping, changeThreshold, edges, offset, background);
	}

	/** Stops when the relative change falls below {@code threshold}. */
	public DeconvolutionOptions withRelativeChangeStop(final double threshold) {
		return new DeconvolutionOptions(method, iterations, regularization, Stopping.RELATIVE_CHANGE, threshold, edges, offset, background);
	}

	public DeconvolutionOptions withEdges(final EdgeMode e) {
		return new DeconvolutionOptions(method, iterations, regularization, stopping, changeThreshold, e, offset, background);
	}

	public DeconvolutionOptions withOffset(final Level o) {
		return new DeconvolutionOptions(method, iterations, regularization, stopping, changeThreshold, edges, o, background);
	}

	public DeconvolutionOptions withBackground(final Level b) {
		return new DeconvolutionOptions(method, iterations, regularization, stopping, changeThreshold, edges, offset, b);
	}
}
