package org.parfocal.ij1;

import java.awt.Color;

import ij.gui.Plot;
import ij.measure.ResultsTable;

import org.parfocal.command.OpticsRequest;
import org.parfocal.core.Volume;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Nyquist;
import org.parfocal.psf.Optics;

/** PSF from Optics' summaries of a computed PSF: its profile plot and its FWHM table beside the Nyquist steps. */
final class PsfSummaries {

	private PsfSummaries() {}

	/** Lateral (through the peak along x) and axial (along z) profiles, each scaled to its peak. */
	static Plot profiles(final Volume psf, final OpticsRequest o) {
		final int[] p = Fwhm.peak(psf);
		final double[] lx = new double[psf.nx()], ly = new double[psf.nx()];
		for (int x = 0; x < psf.nx(); x++) {
			lx[x] = (x - p[0]) * o.voxelXY();
			ly[x] = psf.get(x, p[1], p[2]);
		}
		final double[] ax = new double[psf.nz()], ay = new double[psf.nz()];
		for (int z = 0; z < psf.nz(); z++) {
			ax[z] = (z - p[2]) * o.voxelZ();
			ay[z] = psf.get(p[0], p[1], z);
		}
		scale(ly);
		scale(ay);
		final Plot plot = new Plot("PSF profiles (" + o.model() + ", " + o.optics().modality().key() + ")", "Distance from peak (µm)",
				"Intensity / peak");
		plot.setColor(new Color(0, 90, 170));
		plot.setLineWidth(2);
		plot.addPoints(lx, ly, Plot.LINE);
		plot.setColor(new Color(200, 80, 0));
		plot.addPoints(ax, ay, Plot.LINE);
		plot.setColor(Color.black);
		plot.addLegend("lateral (x)\naxial (z)");
		plot.setLimitsToFit(false);
		return plot;
	}

	private static void scale(final double[] a) {
		double m = 0;
		for (final double v : a) m = Math.max(m, v);
		if (m > 0) for (int i = 0; i < a.length; i++) a[i] /= m;
	}

	/** FWHM of the PSF beside the voxel steps and the Nyquist steps. */
	static ResultsTable table(final OpticsRequest o, final double fx, final double fy, final double fz) {
		final Optics op = o.optics();
		// the shortest wavelength in use, as Nyquist.check takes it
		final double lambda = Math.min(op.modality().usesEmission() ? op.emissionWavelength() : Double.POSITIVE_INFINITY,
				op.modality().usesExcitation() ? op.excitationWavelength() : Double.POSITIVE_INFINITY);
		final ResultsTable rt = new ResultsTable();
		final String[] axes = { "lateral x", "lateral y", "axial z" };
		final double[] fwhm = { fx, fy, fz }, step = { o.voxelXY(), o.voxelXY(), o.voxelZ() };
		final double[] nyq = { Nyquist.lateral(lambda, op.na()), Nyquist.lateral(lambda, op.na()), Nyquist.axial(lambda, op.immersionIndex(), op.na()) };
		for (int i = 0; i < 3; i++) {
			rt.incrementCounter();
			rt.addValue("Axis", axes[i]);
			rt.addValue("FWHM (µm)", fwhm[i]);
			rt.addValue("Voxel step (µm)", step[i]);
			rt.addValue("Nyquist step (µm)", nyq[i]);
			rt.addValue("Sampled at Nyquist", step[i] <= nyq[i] ? "yes" : "no");
		}
		return rt;
	}
}
