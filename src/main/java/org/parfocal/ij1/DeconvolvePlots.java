package org.parfocal.ij1;

import java.awt.Color;
import java.util.List;

import ij.gui.Plot;

import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.IterationReport;
import org.parfocal.quality.StoppingRule;
import org.parfocal.quality.WatchedRun;

/** Deconvolve's plots: the relative change per iteration and, in watch mode, the quality curves. */
final class DeconvolvePlots {

	private DeconvolvePlots() {}

	/**
	 * Patch distance ÷ its noise floor and re-blur χ² against the iteration, on one log axis where 1 means
	 * "indistinguishable from the references" and "consistent with the noise" respectively; a dotted line marks
	 * the suggested iteration (first channel and frame).
	 */
	static Plot quality(final List<? extends WatchedRun> watches, final String title) {
		return quality(watches, title, "Iteration", "chi-square");
	}

	/** As {@link #quality(List, String)} with the axis and χ² legend named by the caller (Blind Deconvolve). */
	static Plot quality(final List<? extends WatchedRun> watches, final String title, final String xLabel, final String chiLabel) {
		final Plot plot = new Plot("Quality of " + title, xLabel, "Distance / floor, chi-square");
		plot.setLogScaleY();
		final Color[] colors = { new Color(0, 90, 170), new Color(200, 80, 0), new Color(0, 140, 60), new Color(120, 0, 140) };
		final StringBuilder legend = new StringBuilder();
		double xmax = 1, ymin = 1, ymax = 1;
		for (int i = 0; i < watches.size(); i++) {
			final WatchedRun q = watches.get(i);
			final List<StoppingRule.Point> pts = q.points();
			final double[] x = new double[pts.size()], d = new double[pts.size()], chi = new double[pts.size()];
			for (int k = 0; k < x.length; k++) {
				x[k] = pts.get(k).iteration();
				d[k] = pts.get(k).distance() / q.floor();
				chi[k] = pts.get(k).chiSquare();
				xmax = Math.max(xmax, x[k]);
				for (final double v : new double[] { d[k], chi[k] }) if (v > 0 && Double.isFinite(v)) { ymin = Math.min(ymin, v); ymax = Math.max(ymax, v); }
			}
			final String which = watches.size() > 1 ? " (" + (i + 1) + ")" : "";
			plot.setColor(colors[i % colors.length], colors[i % colors.length]); // both: a connected-circles line takes the second colour (ImageJ 1.54)
			if (!Double.isNaN(q.floor())) {
				plot.setLineWidth(2);
				plot.addPoints(x, d, Plot.CONNECTED_CIRCLES);
				legend.append("distance / floor").append(which).append('\t');
			}
			plot.setLineWidth(1);
			plot.addPoints(x, chi, Plot.LINE);
			legend.append(chiLabel).append(which).append('\t');
		}
		plot.setLimits(0, xmax * 1.02, ymin / 1.2, ymax * 1.2);
		plot.setColor(Color.GRAY);
		plot.drawDottedLine(0, 1, xmax * 1.02, 1, 2);
		if (!watches.isEmpty() && watches.get(0).suggestion().iteration() > 0) {
			final StoppingRule.Suggestion sg = watches.get(0).suggestion();
			final int s = sg.iteration();
			plot.drawDottedLine(s, ymin / 1.2, s, ymax * 1.2, 4);
			plot.addLabel(0.02, 0.08, sg.interior() ? "suggested: iteration " + s : "no interior minimum: iteration " + s + " is the edge of the evaluated range");
		}
		plot.setColor(Color.BLACK);
		plot.addLegend(legend.toString().strip());
		return plot;
	}

	/** Relative change per iteration, log scale, one curve per channel/frame. */
	static Plot convergence(final List<DeconvolutionResult> results, final String title) {
		final Plot plot = new Plot("Convergence of " + title, "Iteration", "Relative change");
		plot.setLogScaleY();
		final Color[] colors = { new Color(0, 90, 170), new Color(200, 80, 0), new Color(0, 140, 60), new Color(120, 0, 140) };
		int i = 0;
		for (final DeconvolutionResult r : results) {
			final double[] x = new double[r.history().size()], y = new double[x.length];
			for (int k = 0; k < x.length; k++) {
				final IterationReport rep = r.history().get(k);
				x[k] = rep.iteration();
				y[k] = Math.max(1e-12, rep.relativeChange());
			}
			plot.setColor(colors[i++ % colors.length]);
			plot.addPoints(x, y, Plot.LINE);
		}
		plot.setLimitsToFit(false);
		return plot;
	}
}
