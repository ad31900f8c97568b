package org.parfocal.deconv;

import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;

/**
 * Non-blind Richardson–Lucy, RL-TV and accelerated RL: the {@link RichardsonLucyEngine} with a fixed PSF, its
 * transfer function rearranged line by line for the fused product ({@link org.parfocal.fft.RealFft.LineTransfer}).
 * <p>
 * <b>Memory</b>: the grid t (in place: the real grid and its spectrum share it) and the transfer function
 * (≈ p each, 2·(px/2 + 1)·py·pz floats; t first holds the transfer function in the spectrum layout, so no third
 * grid is needed), the object x and, non-circulant, 1/Hᵀ1 from box sums of the PSF ({@link Sensitivity}) (m
 * each), the data (n). The accelerated method adds two object arrays.
 */
final class RichardsonLucySolver {

	private final RichardsonLucyEngine engine;

	RichardsonLucySolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background,
			final DeconvolutionMethod method, final double regularization, final float[] initial) {
		this(psf, n, mode, y, background, method, regularization, initial, null);
	}

	/** @param fit if not null, b is fitted from {@code fit}'s start (and {@code background} ignored) */
	RichardsonLucySolver(final Volume psf, final int[] n, final EdgeMode mode, final float[] y, final double background,
			final DeconvolutionMethod method, final double regularization, final float[] initial, final BackgroundFit fit) {
		MemoryBudget.require(bytesNeeded(n, psf.shape(), mode, method), "deconvolving a " + n[0] + " x " + n[1] + " x " + n[2] + " image");
		engine = new RichardsonLucyEngine(psf.data(), psf.shape(), n, mode, y, background, update(method), regularization, initial, fit, true);
	}

	private static RichardsonLucyEngine.Update update(final DeconvolutionMethod method) {
		return switch (method) {
		case RL_TV -> RichardsonLucyEngine.Update.TV;
		case RL_ACCELERATED -> RichardsonLucyEngine.Update.ACCELERATED;
		default -> RichardsonLucyEngine.Update.RL;
		};
	}

	/** Bytes the solver allocates (the prepared data y included). */
	static long bytesNeeded(final int[] n, final int[] k, final EdgeMode mode, final DeconvolutionMethod method) {
		return RichardsonLucyEngine.bytesNeeded(n, k, mode, 2, method == DeconvolutionMethod.RL_ACCELERATED ? 2 : 0);
	}

	int[] gridShape() { return engine.gridShape(); }

	int[] objectShape() { return engine.objectShape(); }

	/** One iteration; {@code cancelCheck} runs between the two convolutions. */
	RichardsonLucyEngine.Step iterate(final Runnable cancelCheck) {
		return engine.objectStep(cancelCheck, false);
	}

	/** The background b of the model now (the fitted value, or its mean over the image, after the last iteration with a fit). */
	double background() {
		return engine.background();
	}

	/** {log-likelihood, Σ Hx} of the current estimate (one convolution); leaves t holding a copy of x. */
	double[] likelihood() {
		final double[] s = engine.evaluate(false);
		engine.copyObjectToGrid();
		return new double[] { s[0], s[1] };
	}

	/** The current estimate on the image window, read in place. */
	EstimateView view() {
		return engine.view();
	}

	/** dst ← the estimate on the image window. */
	void crop(final float[] dst) {
		engine.crop(dst);
	}

	/**
	 * Poisson log-likelihood of other data v (another half of a thinned recording) under the current estimate,
	 * with background bv ({@link RichardsonLucyEngine#logLikelihoodOf}; used by {@link HoldOutStop}).
	 */
	double logLikelihoodOf(final float[] v, final double background) {
		return engine.logLikelihoodOf(v, background);
	}

	/** dst ← H x of the current estimate on the image window, without background ({@link RichardsonLucyEngine#blurInto}). */
	void blurInto(final float[] dst) {
		engine.blurInto(dst);
	}

	/** Per image row, the terms of the last {@link #logLikelihoodOf} (y fastest, then z). */
	double[] rowLogLikelihoods() {
		return engine.logLikelihoodRows();
	}
}
