package org.parfocal.ij1;

import java.util.List;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.Overlay;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.beads.BeadPsf;
import org.parfocal.command.BeadsRequest;
import org.parfocal.command.BeadsRunner;
import org.parfocal.core.Volume;
import org.parfocal.psf.PsfGrid;

/**
 * {@code Plugins > Parfocal > PSF from Beads...}: measures an averaged PSF from a recording of sub-resolution beads
 * ({@link BeadPsf}). Outputs a calibrated 32-bit unit-sum PSF (new image, with provenance), a table with one row per
 * bead (position, peak, fitted FWHM, accepted or why not), a table of the average's FWHM beside the optics model's
 * when optics are given, and ROIs of the beads in the input's overlay.
 * <p>
 * This class only translates: dialog or macro options → {@link BeadsRequest} (the one reader of
 * {@link org.parfocal.command.BeadsKeys}), the image ↔ a volume, and the PSF image, tables, overlay and record;
 * {@link BeadsRunner} runs it. The ROIs go into the input image's overlay, not onto a copy ({@link BeadOutputs});
 * the dialog is {@link PsfFromBeadsDialog}.
 * <p>
 * Macro keys (public API): {@code image box_xy box_z bead_diameter threshold reject_saturated outlier_z background
 * averaging symmetrize voxel_xy voxel_z optics modality na immersion_index sample_index depth emission excitation
 * pinhole sheet_thickness}. Lengths in µm; 0 for box and voxel sizes means "from the optics" and "from the image".
 */
public class PsfFromBeads implements PlugIn {

	static final String COMMAND = "PSF from Beads";
	static final String NONE = BeadsRequest.NONE;

	/** What a run makes (nothing shown yet). */
	public record Result(ImagePlus psf, ResultsTable beads, ResultsTable fwhm, Overlay overlay, BeadPsf.Result measurement, List<String> warnings) {}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.PSF_FROM_BEADS, () -> {
			final BeadsRequest r = PsfFromBeadsDialog.show();
			if (r == null) throw Commands.cancelled();
			final Result out = run(r);
			Tables.show(out.beads(), "Beads");
			Tables.show(out.fwhm(), "Bead PSF FWHM");
			out.psf().show(); // last, so that the PSF is the current image for the next macro line
		});
	}

	/** Measures the PSF of the beads in the open image {@code r.image()}; adds the bead ROIs to its overlay. */
	public static Result run(final BeadsRequest r) {
		final long start = System.nanoTime();
		final ImagePlus imp = Commands.image(r.image(), "bead stack");
		final Volume stack = ImageBridge.toVolume(imp, "The bead stack");
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final BeadsRunner.Outcome out = Commands.withImageJThreads(() -> BeadsRunner.run(r, stack, imp.getBitDepth(), imp.getTitle(), monitor));
		final BeadPsf.Result m = out.measurement();
		final List<String> warnings = out.warnings();
		for (final String w : warnings) IJ.log(COMMAND + ": " + w);

		final ImagePlus psf = ImageBridge.toImagePlus(m.psf(), ij.WindowManager.makeUniqueName("psf-beads-" + ConvolveWithPsf.stripExtension(imp.getTitle()) + ".tif"));
		final var builder = ImageProvenance.start(COMMAND, r.macroOptions()).input(ImageProvenance.input("image", imp));
		for (final Map.Entry<String, Object> fact : out.facts().entrySet()) builder.run(fact.getKey(), fact.getValue());
		for (final String w : warnings) builder.warning(w);
		ImageProvenance.attach(psf, builder, start);

		final Overlay overlay = BeadOutputs.overlay(imp, m.beads(), m.fwhm()[0] / (out.voxelSize().dx() * PsfGrid.micronsPer(out.voxelSize())));
		monitor.done(out.summary());
		return new Result(psf, BeadOutputs.beadTable(m.beads()), BeadOutputs.fwhmTable(m, out.modelFwhm(), r.beadDiameter(), out.is3D()), overlay, m, warnings);
	}
}
