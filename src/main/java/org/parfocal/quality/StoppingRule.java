package org.parfocal.quality;

import java.util.List;
import java.util.Locale;

/**
 * The suggested stopping iteration of an iterative deconvolution, from its iterates evaluated every few
 * iterations ({@link QualityWatch}).
 * <p>
 * <b>With references</b>: the iterate closest to them, k* = argmin_k d_k, d_k the sliced patch distance
 * ({@link ReferenceComparison#patchDistance}); ties go to the earlier iterate. Early iterates are still blurred
 * (far from sharp references), late ones carry amplified noise and ringing (far again), so the curve has a
 * minimum. The re-blur χ² ({@link ReblurConsistency}) is reported beside it but does not restrict the choice:
 * on our own synthetic data (the sample scene's cells, Poisson noise at 0.01 and 0.05 photons per unit,
 * Richardson–Lucy; see {@code QualityWatchTest}) the mean χ² of the iterates is at or below 1 from the first
 * check (iteration 5) on, long before the iterate of best PSNR, because the many dim voxels are fitted first,
 * while the truth itself scores χ² ≈ 1. Requiring χ² ≥ 1 would stop at iteration 5, 3 to 7 dB below the best
 * PSNR; the distance minimum lay 25–100 iterations and 0.1–0.9 dB from it over 8 noise realisations. The
 * distance curve is flat near its minimum, so the suggestion is a region rather than an exact iteration.
 * <p>
 * <b>Without references</b> (χ² only): the last iterate with χ²_k ≥ 1, the discrepancy principle (Morozov,
 * Soviet Math. Dokl. 7, 1966), which errs on the early side; the first evaluated iterate when none has χ² ≥ 1.
 * <p>
 * <b>Edges.</b> A minimum at the first or last evaluated iterate, or a χ² that is below 1 from the start or
 * never falls to 1, is no answer of the rule: the suggestion is then flagged not {@link Suggestion#interior},
 * its reason says so, and commands log it and mark it in the plot, instead of presenting the edge of the
 * evaluated range as a choice.
 * <p>
 * The rule is a running update ({@link Tracker}): the suggestion after the last point is the choice made point
 * by point, so a caller can keep a copy of the current best iterate while the run goes forward and return it
 * at the end without running again.
 */
public final class StoppingRule {

	/** χ² at or above which an iterate has not yet fitted noise (the rule without references). */
	public static final double CHI_SQUARE_LIMIT = 1;

	/** The rule in words, for provenance. */
	public static final String DESCRIPTION = "minimum of the patch distance to the references over the evaluated iterates "
			+ "(without references: last evaluated iterate with re-blur chi-square >= 1)";

	private StoppingRule() {}

	/**
	 * One evaluated iterate.
	 *
	 * @param iteration 1-based iteration number
	 * @param distance sliced patch distance to the references (NaN when there are no references)
	 * @param chiSquare mean re-blur χ² (NaN when not evaluated)
	 * @param whiteness mean lag-1 autocorrelation of the standardised residual (NaN when not evaluated)
	 */
	public record Point(int iteration, double distance, double chiSquare, double whiteness) {}

	/**
	 * @param iteration the suggested iteration, 0 when there were no points
	 * @param point the evaluated point of that iteration (null when there were none)
	 * @param reason one line: the rule that chose it and the numbers
	 * @param interior whether the rule found its stop inside the evaluated range (a distance minimum with evaluated
	 *        iterates on both sides; a χ² crossing of 1 between two evaluated iterates). False means the curve gave
	 *        no answer in the range: the iteration is then only the edge of the range, and the reason says so
	 */
	public record Suggestion(int iteration, Point point, String reason, boolean interior) {}

	/** The suggestion for points in increasing iteration order. */
	public static Suggestion suggest(final List<Point> points) {
		final Tracker t = new Tracker();
		for (final Point p : points) t.offer(p);
		return t.suggestion();
	}

	/** The running form of the rule: offer points in increasing iteration order. */
	public static final class Tracker {
		private Point best, first, last;
		private int count;

		/**
		 * @return true when {@code p} becomes the suggested iterate
		 * @throws IllegalArgumentException if iterations do not increase, or points with and without distance are mixed
		 */
		public boolean offer(final Point p) {
			if (p == null) throw new IllegalArgumentException("No point given");
			if (last != null && p.iteration() <= last.iteration())
				throw new IllegalArgumentException("Iterations must increase: " + p.iteration() + " after " + last.iteration());
			if (last != null && Double.isNaN(p.distance()) != Double.isNaN(last.distance()))
				throw new IllegalArgumentException("Iteration " + p.iteration() + " has " + (Double.isNaN(p.distance()) ? "no" : "a") + " distance, unlike the iterations before");
			count++;
			last = p;
			if (first == null) first = p;
			final boolean better;
			if (best == null) better = true;
			else if (!Double.isNaN(p.distance())) better = p.distance() < best.distance();
			else better = p.chiSquare() >= CHI_SQUARE_LIMIT; // the latest that still has χ² ≥ 1
			if (better) best = p;
			return better;
		}

		/** Number of points offered. */
		public int count() {
			return count;
		}

		public Suggestion suggestion() {
			if (best == null) return new Suggestion(0, null, "no iterate was evaluated", false);
			if (!Double.isNaN(best.distance())) {
				if (count < 3 || best == last)
					return new Suggestion(best.iteration(), best, String.format(Locale.ROOT,
							"no interior minimum: the patch distance was still falling at the last evaluated iteration %d (%.4g, %d evaluated iterates);"
									+ " the last iterate is the edge of the range, not a chosen stop: allow more iterations",
							best.iteration(), best.distance(), count), false);
				if (best == first)
					return new Suggestion(best.iteration(), best, String.format(Locale.ROOT,
							"no interior minimum: the patch distance rose from the first evaluated iteration %d (%.4g) on; the first iterate is the edge of the range,"
									+ " not a chosen stop: evaluate earlier, or check that the references show the same kind of structure at a comparable resolution",
							best.iteration(), best.distance()), false);
				return new Suggestion(best.iteration(), best, String.format(Locale.ROOT, "minimum patch distance %.4g over %d evaluated iterates (chi-square there %.3g)",
						best.distance(), count, best.chiSquare()), true);
			}
			if (best.chiSquare() >= CHI_SQUARE_LIMIT) {
				if (best == last)
					return new Suggestion(best.iteration(), best, String.format(Locale.ROOT,
							"no interior crossing: chi-square was still %.3g (>= 1) at the last evaluated iteration %d; the last iterate is the edge of the range, not a"
									+ " chosen stop: allow more iterations, or check the noise model (camera gain, read noise, background)",
							best.chiSquare(), best.iteration()), false);
				return new Suggestion(best.iteration(), best,
						String.format(Locale.ROOT, "last evaluated iterate with chi-square >= 1 (%.3g; discrepancy principle, no references)", best.chiSquare()), true);
			}
			return new Suggestion(best.iteration(), best, String.format(Locale.ROOT,
					"no interior crossing: chi-square was already %.3g (< 1: noise being fitted) at the first evaluated iteration %d; evaluate earlier",
					first.chiSquare(), first.iteration()), false);
		}
	}
}
