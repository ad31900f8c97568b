package org.parfocal.ij1;

import java.awt.Color;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.gui.Plot;
import ij.measure.Calibration;
import ij.measure.ResultsTable;

import org.parfocal.blind.BlindResult;
import org.parfocal.command.BlindRequest;
import org.parfocal.command.BlindRunner;
import org.parfocal.blind.PsfSnapshot;
import org.parfocal.blind.RefineStep;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;

/**
 * What Blind Deconvolve makes besides the deblurred image and the final PSF: the PSF history (one frame per
 * snapshot, opened on the last snapshot's brightest plane), the snapshot table, the convergence plot, and the
 * provenance record its three images share.
 */
final class BlindOutputs {

	private BlindOutputs() {}

	/**
	 * The record of a run (without its {@code output} entry, which each image sets): the options, the inputs, the
	 * final PSF's box and widths, the levels used, the model fit, the watch, the notes.
	 */
	static org.parfocal.provenance.Provenance.Builder provenance(final BlindRequest o, final ImagePlus imp, final ImagePlus psfImp, final BlindRunner.Outcome run,
			final Deconvolve.Watch w, final List<CompareWithReferences.Reference> refs) {
		final var prov = ImageProvenance.start(BlindDeconvolve.COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		for (final Map.Entry<String, Object> e : run.facts(o.iterations()).entrySet()) prov.run(e.getKey(), e.getValue());
		if (run.watch() != null) WatchFacts.record(prov, w, List.of(run.watch()), refs);
		if (!run.notes().isEmpty()) prov.run("notes", String.join("; ", run.notes()));
		return prov;
	}

	/** The snapshots as a hyperstack, one frame each; slice labels name the iteration. */
	static ImagePlus history(final List<PsfSnapshot> snaps, final String title, final Calibration cal) {
		final List<Volume> vols = new ArrayList<>();
		for (final PsfSnapshot s : snaps) vols.add(s.psf());
		final ImagePlus imp = ImageBridge.toImagePlus(new Hyperstack(1, vols.size(), vols), title, cal);
		imp.setOpenAsHyperStack(true);
		final ImageStack st = imp.getStack();
		final int nz = vols.get(0).nz();
		for (int t = 0; t < snaps.size(); t++)
			for (int z = 0; z < nz; z++)
				st.setSliceLabel(label(snaps.get(t).iteration(), z, nz), imp.getStackIndex(1, z + 1, t + 1));
		// open on the last snapshot's brightest plane, displayed from 0 to that plane's peak, so the PSF shows
		final Volume last = vols.get(vols.size() - 1);
		final int[] pk = org.parfocal.psf.Fwhm.peak(last);
		imp.setPosition(1, pk[2] + 1, vols.size());
		imp.setDisplayRange(0, Math.max(Float.MIN_NORMAL, last.get(pk[0], pk[1], pk[2])));
		return imp;
	}

	/** Enlarges a small image's window (PSFs are a few tens of voxels wide) to about 300 pixels. */
	static void zoomSmall(final ImagePlus imp) {
		if (imp.getWindow() == null || imp.getWidth() >= 150) return;
		final int percent = 100 * Math.max(2, Math.min(16, 300 / imp.getWidth()));
		IJ.run(imp, "Set... ", "zoom=" + percent);
	}

	static String label(final int iteration, final int z, final int nz) {
		return (iteration == 0 ? "start (iteration 0)" : "iteration " + iteration) + (nz > 1 ? ", z " + (z + 1) : "");
	}

	/** One row per snapshot. */
	static ResultsTable table(final List<PsfSnapshot> snaps, final String unit) {
		return table(snaps, null, List.of(), unit);
	}

	/**
	 * One row per snapshot; after a model fit also the stage (start, model fit, refinement) and, for the
	 * refinement's snapshots, why its PSF step was kept or undone.
	 */
	static ResultsTable table(final BlindResult r, final String unit) {
		return table(r.snapshots(), r.fit(), r.refinement(), unit);
	}

	private static ResultsTable table(final List<PsfSnapshot> snaps, final org.parfocal.blind.ModelFit.Fit fit, final List<RefineStep> steps,
			final String unit) {
		final ResultsTable rt = new ResultsTable();
		rt.setPrecision(5);
		for (int i = 0; i < snaps.size(); i++) {
			final PsfSnapshot s = snaps.get(i);
			rt.incrementCounter();
			rt.addValue("Iteration", s.iteration());
			if (fit != null) rt.addValue("Stage", i == 0 ? "start" : i == 1 ? "model fit" : "refinement");
			rt.addValue("FWHM lateral (" + unit + ")", s.fwhmLateral());
			rt.addValue("FWHM axial (" + unit + ")", s.fwhmAxial());
			rt.addValue("Distance to start", s.distanceToStart());
			rt.addValue("Sum", s.sum());
			if (fit != null) rt.addValue("PSF step", i == 1 ? fit.summary() : i >= 2 && i - 2 < steps.size() ? steps.get(i - 2).reason() : "");
		}
		return rt;
	}

	/**
	 * Lateral and axial FWHM divided by the start's, and the relative distance ‖h − h₀‖ / ‖h₀‖, per snapshot: flat
	 * curves at the end mean the PSF settled.
	 */
	static Plot plot(final List<PsfSnapshot> snaps, final String title) {
		final int n = snaps.size();
		final double[] it = new double[n], lat = new double[n], ax = new double[n], dist = new double[n];
		final PsfSnapshot s0 = snaps.get(0);
		boolean axial = false;
		for (int i = 0; i < n; i++) {
			final PsfSnapshot s = snaps.get(i);
			it[i] = s.iteration();
			lat[i] = s.fwhmLateral() / s0.fwhmLateral();
			ax[i] = s.fwhmAxial() / s0.fwhmAxial();
			axial |= Double.isFinite(ax[i]);
			dist[i] = s.distanceToStart();
		}
		final Plot plot = new Plot(title, "Outer iteration", "Relative to the starting PSF");
		plot.setLineWidth(2);
		plot.setColor(new Color(20, 110, 160), new Color(20, 110, 160)); // both colours: a connected-circles line takes the second (ImageJ 1.54)
		plot.addPoints(it, lat, Plot.CONNECTED_CIRCLES);
		if (axial) {
			plot.setColor(new Color(210, 120, 20), new Color(210, 120, 20));
			plot.addPoints(it, ax, Plot.CONNECTED_CIRCLES);
		}
		plot.setColor(new Color(90, 90, 90), new Color(90, 90, 90));
		plot.addPoints(it, dist, Plot.CONNECTED_CIRCLES);
		plot.setColor(Color.black);
		// headroom above the curves, so the legend in the top-right corner covers no data
		double ymax = 1;
		for (int i = 0; i < n; i++) for (final double v : new double[] { lat[i], ax[i], dist[i] }) if (Double.isFinite(v)) ymax = Math.max(ymax, v);
		plot.setLimits(it[0], Math.max(it[n - 1], it[0] + 1), 0, ymax * (axial ? 1.45 : 1.35));
		plot.addLegend(axial ? "lateral FWHM / start\naxial FWHM / start\ndistance to start" : "lateral FWHM / start\ndistance to start", "top-right");
		return plot;
	}
}
