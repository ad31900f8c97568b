package org.parfocal.blind;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Preprocessing;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;

/**
 * Chooses among candidate PSFs (a grid over a model's parameters, or a blind run's snapshots) by the evidence:
 * each candidate's non-blind deconvolution is compared with unmatched sharp references
 * ({@link ReferenceComparison}: sliced Wasserstein patch distance with its bootstrap interval), and scored by its
 * re-blur χ² ({@link ReblurConsistency}, with its own PSF, which favours narrow PSFs, so it is reported, not
 * ranked by) and by the held-out voxels' log-likelihood ({@link ModelFit}'s criterion, not biased toward narrow
 * PSFs). The ranking is by patch distance; the verdict says whether the favoured candidate's interval lies
 * clear of the runner-up's.
 */
public final class PsfRanking {

	private PsfRanking() {}

	/** One candidate: a name for the table and the PSF (odd sizes, any sum: normalised by the engine). */
	public record Candidate(String name, Volume psf) {}

	/** One row of the table. */
	public record Row(String name, double distance, double low, double high, double chiSquare, double heldOut) {}

	/**
	 * @param rows by patch distance, smallest first
	 * @param clear whether the first row's interval lies wholly below the second's
	 * @param verdict one line
	 */
	public record Ranking(List<Row> rows, boolean clear, String verdict) {
		public Ranking {
			rows = List.copyOf(rows);
		}

		/** Tab-separated table with a header line. */
		public String toText() {
			final StringBuilder b = new StringBuilder("PSF\tdistance\tlow\thigh\tre-blur chi2\theld-out log-likelihood\n");
			for (final Row r : rows)
				b.append(String.format(Locale.ROOT, "%s\t%.5g\t%.5g\t%.5g\t%.4f\t%.6g%n", r.name(), r.distance(), r.low(), r.high(), r.chiSquare(), r.heldOut()));
			return b.toString();
		}
	}

	/**
	 * @param image the recording (not modified)
	 * @param refs references prepared for results like the image ({@link ReferenceComparison#prepare})
	 * @param deconvolution the non-blind run each candidate gets (same for all)
	 * @param noise the noise model of the χ²
	 * @param heldOutIterations cap on the RL iterations of the held-out score's object (0: no held-out score;
	 *        {@link ModelFit}'s Poisson-thinning split, with the noise model's photons per unit)
	 */
	public static Ranking rank(final Volume image, final List<Candidate> candidates, final ReferenceComparison.References refs,
			final DeconvolutionOptions deconvolution, final ReblurConsistency.NoiseModel noise, final int heldOutIterations, final Monitor monitor) {
		final double photonsPerUnit = noise == null ? 1 : noise.photonsPerUnit();
		if (candidates == null || candidates.size() < 2) throw new IllegalArgumentException("Ranking PSFs needs at least two candidates");
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		final List<Row> rows = new ArrayList<>();
		final Preprocessing.Data d = Preprocessing.data(image, deconvolution.offset(), deconvolution.background());
		final float[][] halves = ModelFit.split(d.y(), photonsPerUnit);
		for (int i = 0; i < candidates.size(); i++) {
			final Candidate c = candidates.get(i);
			mon.checkCancelled();
			mon.progress(i, candidates.size(), "Ranking PSFs: " + c.name());
			final DeconvolutionResult r = Deconvolution.run(image, c.psf(), deconvolution, mon);
			final ReferenceComparison.Report rep = ReferenceComparison.compare(refs, r.estimate(), image, mon);
			final ReferenceComparison.Row p = rep.row(ReferenceComparison.PATCHES);
			final Volume unit = org.parfocal.conv.Psfs.normalized(c.psf());
			final ConvolutionOperator h = ConvolutionOperator.create(unit, image, Boundary.ZERO);
			final int margin = Math.max(unit.nx(), unit.nz()) / 2;
			final double chi = ReblurConsistency.evaluate(image, r.estimate(), h, noise, Math.min(margin, Math.min(image.nx(), image.nz()) / 4)).meanChiSquare();
			final double ho = heldOutIterations > 0
					? ModelFit.heldOut(halves, image.shape(), deconvolution.edges(), d.background(), unit, heldOutIterations,
							deconvolution.method().key().contains("tv") ? deconvolution.regularization() : 0)
					: Double.NaN;
			rows.add(new Row(c.name(), p.distance(), p.low(), p.high(), chi, ho));
		}
		rows.sort(Comparator.comparingDouble(Row::distance));
		final Row a = rows.get(0), b = rows.get(1);
		final boolean clear = a.high() < b.low();
		String verdict = String.format(Locale.ROOT, "The references favour %s (distance %.4g, interval %.4g-%.4g)", a.name(), a.distance(), a.low(), a.high())
				+ (clear ? String.format(Locale.ROOT, ", clear of the runner-up %s (%.4g-%.4g)", b.name(), b.low(), b.high())
						: String.format(Locale.ROOT, ", but its interval overlaps the runner-up %s's (%.4g-%.4g): the references cannot tell them apart", b.name(), b.low(),
								b.high()));
		Row bestHeld = null;
		for (final Row r : rows) if (!Double.isNaN(r.heldOut()) && (bestHeld == null || r.heldOut() > bestHeld.heldOut())) bestHeld = r;
		if (bestHeld != null) verdict += bestHeld == a ? "; the held-out likelihood agrees" : "; the held-out likelihood prefers " + bestHeld.name();
		return new Ranking(rows, clear, verdict);
	}
}
