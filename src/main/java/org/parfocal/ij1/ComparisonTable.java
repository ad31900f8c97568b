package org.parfocal.ij1;

import java.awt.Color;

import ij.gui.Plot;
import ij.measure.ResultsTable;

import org.parfocal.quality.MarginalQuantiles;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;

/** The outputs of {@link CompareWithReferences}: its result table (worded columns) and its quantile plot. */
final class ComparisonTable {

	private ComparisonTable() {}

	/** One row per property; χ² and whiteness as two more rows with their value in the {@code value} column. */
	static ResultsTable table(final ReferenceComparison.Report report, final ReblurConsistency.Result chi) {
		final ResultsTable t = new ResultsTable();
		for (final ReferenceComparison.Row r : report.rows()) {
			t.incrementCounter();
			t.addValue("property", r.property());
			t.addValue("value", r.distance());
			t.addValue(LOW, r.low());
			t.addValue(HIGH, r.high());
			t.addValue(FLOOR, r.floor());
			t.addValue(BASELINE, r.baseline());
			t.addValue(GAP, r.gapClosed());
			t.addValue(WHY, whyNoGap(r.baseline(), r.floor(), r.gapClosed()));
		}
		if (chi != null) {
			addScalar(t, "re-blur chi-square", chi.meanChiSquare());
			addScalar(t, "re-blur whiteness", chi.whiteness());
		}
		t.setDecimalPlaces(t.getColumnIndex("value"), 5);
		return t;
	}

	private static void addScalar(final ResultsTable t, final String name, final double v) {
		t.incrementCounter();
		t.addValue("property", name);
		t.addValue("value", v);
		for (final String c : new String[] { LOW, HIGH, FLOOR, BASELINE, GAP }) t.addValue(c, Double.NaN);
		t.addValue(WHY, "");
	}

	/** Worded column headings of the table (explained in the dialog's Help). */
	static final String LOW = "95% low", HIGH = "95% high", FLOOR = "noise floor", BASELINE = "blurred input", GAP = "gap closed", WHY = "why no gap";

	/** Why "gap closed" is blank, or "" when it has a value. */
	static String whyNoGap(final double baseline, final double floor, final double gap) {
		if (Double.isFinite(gap)) return "";
		if (Double.isNaN(baseline)) return "no input given";
		if (!(baseline > floor)) return "input already within the noise floor";
		return "undefined";
	}

	/** Quantile curves of intensity and gradient magnitude: references (wide, light) under the result (dark). */
	static Plot plot(final MarginalQuantiles.Curves c, final String title, final int refCount) {
		// sparse images (puncta, filaments) are near 0 at most levels: start where a curve first rises, so the part that differs fills the plot
		final double from = firstRise(c);
		final Plot plot = new Plot("Marginals of " + title + " vs references",
				from > 0 ? String.format(java.util.Locale.ROOT, "Quantile level (%%; below %.0f %%, every curve is near 0)", from) : "Quantile level (%)",
				"Normalized value");
		final Color[] colors = { new Color(0, 90, 170), new Color(200, 80, 0) };
		final Color[] light = { new Color(140, 185, 230), new Color(240, 180, 130) };
		for (int k = 0; k < 2; k++) {
			// the references first, as a wide light band of the same hue, then the result as a dark line on top:
			// both stay visible where they agree
			plot.setColor(light[k]);
			plot.setLineWidth(5);
			plot.addPoints(c.levels(), c.references()[k], Plot.LINE);
			plot.setColor(colors[k]);
			plot.setLineWidth(2);
			plot.addPoints(c.levels(), c.result()[k], Plot.LINE);
		}
		plot.setLineWidth(1);
		plot.setColor(Color.BLACK);
		plot.addLegend("intensity, " + refCount + " reference(s) (wide, light)\tintensity, result\tgradient magnitude, references (wide, light)\tgradient magnitude, result",
				"top-left");
		plot.setLimitsToFit(false);
		if (from > 0) {
			final double[] lim = plot.getLimits();
			plot.setLimits(from, lim[1], lim[2], lim[3]);
		}
		return plot;
	}

	/**
	 * The quantile level (%) a little below the first one where any curve exceeds 2 % of the largest value, in
	 * whole steps of 5 %, or 0 when the curves rise early (below 20 %).
	 */
	static double firstRise(final MarginalQuantiles.Curves c) {
		double max = 0;
		for (int k = 0; k < 2; k++) for (final double[] curve : new double[][] { c.references()[k], c.result()[k] }) for (final double v : curve) if (Double.isFinite(v)) max = Math.max(max, Math.abs(v));
		if (!(max > 0)) return 0;
		final double[] levels = c.levels();
		for (int i = 0; i < levels.length; i++)
			for (int k = 0; k < 2; k++)
				if (Math.abs(c.references()[k][i]) > 0.02 * max || Math.abs(c.result()[k][i]) > 0.02 * max) {
					final double at = Math.floor((levels[i] - 5) / 5) * 5;
					return at < 20 ? 0 : at;
				}
		return 0;
	}
}
