package org.parfocal.blind;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.EigenDecomposition;
import org.apache.commons.math3.linear.RealMatrix;
import org.apache.commons.math3.optim.InitialGuess;
import org.apache.commons.math3.optim.MaxEval;
import org.apache.commons.math3.optim.PointValuePair;
import org.apache.commons.math3.optim.nonlinear.scalar.GoalType;
import org.apache.commons.math3.optim.nonlinear.scalar.ObjectiveFunction;
import org.apache.commons.math3.optim.nonlinear.scalar.noderiv.NelderMeadSimplex;
import org.apache.commons.math3.optim.nonlinear.scalar.noderiv.SimplexOptimizer;
import org.apache.commons.math3.exception.TooManyEvaluationsException;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Parametric blind estimation: the parameters of a physical PSF model fitted to the recording, after Markham
 * &amp; Conchello (J. Opt. Soc. Am. A 16(10), 1999), who alternate object updates with a search over the PSF
 * parameters that maximises the Poisson likelihood.
 * <p>
 * <b>What is maximised.</b> Holding the object fixed and maximising the likelihood over the PSF parameters
 * prefers PSFs that are too narrow whenever the object estimate is still blurrier than the truth (it is, after
 * any finite number of Richardson–Lucy iterations), and the full joint maximum is the trivial pair (a delta PSF,
 * the data as the object). Here each candidate PSF gets its own object, re-fitted by a fixed number of
 * Richardson–Lucy (or RL-TV) iterations from the same flat start on half of the voxels (a 3D checkerboard;
 * the other half is missing data in the EM sense, ratio 1), and the candidate is scored by the Poisson
 * log-likelihood of the <i>held-out</i> half. Noise fitting cannot raise that score, so it does not favour
 * narrow PSFs; it is a cross-validated profile likelihood (held-out validation is common practice).
 * <p>
 * <b>Search</b>: Nelder–Mead (Commons Math {@link SimplexOptimizer}) over the parameters in units of their
 * scales, values clamped to their bounds (a clamped value is penalised by its distance to the bound).
 * <b>Uncertainty</b>: σ<sub>i</sub> = √((−∇²ℓ)⁻¹)<sub>ii</sub> from a central-difference Hessian of the held-out
 * log-likelihood ℓ at the optimum (the curvature of the log-likelihood, Fisher information; common practice).
 * ℓ is of half the voxels, so these σ are about √2 larger than the full data's would be; NaN when the
 * likelihood is not curved downward in some direction (a parameter the data do not determine).
 */
public final class ModelFit {

	private ModelFit() {}

	/** One fitted parameter: value, 1σ from the curvature (NaN if undetermined), start and bounds, in {@code unit}. */
	public record Parameter(String name, String unit, double value, double sigma, double start, double low, double high) {
		@Override
		public String toString() {
			return String.format(Locale.ROOT, "%s = %.4g ± %.2g %s (start %.4g)", name, value, sigma, unit, start);
		}
	}

	/** One evaluated candidate: parameter values and its held-out log-likelihood. */
	public record Candidate(double[] values, double heldOutLogLikelihood) {}

	/**
	 * Outcome.
	 *
	 * @param model "gaussian" or a PSF model key (e.g. "gibson-lanni")
	 * @param psf the fitted PSF on the box, unit sum, image calibration
	 * @param optics the fitted optics (null for the Gaussian)
	 * @param evaluations candidates evaluated (search and curvature)
	 * @param seconds wall time of the whole fit
	 */
	public record Fit(String model, List<Parameter> parameters, Volume psf, Optics optics, double heldOutLogLikelihood, int evaluations,
			double seconds, List<Candidate> trace, List<String> notes) {
		public Fit {
			parameters = List.copyOf(parameters);
			trace = List.copyOf(trace);
			notes = List.copyOf(notes);
		}

		/** One line per parameter. */
		public String summary() {
			final StringBuilder b = new StringBuilder(model).append(':');
			for (final Parameter p : parameters) b.append(' ').append(p).append(';');
			return b.toString();
		}
	}

	/**
	 * A family of PSFs over a few parameters.
	 */
	public interface Space {
		String model();

		List<String> names();

		List<String> units();

		double[] start();

		/** Nelder–Mead step and finite-difference scale per parameter. */
		double[] scales();

		double[] low();

		double[] high();

		/** The PSF for these parameter values on the box (µm voxel sizes), unit sum. */
		Volume psf(double[] values, PsfGrid box);

		/** The optics for these values, or null. */
		Optics optics(double[] values);
	}

	/** Gaussian of lateral and axial FWHM (µm): starts, bounds 0.4–2.5× the start. */
	public static Space gaussian(final double fwhmLateral, final double fwhmAxial, final boolean is3D) {
		return new Space() {
			@Override public String model() { return "gaussian"; }
			@Override public List<String> names() { return is3D ? List.of("fwhm_xy", "fwhm_z") : List.of("fwhm_xy"); }
			@Override public List<String> units() { return is3D ? List.of("µm", "µm") : List.of("µm"); }
			@Override public double[] start() { return is3D ? new double[] { fwhmLateral, fwhmAxial } : new double[] { fwhmLateral }; }
			@Override public double[] scales() { return is3D ? new double[] { 0.1 * fwhmLateral, 0.1 * fwhmAxial } : new double[] { 0.1 * fwhmLateral }; }
			@Override public double[] low() { return is3D ? new double[] { 0.4 * fwhmLateral, 0.4 * fwhmAxial } : new double[] { 0.4 * fwhmLateral }; }
			@Override public double[] high() { return is3D ? new double[] { 2.5 * fwhmLateral, 2.5 * fwhmAxial } : new double[] { 2.5 * fwhmLateral }; }

			@Override
			public Volume psf(final double[] v, final PsfGrid g) {
				return BlindDeconvolution.gaussian(new int[] { g.nx(), g.ny(), g.nz() }, new double[] { g.dx(), g.dy(), g.dz() }, v[0],
						is3D ? v[1] : Double.POSITIVE_INFINITY);
			}

			@Override public Optics optics(final double[] v) { return null; }
		};
	}

	/**
	 * A widefield PSF of given lateral and axial FWHM (µm): the Born &amp; Wolf model ({@code born-wolf}) whose NA,
	 * index n and wavelength λ are set from the widths by the usual widefield formulas, lateral FWHM ≈
	 * 0.51·λ/NA and axial FWHM ≈ 0.88·λ/(n − √(n² − NA²)) (common practice, from memory), then scaled together
	 * so that n = 1.5 (the model depends on λ, NA and n only through NA/λ and n/λ). The two parameters are
	 * these nominal widths (the fitted PSF's measured FWHM differs from them by the formulas' error); bounds
	 * 0.4–2.5× the start, as the Gaussian's. Unlike a Gaussian, this shape carries the out-of-focus cone of a
	 * widefield PSF: a Gaussian fitted to a widefield recording ends too narrow, because it cannot hold the
	 * light the cone spreads over the defocused planes (measured, see the README).
	 */
	public static Space widefieldShape(final double fwhmLateral, final double fwhmAxial, final boolean is3D) {
		final Space g = gaussian(fwhmLateral, fwhmAxial, is3D);
		return new Space() {
			@Override public String model() { return WIDEFIELD_SHAPE; }
			@Override public List<String> names() { return g.names(); }
			@Override public List<String> units() { return g.units(); }
			@Override public double[] start() { return g.start(); }
			@Override public double[] scales() { return g.scales(); }
			@Override public double[] low() { return g.low(); }
			@Override public double[] high() { return g.high(); }

			@Override
			public Volume psf(final double[] v, final PsfGrid grid) {
				return PsfModels.get("born-wolf").compute(optics(v), grid);
			}

			@Override
			public Optics optics(final double[] v) {
				return widefieldOptics(v[0], is3D ? v[1] : 3 * v[0]);
			}
		};
	}

	/** Model name of {@link #widefieldShape}. */
	public static final String WIDEFIELD_SHAPE = "widefield-shape";

	/** Optics of a Born &amp; Wolf PSF with these nominal FWHMs (µm), n = 1.5 (see {@link #widefieldShape}). */
	static Optics widefieldOptics(final double fwhmLateral, final double fwhmAxial) {
		final double na1 = 0.51 / fwhmLateral, q1 = 0.88 / fwhmAxial; // λ = 1
		final double n1 = (na1 * na1 + q1 * q1) / (2 * q1); // n − √(n² − NA²) = q
		final double c = 1.5 / n1;
		final double lambda = Math.max(0.1, Math.min(5, c));
		final double na = Math.min(0.995 * 1.5, na1 * lambda);
		return Optics.builder().na(na).immersionIndex(1.5).sampleIndex(1.5).emissionWavelength(lambda).build();
	}

	/**
	 * The same family with every PSF shifted by whole voxels so that its brightest voxel is the centre voxel
	 * ({@link org.parfocal.conv.Psfs#centerOnPeak}): for data whose PSF was centred on its axial maximum rather
	 * than on the emitter (the focal shift of an index mismatch then moves no object).
	 */
	public static Space peakCentred(final Space s) {
		return new Space() {
			@Override public String model() { return s.model(); }
			@Override public List<String> names() { return s.names(); }
			@Override public List<String> units() { return s.units(); }
			@Override public double[] start() { return s.start(); }
			@Override public double[] scales() { return s.scales(); }
			@Override public double[] low() { return s.low(); }
			@Override public double[] high() { return s.high(); }
			@Override public Volume psf(final double[] v, final PsfGrid g) { return org.parfocal.conv.Psfs.normalized(org.parfocal.conv.Psfs.centerOnPeak(s.psf(v, g))); }
			@Override public Optics optics(final double[] v) { return s.optics(v); }
		};
	}

	/**
	 * A pupil model from optics (e.g. "gibson-lanni") over depth (µm, 0 to 3× the start + 5), sample index (1.0
	 * to the immersion index's bound of 3, but below the NA's need only in the model) and NA (0.8–1.05× the start,
	 * below both immersion indices).
	 */
	public static Space optics(final String key, final Optics start) {
		final double maxNa = Math.min(1.05 * start.na(), 0.995 * Math.min(start.immersionIndex(), start.immersionIndexDesign()));
		return new Space() {
			@Override public String model() { return key; }
			@Override public List<String> names() { return List.of("depth", "sample_index", "na"); }
			@Override public List<String> units() { return List.of("µm", "", ""); }
			@Override public double[] start() { return new double[] { start.depth(), start.sampleIndex(), start.na() }; }
			@Override public double[] scales() { return new double[] { Math.max(0.5, 0.15 * start.depth()), 0.03, 0.02 }; }
			@Override public double[] low() { return new double[] { 0, 1.0, 0.8 * start.na() }; }
			@Override public double[] high() { return new double[] { 3 * start.depth() + 5, 1.8, maxNa }; }

			@Override
			public Volume psf(final double[] v, final PsfGrid g) {
				return PsfModels.get(key).compute(optics(v), g);
			}

			@Override
			public Optics optics(final double[] v) {
				return start.toBuilder().depth(v[0]).sampleIndex(v[1]).na(v[2]).build();
			}
		};
	}

	/**
	 * @param candidateIterations cap on the RL iterations of each candidate's object, from the flat start (each stops past its held-out peak)
	 * @param maxEvaluations cap on the candidates of the search
	 * @param objectTv TV weight of the object fits (0: plain RL)
	 * @param uncertainty also compute σ from the curvature (2p² + 1 more candidates)
	 * @param photonsPerUnit photons per data unit after offset removal (camera gain's inverse), for the split
	 */
	public record Settings(int candidateIterations, int maxEvaluations, double objectTv, boolean uncertainty, double photonsPerUnit) {
		public static final int DEFAULT_CANDIDATE_ITERATIONS = 150, DEFAULT_MAX_EVALUATIONS = 40;

		public Settings {
			if (candidateIterations < 1 || candidateIterations > 1000)
				throw new IllegalArgumentException("Object iterations per candidate PSF must be between 1 and 1000, got " + candidateIterations);
			if (maxEvaluations < 3 || maxEvaluations > 10_000)
				throw new IllegalArgumentException("The candidate PSFs of the model search must be between 3 and 10000, got " + maxEvaluations);
			if (!(objectTv >= 0 && objectTv <= BlindOptions.MAX_TV_WEIGHT))
				throw new IllegalArgumentException("The object TV weight must be between 0 and " + BlindOptions.MAX_TV_WEIGHT + ", got " + objectTv);
			if (!(photonsPerUnit > 0) || !Double.isFinite(photonsPerUnit))
				throw new IllegalArgumentException("Photons per unit must be positive, got " + photonsPerUnit);
		}

		public Settings(final int candidateIterations, final int maxEvaluations, final double objectTv, final boolean uncertainty) {
			this(candidateIterations, maxEvaluations, objectTv, uncertainty, 1);
		}

		public static Settings defaults() {
			return new Settings(DEFAULT_CANDIDATE_ITERATIONS, DEFAULT_MAX_EVALUATIONS, 0, true, 1);
		}

		public Settings withObjectTv(final double tv) {
			return new Settings(candidateIterations, maxEvaluations, tv, uncertainty, photonsPerUnit);
		}
	}

	/** Seed of the split (fixed: the fit is deterministic). */
	static final long SPLIT_SEED = 0x5eed_15L;

	/** Poisson thinning of y into two halves ({@link org.parfocal.core.PoissonThinning}, seed {@link #SPLIT_SEED}). */
	static float[][] split(final float[] y, final double photonsPerUnit) {
		return org.parfocal.core.PoissonThinning.split(y, photonsPerUnit, SPLIT_SEED);
	}

	/**
	 * Fits the space's parameters to the data: a Nelder–Mead search for the parameters whose PSF, with its own
	 * object ({@code candidateIterations} RL iterations from the flat start on the training voxels), best
	 * predicts the held-out voxels.
	 *
	 * @param y offset-corrected data (not modified)
	 * @param um voxel sizes in µm
	 * @param calibration the image (for the output's calibration)
	 */
	public static Fit fit(final float[] y, final int[] n, final double[] um, final Volume calibration, final double background, final EdgeMode edges,
			final int[] box, final Space space, final Settings settings, final Monitor monitor) {
		final long t0 = System.nanoTime();
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		final PsfGrid grid = new PsfGrid(box[0], box[1], box[2], um[0], um[1], um[2]);
		final float[][] halves = split(y, settings.photonsPerUnit());
		final double[] start = space.start(), scale = space.scales(), lo = space.low(), hi = space.high();
		final int p = start.length;
		final List<Candidate> trace = new ArrayList<>();
		final List<String> notes = new ArrayList<>();
		final Map<String, Double> cache = new LinkedHashMap<>();
		final BlindSolver cand = solver(space.psf(start, grid), n, edges, halves, background, settings.objectTv());
		final float[] flat = cand.objectCopy();
		final int total = settings.maxEvaluations() + (settings.uncertainty() ? 2 * p * p + 1 : 0);
		final java.util.function.ToDoubleFunction<double[]> score = v -> {
			final String key = java.util.Arrays.toString(v);
			final Double c = cache.get(key);
			if (c != null) return c;
			mon.checkCancelled();
			mon.progress(Math.min(trace.size(), total), total, "Fitting the PSF model: candidate " + (trace.size() + 1));
			cand.replacePsf(space.psf(v, grid).data());
			cand.setObject(flat);
			final double s = peakHeldOut(cand, settings.candidateIterations(), mon::checkCancelled);
			cache.put(key, s);
			trace.add(new Candidate(v.clone(), s));
			return s;
		};
		final double[] v = search(score, start, scale, lo, hi, settings.maxEvaluations(), notes);
		final double bestScore = score.applyAsDouble(v);
		notes.add(String.format(Locale.ROOT, "Model fit: %d candidate PSFs searched", trace.size()));
		final double[] sigma = fill(p, Double.NaN);
		if (settings.uncertainty()) curvature(score, v, scale, lo, hi, sigma, notes);
		final List<Parameter> params = new ArrayList<>();
		for (int i = 0; i < p; i++) {
			params.add(new Parameter(space.names().get(i), space.units().get(i), v[i], sigma[i], start[i], lo[i], hi[i]));
			if (v[i] <= lo[i] + 1e-9 * Math.abs(lo[i]) || v[i] >= hi[i] - 1e-9 * Math.abs(hi[i]))
				notes.add("The fitted " + space.names().get(i) + " sits at the bound of its search range (" + lo[i] + " to " + hi[i] + "): the model may not fit");
		}
		final Volume psf = space.psf(v, grid).withVoxelSize(calibration.voxelSize());
		return new Fit(space.model(), params, psf, space.optics(v), bestScore, trace.size(), (System.nanoTime() - t0) * 1e-9, trace, notes);
	}

	/** A solver fitted to the first half (background b/2), validated on the second. */
	static BlindSolver solver(final Volume psf, final int[] n, final EdgeMode edges, final float[][] halves, final double background, final double objectTv) {
		final int[] k = psf.shape();
		final PsfConstraints none = new PsfConstraints(k[0], k[1], k[2], 1, 1, 1, null, false, false, psf.data());
		final BlindSolver s = new BlindSolver(psf, n, edges, halves[0], background / 2, objectTv, 0, none);
		s.validateWith(halves[1]);
		return s;
	}

	/** One Nelder–Mead search from {@code from} in units of the scales; values clamped, the excess penalised. */
	private static double[] search(final java.util.function.ToDoubleFunction<double[]> score, final double[] from, final double[] scale, final double[] lo,
			final double[] hi, final int maxEval, final List<String> notes) {
		final int p = from.length;
		final double[] bestU = new double[p];
		final double[] bestS = { Double.NEGATIVE_INFINITY };
		final java.util.function.ToDoubleFunction<double[]> objective = u -> {
			final double[] v = new double[p];
			double excess = 0;
			for (int i = 0; i < p; i++) {
				final double raw = from[i] + u[i] * scale[i];
				v[i] = Math.max(lo[i], Math.min(hi[i], raw));
				excess += Math.abs(raw - v[i]) / scale[i];
			}
			final double s = score.applyAsDouble(v);
			final double pen = s - excess * (1 + Math.abs(s) * 1e-3);
			if (pen > bestS[0]) {
				bestS[0] = pen;
				System.arraycopy(u, 0, bestU, 0, p);
			}
			return pen;
		};
		try {
			new SimplexOptimizer(1e-9, 0.05).optimize(new MaxEval(maxEval), new ObjectiveFunction(objective::applyAsDouble), GoalType.MAXIMIZE,
					new InitialGuess(new double[p]), new NelderMeadSimplex(fill(p, 1.0)));
		} catch (final TooManyEvaluationsException e) {
			notes.add("A model search stopped at its cap of " + maxEval + " candidates; its best candidate is used");
		}
		final double[] v = new double[p];
		for (int i = 0; i < p; i++) v[i] = Math.max(lo[i], Math.min(hi[i], from[i] + bestU[i] * scale[i]));
		return v;
	}

	/** σ from the central-difference Hessian of the score at v (step: one scale, inside the bounds). */
	private static void curvature(final java.util.function.ToDoubleFunction<double[]> score, final double[] v, final double[] scale, final double[] lo,
			final double[] hi, final double[] sigma, final List<String> notes) {
		final int p = v.length;
		final double f0 = score.applyAsDouble(v);
		final double[] st = new double[p];
		for (int i = 0; i < p; i++) st[i] = Math.max(1e-9, Math.min(scale[i], Math.min(v[i] - lo[i], hi[i] - v[i])));
		final double[][] hs = new double[p][p];
		for (int i = 0; i < p; i++) {
			final double fp = score.applyAsDouble(shift(v, i, st[i], -1, 0)), fm = score.applyAsDouble(shift(v, i, -st[i], -1, 0));
			hs[i][i] = (fp - 2 * f0 + fm) / (st[i] * st[i]);
			for (int j = 0; j < i; j++) {
				final double a = score.applyAsDouble(shift(v, i, st[i], j, st[j])), b = score.applyAsDouble(shift(v, i, st[i], j, -st[j]));
				final double c = score.applyAsDouble(shift(v, i, -st[i], j, st[j])), d = score.applyAsDouble(shift(v, i, -st[i], j, -st[j]));
				hs[i][j] = hs[j][i] = (a - b - c + d) / (4 * st[i] * st[j]);
			}
		}
		final RealMatrix info = new Array2DRowRealMatrix(hs).scalarMultiply(-1);
		final EigenDecomposition e = new EigenDecomposition(info);
		for (final double ev : e.getRealEigenvalues())
			if (!(ev > 0)) {
				notes.add("The held-out likelihood is not curved downward in every direction at the fit: some parameter combination is not determined by the data (σ not given)");
				return;
			}
		final RealMatrix cov = e.getSolver().getInverse();
		for (int i = 0; i < p; i++) sigma[i] = Math.sqrt(cov.getEntry(i, i));
	}

	private static double[] shift(final double[] v, final int i, final double di, final int j, final double dj) {
		final double[] w = v.clone();
		w[i] += di;
		if (j >= 0) w[j] += dj;
		return w;
	}

	private static double[] fill(final int n, final double v) {
		final double[] a = new double[n];
		java.util.Arrays.fill(a, v);
		return a;
	}

	/** Validation log-likelihood of one candidate PSF with its own object (best along at most {@code iterations} RL iterations). */
	static double heldOut(final float[][] halves, final int[] n, final EdgeMode edges, final double background, final Volume psf, final int iterations,
			final double objectTv) {
		return peakHeldOut(solver(psf, n, edges, halves, background, objectTv), iterations, () -> {});
	}

	/** Iterations past the held-out peak after which a candidate's object run stops. */
	static final int PATIENCE = 8;

	/**
	 * The best held-out log-likelihood along the solver's RL path (at most {@code cap} updates; stops
	 * {@link #PATIENCE} updates past the best): each candidate stopped where its own object predicts the
	 * held-out voxels best (cross-validated early stopping). A fixed iteration count would favour narrow PSFs,
	 * with which RL converges faster.
	 */
	static double peakHeldOut(final BlindSolver s, final int cap, final Runnable cancel) {
		return peakHeldOutRows(s, cap, cancel).value();
	}

	/** A held-out score and its per-row contributions (rows of the image, y fastest then z) at the best iterate. */
	record Score(double value, double[] rows) {}

	/** {@link #peakHeldOut} with the held-out log-likelihood of every image row at the best iterate. */
	static Score peakHeldOutRows(final BlindSolver s, final int cap, final Runnable cancel) {
		double best = Double.NEGATIVE_INFINITY;
		double[] rows = null;
		int since = 0;
		for (int i = 0; i < cap && since < PATIENCE; i++) {
			final double v = s.objectUpdate(cancel).heldOutLogLikelihood();
			if (v > best) {
				best = v;
				rows = s.heldOutRows();
				since = 0;
			} else since++;
		}
		if (since < PATIENCE) {
			final double v = s.evaluate()[1];
			if (v > best || rows == null) {
				best = v;
				rows = s.heldOutRows();
			}
		}
		return new Score(best, rows);
	}

	/** Rows per block of the paired test (neighbouring rows share blur, so single rows are not independent). */
	static final int TEST_BLOCK_ROWS = 8;

	/**
	 * Paired t statistic of {@code after} against {@code before} (per-row held-out log-likelihoods of two
	 * PSFs on the same held-out voxels): the rows are summed in blocks of {@link #TEST_BLOCK_ROWS}, d = block
	 * sums of after − before, t = mean(d) / (sd(d)/√blocks) (Student's paired t, textbook). Positive when
	 * {@code after} predicts the held-out voxels better; above about 2 the gain is larger than the noise of
	 * the held-out half.
	 */
	static double pairedT(final double[] before, final double[] after) {
		if (before.length != after.length) throw new IllegalArgumentException("The held-out rows do not match");
		final int nb = (before.length + TEST_BLOCK_ROWS - 1) / TEST_BLOCK_ROWS;
		final double[] d = new double[nb];
		for (int i = 0; i < before.length; i++) d[i / TEST_BLOCK_ROWS] += after[i] - before[i];
		double mean = 0;
		for (final double v : d) mean += v;
		mean /= nb;
		double var = 0;
		for (final double v : d) var += (v - mean) * (v - mean);
		var /= Math.max(1, nb - 1);
		if (!(var > 0)) return mean > 0 ? Double.POSITIVE_INFINITY : mean < 0 ? Double.NEGATIVE_INFINITY : 0;
		return mean / Math.sqrt(var / nb);
	}
}
