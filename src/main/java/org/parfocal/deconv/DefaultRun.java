package org.parfocal.deconv;

/**
 * What {@code Deconvolve...} (and a recipe of {@code bin/parfocal-blocks}, Spark and batch runs) does when a macro
 * line or recipe leaves out {@code method}, {@code iterations} or {@code stop}: the setting the independent
 * scene table showed best (README, "Judged on independent scenes"): accelerated Richardson–Lucy stopped by the
 * held-out stop ({@link HoldOutStop}: Poisson-thinned halves, the object's error within the optics' band), with
 * {@link #CAP} iterations as the cap. A line that gives
 * {@code iterations} but not {@code stop} runs exactly that many iterations, as every line did before the held-out
 * stop existed; recorded lines carry all three keys, so they reproduce their run exactly.
 */
public final class DefaultRun {

	private DefaultRun() {}

	/** Method of a line without {@code method}. */
	public static final DeconvolutionMethod METHOD = DeconvolutionMethod.RL_ACCELERATED;
	/** Iterations (the cap of the held-out stop) of a line without {@code iterations}. */
	public static final int CAP = 100;
	/**
	 * Background of a Deconvolve line or recipe without {@code background}: {@code by-psf}
	 * ({@link Preprocessing#forPsf}): the darkest region after the offset ({@code dark}) for a PSF that keeps its
	 * light out of focus (widefield), the larger of that and the sigma-clipped median ({@code dark-or-median}) for
	 * one whose out-of-focus planes fade (confocal-like). On the independent scenes (README, "The background by
	 * the PSF", 2026-12-04) it gave the same as {@code dark} on the 7 widefield scenes and +0.64, +2.83 and 0.00 dB
	 * more on the three confocal ones, where {@code dark} underestimates a sloping background; {@code dark} itself
	 * had beaten {@code auto} (which takes out-of-focus light for background) on 8 of 10. Lines recorded with
	 * {@code background=dark} keep running as they did. Blind Deconvolve, Compare and the watch keep {@code auto}:
	 * not measured with them.
	 */
	public static final String BACKGROUND = "by-psf";

	/** Stopping rule of a line without {@code stop}: held-out, unless the line gives its iterations (then fixed). */
	public static Stopping stop(final boolean iterationsGiven) {
		return iterationsGiven ? Stopping.FIXED : Stopping.HELD_OUT;
	}
}
