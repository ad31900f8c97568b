package org.parfocal.deconv;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;

/**
 * Deconvolution of one 2D or 3D image with one PSF: the entry point of the core.
 * <p>
 * Model: the recording is y = Poisson(H x + b) + o, with H the convolution by the PSF (unit sum, origin at
 * voxel ⌊(k − 1)/2⌋), b a constant background (given, estimated, or fitted with the object: {@link BackgroundFit})
 * and o a camera offset. The data and the PSF are prepared as
 * {@link Preprocessing} documents; the image and the PSF passed in are never modified. Methods:
 * {@link DeconvolutionMethod}; edge handling: {@link EdgeMode}.
 * <p>
 * Threads come from the caller's {@link net.imglib2.parallel.Parallelization} context; results do not depend
 * on the thread count. Progress goes to {@link Monitor#progress} once per iteration; cancellation
 * ({@link Monitor#isCancelled()} or an interrupt) is checked twice per iteration and ends the run with
 * {@link Monitor.CancelledException}, returning nothing.
 *
 * <pre>
 * DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, 30).withBackground(Level.ESTIMATED);
 * DeconvolutionResult r = Parallelization.runWithNumThreads(4, () -&gt; Deconvolution.run(image, psf, o, monitor));
 * </pre>
 */
public final class Deconvolution {

	private Deconvolution() {}

	public static DeconvolutionResult run(final Volume image, final Volume psf, final DeconvolutionOptions options, final Monitor monitor) {
		return run(image, psf, options, null, monitor, IterationListener.NONE);
	}

	/**
	 * @param initial starting estimate on the image grid (offset-corrected units), or null for a constant
	 *        equal to the mean of y − b; beyond the image (non-circulant edges) its edge values are repeated
	 * @param listener called after every iteration (statistics and a read-only view of the iterate)
	 * @throws IllegalArgumentException with a one-line message for unusable inputs
	 * @throws Monitor.CancelledException when cancelled
	 */
	public static DeconvolutionResult run(final Volume image, final Volume psf, final DeconvolutionOptions given, final Volume initial,
			final Monitor monitor, final IterationListener listener) {
		if (image == null || psf == null || given == null) throw new IllegalArgumentException("No image, PSF or options given");
		// background=by-psf: the level the PSF's shape calls for (Preprocessing.forPsf)
		final DeconvolutionOptions options = given.withBackground(Preprocessing.forPsf(given.background(), psf));
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		final IterationListener lis = listener == null ? IterationListener.NONE : listener;
		final int[] n = image.shape();
		if (initial != null) {
			if (!initial.sameShape(image)) throw new IllegalArgumentException("The starting estimate (" + initial + ") differs in size from the image (" + image + ")");
			final int bad = initial.firstNonFinite();
			if (bad >= 0) throw new IllegalArgumentException("The starting estimate has a non-finite value at " + initial.position(bad));
		}
		final Preprocessing.Psf p = Preprocessing.psf(psf, n);
		final Preprocessing.Data d = Preprocessing.data(image, options.offset(), options.background());
		final List<String> notes = new ArrayList<>(p.notes());
		if (given.background().kind() == Level.Kind.BY_PSF) notes.add(Preprocessing.byPsfReason(options.background()));
		notes.addAll(d.notes());
		mon.checkCancelled();
		if (options.method() == DeconvolutionMethod.WIENER) {
			final float[] out = new float[d.y().length];
			mon.progress(0, 1, "Wiener filter");
			if (options.background().kind() == Level.Kind.FIT || options.background().kind() == Level.Kind.FIT_SMOOTH)
				notes.add(String.format(Locale.ROOT, "The Wiener filter cannot fit the background: its start, the darkest-region estimate %.4g, was used", d.background()));
			WienerFilter.apply(p.psf(), n, options.edges(), d.y(), d.background(), options.regularization(), out);
			mon.checkCancelled();
			mon.progress(1, 1, "Wiener filter");
			return new DeconvolutionResult(Volume.wrap(out, n[0], n[1], n[2], image.voxelSize()), 0, false, List.of(), Double.NaN, d.offset(),
					d.background(), notes);
		}
		noiseNote(image, d.offset(), notes);
		final Saturation sat = Saturation.detect(image);
		if (sat != null) {
			notes.add(sat.describe(d.y().length));
			final float[] in = image.data(), yv = d.y();
			for (int i = 0; i < in.length; i++) if (in[i] == sat.value()) yv[i] = Float.NaN;
		}
		// held-out stop: the split run decides the number of iterations first (its solver is gone before the full one is made)
		final HoldOutStop.Result held = options.stopping() == Stopping.HELD_OUT
				? HoldOutStop.find(image, p.psf(), n, options, d.y(), d.offset(), d.background(), initial == null ? null : initial.data(), mon)
				: null;
		if (held != null) notes.add(held.reason());
		final BackgroundFit fit = BackgroundFit.forLevel(options.background(), d.background(), n[0], n[1], n[2], d.y());
		final RichardsonLucySolver s = new RichardsonLucySolver(p.psf(), n, options.edges(), d.y(), d.background(), options.method(),
				options.regularization(), initial == null ? null : initial.data(), fit);
		final List<IterationReport> history = new ArrayList<>();
		final String name = switch (options.method()) {
		case RL_TV -> "Richardson-Lucy-TV";
		case RL_ACCELERATED -> "Accelerated Richardson-Lucy";
		default -> "Richardson-Lucy";
		};
		final int max = held != null ? held.fullIterations() : options.iterations();
		final EstimateView view = s.view();
		boolean converged = false;
		int done = 0;
		for (int it = 1; it <= max; it++) {
			mon.checkCancelled();
			mon.progress(it - 1, max, name + " iteration " + it + " of " + max);
			final RichardsonLucyEngine.Step st = s.iterate(mon::checkCancelled);
			final IterationReport rep = new IterationReport(it, max, st.logLikelihood(), st.relativeChange(), st.estimateSum(), st.modelSum());
			history.add(rep);
			done = it;
			lis.iterationDone(rep, view);
			if (options.stopping() == Stopping.RELATIVE_CHANGE && st.relativeChange() < options.changeThreshold()) {
				converged = it < max;
				break;
			}
		}
		mon.checkCancelled();
		final double ll = s.likelihood()[0];
		// the data array is not needed any more: it receives the output
		final float[] out = d.y();
		s.crop(out);
		mon.progress(max, max, name + " done");
		if (fit != null) notes.add(fit.describe());
		return new DeconvolutionResult(Volume.wrap(out, n[0], n[1], n[2], image.voxelSize()), done, converged, history, ll, d.offset(),
				fit != null ? s.background() : d.background(), notes);
	}

	/**
	 * Adds the camera noise model estimated from a recording of camera counts (integer values) to the notes,
	 * for the Log and the provenance ({@link org.parfocal.core.CameraNoise}); other images get no note.
	 */
	static void noiseNote(final Volume image, final double offset, final List<String> notes) {
		for (final float v : image.data()) if (v != Math.rint(v)) return;
		try {
			notes.add("Noise model estimated from the recording: " + org.parfocal.core.CameraNoise.estimate(image, offset).describe());
		} catch (final IllegalArgumentException e) {
			notes.add("Noise model not estimated: " + e.getMessage());
		}
	}

	/** Bytes a run allocates, for a memory check before starting. */
	public static long bytesNeeded(final int[] imageShape, final int[] psfShape, final DeconvolutionOptions options) {
		return options.method() == DeconvolutionMethod.WIENER ? WienerFilter.bytesNeeded(imageShape, psfShape, options.edges()) + 8L * imageShape[0] * imageShape[1] * imageShape[2]
				: RichardsonLucySolver.bytesNeeded(imageShape, psfShape, options.edges(), options.method())
						+ (options.stopping() == Stopping.HELD_OUT ? HoldOutStop.bytesNeeded(imageShape, psfShape, options) : 0);
	}
}
