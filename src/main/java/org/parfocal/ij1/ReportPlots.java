package org.parfocal.ij1;

import java.awt.Color;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.gui.Plot;
import ij.process.FloatProcessor;

import org.parfocal.core.Volume;
import org.parfocal.provenance.HtmlReport;
import org.parfocal.psf.Fwhm;

/**
 * The PSF and curve figures of {@link WriteReport}: the PSF on a log scale with its profiles and FWHM table, the
 * watch curves and the convergence curve, as ImageJ plots.
 */
final class ReportPlots {

	private ReportPlots() {}

	/**
	 * The PSF seen so that it shows: XY and XZ maximum projections of its central part (where it exceeds 10⁻³ of
	 * its peak, at least 9 voxels), on a log scale over three decades, enlarged; then its profiles and FWHM.
	 */
	static void psf(final HtmlReport report, final String what, final Volume psf) {
		final FloatProcessor[] p = ReportFigures.maxProjections(psf);
		final float peak = (float) new ij.process.FloatStatistics(p[0]).max;
		final int[] c = Fwhm.peak(psf);
		int rx = 4, rz = 2;
		for (int x = 0; x < psf.nx(); x++) if (p[0].getf(x, c[1]) > 1e-3 * peak) rx = Math.max(rx, Math.abs(x - c[0]));
		for (int z = 0; z < psf.nz(); z++) if (p[1].getf(c[0], z) > 1e-3 * peak) rz = Math.max(rz, Math.abs(z - c[2]));
		final int x0 = Math.max(0, c[0] - rx), x1 = Math.min(psf.nx() - 1, c[0] + rx), y0 = Math.max(0, c[1] - rx), y1 = Math.min(psf.ny() - 1, c[1] + rx);
		final int z0 = Math.max(0, c[2] - rz), z1 = Math.min(psf.nz() - 1, c[2] + rz);
		p[0].setRoi(x0, y0, x1 - x0 + 1, y1 - y0 + 1);
		final FloatProcessor xy = (FloatProcessor) p[0].crop();
		p[1].setRoi(x0, z0, x1 - x0 + 1, z1 - z0 + 1);
		final FloatProcessor xz = (FloatProcessor) p[1].crop();
		final double zoom = Math.max(1, Math.min(16, 240.0 / xy.getWidth()));
		final double hi = Math.log10(peak), lo = hi - 3;
		final Volume crop = psf; // for the scale bar: same voxel size
		report.figure(what + ": XY maximum projection, log scale (peak to 10⁻³ of it), central " + xy.getWidth() + " × " + xy.getHeight() + " voxels"
				+ ReportFigures.calibrationText(psf), ReportFigures.png(ReportFigures.withScaleBar(ReportFigures.render(xy, lo, hi, zoom, 1, true), crop, zoom)));
		if (psf.nz() > 1) {
			final double aspect = psf.voxelSize().dz() / psf.voxelSize().dx();
			report.figure(what + ": XZ maximum projection, log scale (peak to 10⁻³ of it), z stretched to the voxel aspect",
					ReportFigures.png(ReportFigures.withScaleBar(ReportFigures.render(xz, lo, hi, zoom, aspect, true), crop, zoom)));
		}
		profiles(report, what, psf);
	}

	/** PSF profiles (lateral through the peak along x, axial along z) and their FWHM. */
	static void profiles(final HtmlReport report, final String what, final Volume psf) {
		final int[] pk = Fwhm.peak(psf);
		final double dx = psf.voxelSize().dx(), dz = psf.voxelSize().dz();
		final double[] lx = new double[psf.nx()], ly = new double[psf.nx()], ax = new double[psf.nz()], ay = new double[psf.nz()];
		final double peak = psf.get(pk[0], pk[1], pk[2]);
		for (int x = 0; x < psf.nx(); x++) {
			lx[x] = (x - pk[0]) * dx;
			ly[x] = psf.get(x, pk[1], pk[2]) / peak;
		}
		for (int z = 0; z < psf.nz(); z++) {
			ax[z] = (z - pk[2]) * dz;
			ay[z] = psf.get(pk[0], pk[1], z) / peak;
		}
		final Plot plot = new Plot("PSF profiles", "Distance from peak (" + psf.voxelSize().unit() + ")", "Intensity / peak");
		plot.setLimits(Math.min(lx[0], psf.nz() > 1 ? ax[0] : lx[0]), Math.max(lx[lx.length - 1], psf.nz() > 1 ? ax[ax.length - 1] : 0), 0, 1.25);
		plot.setColor(new Color(0, 90, 170));
		plot.setLineWidth(2);
		plot.addPoints(lx, ly, Plot.LINE);
		if (psf.nz() > 1) {
			plot.setColor(new Color(200, 80, 0));
			plot.addPoints(ax, ay, Plot.LINE);
		}
		plot.setColor(Color.black);
		plot.setLineWidth(1);
		plot.addLegend(psf.nz() > 1 ? "lateral (x)\naxial (z)" : "lateral (x)", "top-right");
		report.figure(what + ": profiles through the peak, each divided by the peak", ReportFigures.png(plot));
		final List<List<String>> rows = new ArrayList<>();
		rows.add(List.of("lateral x", String.format(Locale.ROOT, "%.4f", Fwhm.lateral(psf))));
		rows.add(List.of("lateral y", String.format(Locale.ROOT, "%.4f", Fwhm.lateralY(psf))));
		if (psf.nz() > 1) rows.add(List.of("axial z", String.format(Locale.ROOT, "%.4f", Fwhm.axial(psf))));
		report.table(new HtmlReport.Table(what + ": FWHM (" + psf.voxelSize().unit() + ")", List.of("axis", "FWHM"), rows));
	}

	/** The watch curve "it: d D chi2 C; …" as a plot: distance ÷ floor (when known) and χ², log scale, suggestion dashed. */
	static Plot watch(final String curve, final int suggested, final double floor) {
		final List<double[]> pts = new ArrayList<>();
		for (final String part : curve.split(";")) {
			final java.util.regex.Matcher m = java.util.regex.Pattern.compile("\\s*(\\d+): d (\\S+) chi2 (\\S+)").matcher(part);
			if (m.find()) pts.add(new double[] { Double.parseDouble(m.group(1)), parse(m.group(2)), parse(m.group(3)) });
		}
		if (pts.isEmpty()) return null;
		final double[] x = new double[pts.size()], d = new double[x.length], chi = new double[x.length];
		double ymin = 1, ymax = 1;
		for (int i = 0; i < x.length; i++) {
			x[i] = pts.get(i)[0];
			d[i] = Double.isNaN(floor) ? pts.get(i)[1] : pts.get(i)[1] / floor;
			chi[i] = pts.get(i)[2];
			for (final double v : new double[] { d[i], chi[i] }) if (v > 0 && Double.isFinite(v)) { ymin = Math.min(ymin, v); ymax = Math.max(ymax, v); }
		}
		final Plot plot = new Plot("Watch", "Iteration", "Distance" + (Double.isNaN(floor) ? "" : " / floor") + ", chi-square");
		plot.setLogScaleY();
		plot.setLimits(0, x[x.length - 1] * 1.05, ymin / 1.5, ymax * 3);
		final boolean hasDistance = java.util.Arrays.stream(d).anyMatch(v -> Double.isFinite(v) && v > 0);
		if (hasDistance) {
			plot.setColor(new Color(0, 90, 170), new Color(0, 90, 170)); // both: a connected-circles line takes the second colour (ImageJ 1.54)
			plot.setLineWidth(2);
			plot.addPoints(x, d, Plot.CONNECTED_CIRCLES);
		}
		plot.setColor(new Color(200, 80, 0));
		plot.setLineWidth(2);
		plot.addPoints(x, chi, Plot.LINE);
		plot.setLineWidth(1);
		plot.setColor(Color.gray);
		plot.drawDottedLine(0, 1, x[x.length - 1] * 1.05, 1, 2);
		if (suggested >= 0) {
			plot.setColor(new Color(0, 140, 60));
			plot.drawDottedLine(suggested, ymin / 1.5, suggested, ymax * 3, 4);
		}
		plot.setColor(Color.black);
		plot.addLegend((hasDistance ? "distance" + (Double.isNaN(floor) ? "" : " / floor") + "\t" : "") + "chi-square", "top-right");
		return plot;
	}

	static double parse(final String s) {
		try {
			return Double.parseDouble(s);
		} catch (final NumberFormatException e) {
			return Double.NaN;
		}
	}

	static Plot convergence(final List<?> relativeChange) {
		final double[] x = new double[relativeChange.size()], y = new double[x.length];
		for (int i = 0; i < x.length; i++) {
			x[i] = i + 1;
			y[i] = Math.max(1e-12, ((Number) relativeChange.get(i)).doubleValue());
		}
		final Plot plot = new Plot("Convergence", "Iteration", "Relative change");
		plot.setLogScaleY();
		plot.setColor(new Color(0, 90, 170));
		plot.setLineWidth(2);
		plot.addPoints(x, y, Plot.LINE);
		plot.setLimitsToFit(false);
		return plot;
	}

}
