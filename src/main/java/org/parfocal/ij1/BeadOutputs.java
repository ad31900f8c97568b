package org.parfocal.ij1;

import java.awt.Color;
import java.util.List;

import ij.ImagePlus;
import ij.gui.OvalRoi;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.measure.ResultsTable;

import org.parfocal.beads.Bead;
import org.parfocal.beads.BeadPsf;

/**
 * PSF from Beads' tables and overlay: one row per bead, the FWHM of the average beside the optics model's, and a
 * circle per bead in the input's overlay.
 * <p>
 * The ROIs go into the input image's overlay rather than onto a copy: an overlay does not touch pixels (the input's
 * SHA-256 in the provenance is unchanged), bead stacks are large and a copy would double the memory, and the user
 * sees the beads on the data they know. ROIs this command added before are replaced; other overlay ROIs are kept.
 */
final class BeadOutputs {

	/** Overlay ROIs of this command are named with this prefix, so that a rerun replaces only them. */
	static final String ROI_PREFIX = "parfocal-bead ";
	static final Color ACCEPTED = new Color(40, 200, 240), REJECTED = new Color(250, 120, 30);

	private BeadOutputs() {}

/** One row per bead. */
	static ResultsTable beadTable(final List<Bead> beads) {
		final ResultsTable rt = new ResultsTable();
		for (final Bead b : beads) {
			rt.incrementCounter();
			rt.addValue("Bead", b.id());
			rt.addValue("X (µm)", b.xUm());
			rt.addValue("Y (µm)", b.yUm());
			rt.addValue("Z (µm)", b.zUm());
			rt.addValue("Peak", b.peak());
			rt.addValue("Background", b.background());
			rt.addValue("FWHM x (µm)", b.fwhmX());
			rt.addValue("FWHM y (µm)", b.fwhmY());
			rt.addValue("FWHM z (µm)", b.fwhmZ());
			rt.addValue("Status", b.status().key());
			rt.addValue("Reason", b.reason());
		}
		return rt;
	}

	/** FWHM of the average, corrected for the bead size when that applies, beside the optics model's. */
	static ResultsTable fwhmTable(final BeadPsf.Result m, final double[] model, final double diameter, final boolean is3D) {
		final ResultsTable rt = new ResultsTable();
		final String[] axes = { "lateral x", "lateral y", "axial z" };
		for (int d = 0; d < (is3D ? 3 : 2); d++) {
			rt.incrementCounter();
			rt.addValue("Axis", axes[d]);
			rt.addValue("Measured FWHM (µm)", m.fwhm()[d]);
			if (diameter > 0) rt.addValue("Corrected for bead size (µm)", m.fwhmCorrected()[d]);
			if (model != null) {
				rt.addValue("Optics model FWHM (µm)", model[d]);
				rt.addValue("Measured / model", m.fwhm()[d] / model[d]);
			}
		}
		return rt;
	}

	/** Replaces this command's ROIs in the input's overlay (other ROIs stay): a circle per bead on its plane. */
	static Overlay overlay(final ImagePlus imp, final List<Bead> beads, final double fwhmPixels) {
		Overlay ov = imp.getOverlay();
		if (ov == null) ov = new Overlay();
		for (final Roi r : ov.toArray())
			if (r.getName() != null && r.getName().startsWith(ROI_PREFIX)) ov.remove(r);
		final double d = Math.max(6, 2 * (Double.isFinite(fwhmPixels) ? fwhmPixels : 3));
		for (final Bead b : beads) {
			final Roi roi = new OvalRoi(b.x() + 0.5 - d / 2, b.y() + 0.5 - d / 2, d, d);
			roi.setName(ROI_PREFIX + b.id() + " " + b.status().key());
			roi.setStrokeColor(b.accepted() ? ACCEPTED : REJECTED);
			final int z = (int) Math.round(b.z()) + 1;
			if (imp.isHyperStack()) roi.setPosition(0, z, 0);
			else if (imp.getStackSize() > 1) roi.setPosition(z);
			ov.add(roi);
		}
		imp.setOverlay(ov);
		return ov;
	}
}
