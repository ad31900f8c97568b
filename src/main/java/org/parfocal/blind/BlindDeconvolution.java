package org.parfocal.blind;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.conv.Psfs;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Monitor;
import org.parfocal.core.Sums;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.EstimateView;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Preprocessing;
import org.parfocal.deconv.RichardsonLucyEngine;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Blind deconvolution of one 2D or 3D image: the object and the PSF are both estimated from the data.
 * <p>
 * <b>Model</b> as in {@link org.parfocal.deconv.Deconvolution}: y = Poisson(H x + b) + o, H the convolution by
 * a unit-sum PSF h on a box (origin at its centre voxel). <b>Algorithm</b>: outer iterations of k object
 * updates followed by m PSF updates, each in Richardson–Lucy (maximum-likelihood) form (Holmes, J. Opt.
 * Soc. Am. A 9, 1992; Fish, Brinicombe, Pike &amp; Walker, J. Opt. Soc. Am. A 12, 1995), with total variation
 * on the object (Dey et al., Microsc. Res. Tech. 69, 2006) and optionally on the PSF (after Chan &amp; Wong,
 * IEEE Trans. Image Process. 7, 1998), and after every PSF update the constraints of {@link PsfConstraints}:
 * optional band limit ({@link OtfSupport}), non-negativity, optional cylindrical symmetry, optional centring,
 * unit sum; the support is the box. Plain alternating RL drifts to trivial solutions (a delta PSF, or a PSF
 * that takes over the object); the band limit forbids the delta and the noise-fitting, the box and the object
 * TV keep the PSF from spreading.
 * <p>
 * <b>Support box</b> when none is given: the given PSF's size; else from the optics, laterally ±2.5·λ/NA
 * (past the third dark ring of the Airy pattern, Born &amp; Wolf §8.5.2, from memory) and axially ±3 zeros of
 * the on-axis intensity (spacing λ/(n(1 − cos α)), stretched by n<sub>i</sub>/n<sub>s</sub> when the sample
 * index is lower) plus the paraxial focal shift |depth·(n<sub>i</sub>/n<sub>s</sub> − 1)|; without optics, ±2
 * FWHM of a starting Gaussian. Each size is capped to the largest odd size within the image.
 * <p>
 * <b>Equivalence</b>: with m = 0 PSF updates the object updates are those of the non-blind engine (RL, or
 * RL-TV when the object TV weight is above 0) and the result equals it bit for bit.
 * <p>
 * Threads come from the caller's {@link net.imglib2.parallel.Parallelization} context; results do not depend
 * on the thread count. Progress goes to the {@link Monitor} once per outer iteration; cancellation is checked
 * between all transforms and ends the run with {@link Monitor.CancelledException}, returning nothing. The
 * image and a given PSF are never modified.
 *
 * <pre>
 * BlindOptions o = BlindOptions.of(PsfStart.model("gibson-lanni"), optics).withBackground(Level.ESTIMATED);
 * BlindResult r = Parallelization.runWithNumThreads(4, () -&gt; BlindDeconvolution.run(image, o, monitor, BlindListener.NONE));
 * </pre>
 */
public final class BlindDeconvolution {

	private BlindDeconvolution() {}

	public static BlindResult run(final Volume image, final BlindOptions options, final Monitor monitor) {
		return run(image, options, monitor, BlindListener.NONE);
	}

	/**
	 * @throws IllegalArgumentException with a one-line message for unusable inputs
	 * @throws Monitor.CancelledException when cancelled
	 */
	public static BlindResult run(final Volume image, final BlindOptions options, final Monitor monitor, final BlindListener listener) {
		if (image == null || options == null) throw new IllegalArgumentException("No image or options given");
		options.checkFor(image);
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		final BlindListener lis = listener == null ? BlindListener.NONE : listener;
		final int[] n = image.shape();
		final List<String> notes = new ArrayList<>();
		final Volume start = startingPsf(image, options, notes);
		final int[] k = start.shape();
		MemoryBudget.require(BlindSolver.bytesNeeded(n, k, options.edges()), "blind deconvolution of a " + n[0] + " x " + n[1] + " x " + n[2] + " image");
		final Preprocessing.Data d = Preprocessing.data(image, options.offset(), options.background());
		notes.addAll(d.notes());
		mon.checkCancelled();
		final double[] um = micronSizes(image.voxelSize());
		final PsfConstraints constraints = new PsfConstraints(k[0], k[1], k[2], um[0], um[1], um[2],
				options.bandLimit() ? OtfSupport.widefield(options.optics()) : null, options.symmetric(), options.centring(), start.data());
		final BlindSolver s = new BlindSolver(start, n, options.edges(), d.y(), d.background(), options.objectTv(), options.psfTv(), constraints);
		final VoxelSize vs = image.voxelSize();
		final List<PsfSnapshot> snaps = new ArrayList<>();
		final float[] h0 = start.data();
		snaps.add(snapshot(0, h0, h0, k, vs));
		final List<BlindReport> history = new ArrayList<>();
		final int max = options.iterations();
		final EstimateView objectView = objectView(s, n), psfView = psfView(s, k, vs);
		for (int it = 1; it <= max; it++) {
			mon.checkCancelled();
			mon.progress(it - 1, max, "Blind deconvolution iteration " + it + " of " + max);
			RichardsonLucyEngine.Step last = null, obj = null, psf = null;
			for (int u = 0; u < options.objectUpdates(); u++) {
				mon.checkCancelled();
				last = obj = s.objectUpdate(mon::checkCancelled);
			}
			for (int u = 0; u < options.psfUpdates(); u++) {
				mon.checkCancelled();
				last = psf = s.psfUpdate(mon::checkCancelled);
			}
			final BlindReport rep = new BlindReport(it, max, last.logLikelihood(), obj.relativeChange(), psf == null ? 0 : psf.relativeChange(),
					obj.estimateSum(), last.modelSum());
			history.add(rep);
			if (it % options.snapshotInterval() == 0 || it == max) snaps.add(snapshot(it, s.psf(), h0, k, vs));
			lis.iterationDone(rep, objectView, psfView);
		}
		mon.checkCancelled();
		final float[] out = d.y(); // not needed any more: it receives the output
		s.crop(out);
		mon.progress(max, max, "Blind deconvolution done");
		final Volume psf = Volume.wrap(s.psf().clone(), k[0], k[1], k[2], vs);
		return new BlindResult(Volume.wrap(out, n[0], n[1], n[2], vs), psf, snaps, history, d.offset(), d.background(), notes);
	}

	/**
	 * Blind deconvolution with a model fit ({@link ModelFit}): the PSF model's parameters are fitted first
	 * (from a Gaussian start the widefield shape of the start's widths, {@link ModelFit#widefieldShape}, or as
	 * {@link FitPlan#gaussianStart()} says a Gaussian, or both with the higher held-out likelihood kept; depth, sample index and NA of the start's
	 * model from a model start), optionally refined free-form inside a trust region around the fitted model with
	 * every step checked on held-out voxels ({@link RefineStep}: kept only when the held-out likelihood rises by
	 * more than its noise, a paired t over blocks of rows above {@link #REFINE_T}); then the object is
	 * deconvolved on all the data with the final PSF ({@code iterations × objectUpdates} updates, as non-blind RL
	 * or RL-TV). Without a plan ({@code null}) this is {@link #run(Volume, BlindOptions, Monitor, BlindListener)}.
	 * <p>
	 * The box: the given support, else for a model start the smallest holding {@link LightBox#FRACTION} of the
	 * model's light within the image ({@link LightBox}), for a Gaussian start ±3 FWHM of the start, enlarged
	 * (unless only the Gaussian is fitted) to hold 95 % of the widefield shape's light.
	 */
	public static BlindResult run(final Volume image, final BlindOptions options, final FitPlan plan, final Monitor monitor, final BlindListener listener) {
		return run(image, options, plan, monitor, listener, java.util.function.UnaryOperator.identity());
	}

	/**
	 * As {@link #run(Volume, BlindOptions, FitPlan, Monitor, BlindListener)} with every model family passed
	 * through {@code adapt} first (e.g. {@link ModelFit#peakCentred} for simulations whose PSF was centred on
	 * its maximum).
	 */
	static BlindResult run(final Volume image, final BlindOptions options, final FitPlan plan, final Monitor monitor, final BlindListener listener,
			final java.util.function.UnaryOperator<ModelFit.Space> adapt) {
		if (plan == null) return run(image, options, monitor, listener);
		if (image == null || options == null) throw new IllegalArgumentException("No image or options given");
		options.checkFor(image);
		if (options.start() instanceof PsfStart.Given)
			throw new IllegalArgumentException("A model fit starts from a Gaussian or from a PSF model with optics, not from a given PSF");
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		final BlindListener lis = listener == null ? BlindListener.NONE : listener;
		final int[] n = image.shape();
		final VoxelSize vs = image.voxelSize();
		final double[] um = micronSizes(vs);
		final List<String> notes = new ArrayList<>();
		ModelFit.Space space;
		ModelFit.Space rival = null;
		int[] k;
		if (options.start() instanceof PsfStart.Gaussian g) {
			final ModelFit.Space gs = adapt.apply(ModelFit.gaussian(g.fwhmLateral(), g.fwhmAxial(), n[2] > 1));
			final ModelFit.Space ws = adapt.apply(ModelFit.widefieldShape(g.fwhmLateral(), g.fwhmAxial(), n[2] > 1));
			space = plan.gaussianStart() == FitPlan.GaussianStart.WIDEFIELD ? ws : gs;
			if (plan.gaussianStart() == FitPlan.GaussianStart.BY_HELD_OUT) rival = ws;
			if (options.support() != null) k = options.support().shape();
			else {
				k = new int[] { size(3 * g.fwhmLateral() / um[0], n[0]), size(3 * g.fwhmLateral() / um[1], n[1]), n[2] == 1 ? 1 : size(3 * g.fwhmAxial() / um[2], n[2]) };
				final int[] big = LightBox.largest(n);
				if (plan.gaussianStart() != FitPlan.GaussianStart.GAUSSIAN) {
					final int[] w = LightBox.holding(ws.psf(ws.start(), new PsfGrid(big[0], big[1], big[2], um[0], um[1], um[2])), new ArrayList<>());
					for (int d = 0; d < 3; d++) k[d] = Math.max(k[d], w[d]);
					notes.add("PSF box " + k[0] + " x " + k[1] + " x " + k[2] + ": ±3 FWHM of the starting Gaussian, enlarged to hold 95 % of the light of a widefield PSF of the same widths within the image");
				}
			}
		} else {
			final PsfStart.Model m = (PsfStart.Model) options.start();
			space = adapt.apply(ModelFit.optics(m.key(), options.optics()));
			if (options.support() != null) k = options.support().shape();
			else {
				final int[] big = LightBox.largest(n);
				k = LightBox.holding(space.psf(space.start(), new PsfGrid(big[0], big[1], big[2], um[0], um[1], um[2])), notes);
				notes.add("PSF box " + k[0] + " x " + k[1] + " x " + k[2] + ": the smallest holding 95 % of the starting model's light within the image");
			}
		}
		MemoryBudget.require(3 * BlindSolver.bytesNeeded(n, k, options.edges()), "blind deconvolution with a model fit of a " + n[0] + " x " + n[1] + " x " + n[2] + " image");
		final Preprocessing.Data d = Preprocessing.data(image, options.offset(), options.background());
		notes.addAll(d.notes());
		mon.checkCancelled();
		final float[] y = d.y();
		ModelFit.Fit fit = ModelFit.fit(y, n, um, image, d.background(), options.edges(), k, space, plan.settings().withObjectTv(options.objectTv()), mon);
		if (rival != null) {
			// a Gaussian start: the Gaussian and the widefield shape of the same widths are both fitted, and the one
			// that predicts the held-out half better is kept (cross-validated model choice; same split and box)
			final ModelFit.Fit other = ModelFit.fit(y, n, um, image, d.background(), options.edges(), k, rival, plan.settings().withObjectTv(options.objectTv()), mon);
			final boolean wide = other.heldOutLogLikelihood() > fit.heldOutLogLikelihood();
			notes.add(String.format(Locale.ROOT, "Model choice from the Gaussian start: the held-out log-likelihood of the widefield shape is %+.4g against the Gaussian's: %s kept",
					other.heldOutLogLikelihood() - fit.heldOutLogLikelihood(), wide ? "the widefield shape" : "the Gaussian"));
			notes.add("(not kept) " + (wide ? fit : other).summary());
			if (wide) {
				fit = other;
				space = rival;
			}
		}
		notes.add(fit.summary());
		notes.addAll(fit.notes());
		if (fit.optics() != null && options.support() == null && !ModelFit.WIDEFIELD_SHAPE.equals(fit.model())) {
			final int[] big = LightBox.largest(n);
			final double f = LightBox.fraction(space.psf(fit.parameters().stream().mapToDouble(ModelFit.Parameter::value).toArray(),
					new PsfGrid(big[0], big[1], big[2], um[0], um[1], um[2])), k);
			if (f < LightBox.FRACTION)
				notes.add(String.format(Locale.ROOT, "The PSF box holds only %.0f %% of the fitted model's light within the image: give a larger support box", 100 * f));
		}
		final float[] h0 = space.psf(space.start(), new PsfGrid(k[0], k[1], k[2], um[0], um[1], um[2])).data();
		final List<PsfSnapshot> snaps = new ArrayList<>();
		snaps.add(snapshot(0, h0, h0, k, vs));
		snaps.add(snapshot(0, fit.psf().data(), h0, k, vs));
		float[] hFinal = fit.psf().data().clone();
		final List<RefineStep> steps = new ArrayList<>();
		final int max = options.iterations();
		if (plan.refine()) {
			final PsfConstraints constraints = new PsfConstraints(k[0], k[1], k[2], um[0], um[1], um[2],
					options.bandLimit() ? OtfSupport.widefield(options.optics()) : null, options.symmetric(), options.centring(), hFinal);
			constraints.trustRegion(hFinal, plan.trustRadius());
			final float[][] halves = ModelFit.split(y, plan.settings().photonsPerUnit());
			final BlindSolver r = new BlindSolver(fit.psf(), n, options.edges(), halves[0], d.background() / 2, options.objectTv(), options.psfTv(), constraints);
			r.validateWith(halves[1]);
			for (int i = 0; i < plan.settings().candidateIterations(); i++) {
				mon.checkCancelled();
				r.objectUpdate(mon::checkCancelled);
			}
			// PSF steps in blocks of snapshotInterval iterations; at each block's end the block's PSF is checked
			// against the last kept one, each with its own object re-fitted from the flat start (candidateIterations
			// RL iterations on the training voxels) and scored on the held-out voxels: at a fixed object, a narrower
			// PSF looks better while the object is blurrier than the truth, and an object warm-started from the
			// refinement's favours the PSF it was fitted with
			final BlindSolver check = ModelFit.solver(fit.psf(), n, options.edges(), halves, d.background(), options.objectTv());
			float[] kept = hFinal.clone();
			final float[] flat = check.objectCopy();
			final int block = options.snapshotInterval(), w = plan.settings().candidateIterations();
			ModelFit.Score keptScore = score(check, kept, flat, w, mon);
			for (int it = 1; it <= max; it++) {
				mon.checkCancelled();
				mon.progress(it - 1, 2 * max, "Refining the PSF: iteration " + it + " of " + max);
				for (int u = 0; u < options.objectUpdates(); u++) r.objectUpdate(mon::checkCancelled);
				for (int u = 0; u < Math.max(1, options.psfUpdates()); u++) r.psfUpdate(mon::checkCancelled);
				if (it % block == 0 || it == max) {
					final float[] cand = r.psf().clone();
					final double dist = constraints.distanceToAnchor(cand);
					final ModelFit.Score next = score(check, cand, flat, w, mon);
					final double before = keptScore.value(), after = next.value();
					final double t = ModelFit.pairedT(keptScore.rows(), next.rows());
					final boolean keep = after > before && t > REFINE_T;
					final String why = keep
							? String.format(Locale.ROOT, "kept: held-out log-likelihood (object re-fitted) %+.4g, paired t %.2f > %.1f over blocks of rows; distance to the model %.3f (trust radius %.3g)",
									after - before, t, REFINE_T, dist, plan.trustRadius())
							: after > before
									? String.format(Locale.ROOT, "undone: held-out log-likelihood %+.4g is within its noise (paired t %.2f ≤ %.1f over blocks of rows); distance to the model %.3f",
											after - before, t, REFINE_T, dist)
									: String.format(Locale.ROOT, "undone: held-out log-likelihood (object re-fitted) would fall by %.4g (paired t %.2f); distance to the model %.3f", before - after,
											t, dist);
					steps.add(new RefineStep(it, before, after, dist, keep, why));
					if (keep) {
						kept = cand;
						keptScore = next;
					} else r.replacePsf(kept);
					if (it < max) snaps.add(snapshot(it, r.psf(), h0, k, vs));
				}
			}
			r.replacePsf(kept);
			hFinal = r.psf().clone();
			snaps.add(snapshot(max, hFinal, h0, k, vs));
			final long nk = steps.stream().filter(RefineStep::accepted).count();
			notes.add("Free-form refinement: " + nk + " of " + steps.size() + " PSF steps kept (held-out likelihood), trust radius " + plan.trustRadius());
		}
		// the object on all the data with the final PSF
		final Volume psf = Volume.wrap(hFinal, k[0], k[1], k[2], vs);
		final PsfConstraints none = new PsfConstraints(k[0], k[1], k[2], 1, 1, 1, null, false, false, hFinal);
		final BlindSolver s = new BlindSolver(psf, n, options.edges(), y, d.background(), options.objectTv(), 0, none);
		final List<BlindReport> history = new ArrayList<>();
		final EstimateView objectView = objectView(s, n), psfView = psfView(s, k, vs);
		for (int it = 1; it <= max; it++) {
			mon.checkCancelled();
			mon.progress(plan.refine() ? max + it - 1 : it - 1, plan.refine() ? 2 * max : max, "Deconvolving with the fitted PSF: iteration " + it + " of " + max);
			RichardsonLucyEngine.Step obj = null;
			for (int u = 0; u < options.objectUpdates(); u++) obj = s.objectUpdate(mon::checkCancelled);
			final BlindReport rep = new BlindReport(it, max, obj.logLikelihood(), obj.relativeChange(), 0, obj.estimateSum(), obj.modelSum());
			history.add(rep);
			lis.iterationDone(rep, objectView, psfView);
		}
		mon.checkCancelled();
		final float[] out = new float[y.length];
		s.crop(out);
		mon.progress(1, 1, "Blind deconvolution done");
		return new BlindResult(Volume.wrap(out, n[0], n[1], n[2], vs), Volume.wrap(hFinal.clone(), k[0], k[1], k[2], vs), snaps, history, d.offset(),
				d.background(), notes, fit, steps);
	}

	/**
	 * Paired t (over blocks of held-out rows, {@link ModelFit#pairedT}) a refinement step must exceed to be kept:
	 * about a one-sided 2.3 % chance that a step which does not predict better is kept anyway (normal tail).
	 */
	static final double REFINE_T = 2;

	/** Held-out log-likelihood of PSF h with its own object: w RL iterations from x (the flat start) on the training voxels. */
	private static ModelFit.Score score(final BlindSolver check, final float[] h, final float[] x, final int w, final Monitor mon) {
		check.replacePsf(h);
		check.setObject(x);
		return ModelFit.peakHeldOutRows(check, w, mon::checkCancelled);
	}

	/** µm per voxel, or 1 per voxel for an uncalibrated image (used only by constraints that then are off). */
	private static double[] micronSizes(final VoxelSize v) {
		if (!v.isCalibrated()) return new double[] { 1, 1, 1 };
		final double f = PsfGrid.micronsPer(v);
		return new double[] { v.dx() * f, v.dy() * f, v.dz() * f };
	}

	// -- snapshots --

	private static PsfSnapshot snapshot(final int it, final float[] h, final float[] h0, final int[] k, final VoxelSize vs) {
		final Volume v = Volume.wrap(h.clone(), k[0], k[1], k[2], vs);
		double diff = 0, ref = 0;
		for (int i = 0; i < h.length; i++) {
			final double e = h[i] - h0[i];
			diff += e * e;
			ref += (double) h0[i] * h0[i];
		}
		return new PsfSnapshot(it, v, Fwhm.lateral(v), k[2] > 1 ? Fwhm.axial(v) : Double.NaN, Math.sqrt(diff / ref), Sums.sum(v.data()));
	}

	private static EstimateView objectView(final BlindSolver s, final int[] n) {
		return new EstimateView() {
			@Override public int nx() { return n[0]; }
			@Override public int ny() { return n[1]; }
			@Override public int nz() { return n[2]; }

			@Override
			public float get(final int x, final int y, final int z) {
				if (x < 0 || y < 0 || z < 0 || x >= n[0] || y >= n[1] || z >= n[2])
					throw new IndexOutOfBoundsException("(" + x + ", " + y + ", " + z + ") is outside the " + n[0] + " x " + n[1] + " x " + n[2] + " image");
				return s.objectAt(x, y, z);
			}

			@Override
			public void copyTo(final float[] dst) {
				if (dst.length != n[0] * n[1] * n[2]) throw new IllegalArgumentException("Array of " + dst.length + " values does not match the image");
				s.crop(dst);
			}

			@Override
			public Volume toVolume() {
				final Volume v = Volume.zeros(n[0], n[1], n[2], null);
				s.crop(v.data());
				return v;
			}
		};
	}

	private static EstimateView psfView(final BlindSolver s, final int[] k, final VoxelSize vs) {
		return new EstimateView() {
			@Override public int nx() { return k[0]; }
			@Override public int ny() { return k[1]; }
			@Override public int nz() { return k[2]; }

			@Override
			public float get(final int x, final int y, final int z) {
				if (x < 0 || y < 0 || z < 0 || x >= k[0] || y >= k[1] || z >= k[2])
					throw new IndexOutOfBoundsException("(" + x + ", " + y + ", " + z + ") is outside the " + k[0] + " x " + k[1] + " x " + k[2] + " PSF box");
				return s.psf()[x + k[0] * (y + k[1] * z)];
			}

			@Override
			public void copyTo(final float[] dst) {
				if (dst.length != k[0] * k[1] * k[2]) throw new IllegalArgumentException("Array of " + dst.length + " values does not match the PSF box");
				System.arraycopy(s.psf(), 0, dst, 0, dst.length);
			}

			@Override
			public Volume toVolume() { return Volume.wrap(s.psf().clone(), k[0], k[1], k[2], vs); }
		};
	}

	// -- starting PSF --

	/** The starting PSF on the support box: non-negative, unit sum (rescaled only if off by more than 1e-4), image calibration. */
	static Volume startingPsf(final Volume image, final BlindOptions o, final List<String> notes) {
		final int[] n = image.shape();
		Volume p;
		if (o.start() instanceof PsfStart.Given g) {
			final Volume given = g.psf();
			if (o.support() == null) {
				ConvolutionOperator.checkPsfFor(given, n);
				p = given.copy();
			} else {
				final int bad = given.firstNonFinite();
				if (bad >= 0) throw new IllegalArgumentException("The starting PSF has a non-finite value (" + given.data()[bad] + ") at " + given.position(bad));
				p = Psfs.resizeCentered(given, o.support().nx(), o.support().ny(), o.support().nz());
				if (!p.sameShape(given)) notes.add("The starting PSF was " + (p.size() < given.size() ? "cropped" : "padded") + " to the support box " + o.support());
			}
		} else {
			final int[] box = box(image, o);
			final double[] um = micronSizes(image.voxelSize());
			if (o.start() instanceof PsfStart.Model m) {
				p = PsfModels.get(m.key()).compute(o.optics(), new PsfGrid(box[0], box[1], box[2], um[0], um[1], um[2]));
			} else {
				final PsfStart.Gaussian gs = (PsfStart.Gaussian) o.start();
				p = gaussian(box, um, gs.fwhmLateral(), n[2] > 1 ? gs.fwhmAxial() : Double.POSITIVE_INFINITY);
			}
		}
		final int[] clipped = new int[1];
		p = Psfs.clipNegative(p, clipped);
		if (clipped[0] > 0) notes.add("The starting PSF had " + clipped[0] + " negative values; they were set to zero");
		final double s = p.sum();
		if (!(s > 0)) throw new IllegalArgumentException("The starting PSF has no positive values");
		if (Math.abs(s - 1) > 1e-4) {
			p = Psfs.normalized(p);
			if (o.start() instanceof PsfStart.Given) notes.add(String.format(Locale.ROOT, "The starting PSF was scaled to unit sum (its sum was %.6g)", s));
		}
		return p.withVoxelSize(image.voxelSize());
	}

	/** Support box: given, else from the optics, else from the starting Gaussian; capped to the image. */
	static int[] box(final Volume image, final BlindOptions o) {
		final int[] n = image.shape();
		if (o.support() != null) return o.support().shape();
		final double[] um = micronSizes(image.voxelSize());
		final double hxy, hz;
		final Optics op = o.optics();
		if (op != null) {
			final double lambda = op.longestWavelength(), ni = op.immersionIndex(), ns = op.sampleIndex();
			hxy = 2.5 * lambda / op.na();
			hz = 3 * lambda / (ni * (1 - Math.cos(op.apertureAngle()))) * Math.max(1, ni / ns) + Math.abs(op.depth() * (ni / ns - 1));
		} else {
			final PsfStart.Gaussian g = (PsfStart.Gaussian) o.start();
			hxy = 2 * g.fwhmLateral();
			hz = 2 * g.fwhmAxial();
		}
		return new int[] { size(hxy / um[0], n[0]), size(hxy / um[1], n[1]), n[2] == 1 ? 1 : size(hz / um[2], n[2]) };
	}

	private static int size(final double half, final int n) {
		final int cap = n % 2 == 1 ? n : n - 1;
		return (int) Math.max(1, Math.min(cap, 2 * Math.ceil(half) + 1));
	}

	/** Separable Gaussian of these FWHMs (µm) sampled at voxel centres, unit sum. */
	static Volume gaussian(final int[] k, final double[] um, final double fwhmXY, final double fwhmZ) {
		final double c = 4 * Math.log(2);
		final double[][] f = new double[3][];
		final double[] w = { fwhmXY, fwhmXY, fwhmZ };
		for (int d = 0; d < 3; d++) {
			f[d] = new double[k[d]];
			for (int i = 0; i < k[d]; i++) {
				final double t = (i - (k[d] - 1) / 2) * um[d] / w[d];
				f[d][i] = Math.exp(-c * t * t);
			}
		}
		final Volume v = Volume.zeros(k[0], k[1], k[2], null);
		double sum = 0;
		for (int z = 0; z < k[2]; z++)
			for (int y = 0; y < k[1]; y++)
				for (int x = 0; x < k[0]; x++) sum += f[0][x] * f[1][y] * f[2][z];
		for (int z = 0; z < k[2]; z++)
			for (int y = 0; y < k[1]; y++)
				for (int x = 0; x < k[0]; x++) v.set(x, y, z, (float) (f[0][x] * f[1][y] * f[2][z] / sum));
		return v;
	}
}
