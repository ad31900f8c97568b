package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.Overlay;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.beads.BeadOptions;
import org.parfocal.beads.BeadPsf;
import org.parfocal.beads.BeadStatus;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * {@code Plugins > Parfocal > PSF from Beads...}: measures an averaged PSF from a recording of sub-resolution beads
 * ({@link BeadPsf}). Outputs a calibrated 32-bit unit-sum PSF (new image, with provenance), a table with one row per
 * bead (position, peak, fitted FWHM, accepted or why not), a table of the average's FWHM beside the optics model's
 * when optics are given, and ROIs of the beads in the input's overlay.
 * <p>
 * The ROIs go into the input image's overlay, not onto a copy ({@link BeadOutputs}); the dialog is
 * {@link PsfFromBeadsDialog}.
 * <p>
 * Macro keys (public API): {@code image box_xy box_z bead_diameter threshold reject_saturated outlier_z background
 * averaging symmetrize voxel_xy voxel_z optics modality na immersion_index sample_index depth emission excitation
 * pinhole sheet_thickness}. Lengths in µm; 0 for box and voxel sizes means "from the optics" and "from the image".
 */
public class PsfFromBeads implements PlugIn {

	static final String COMMAND = "PSF from Beads";
	static final String NONE = "none";

	/**
	 * Everything the dialog decides. {@code boxXY}, {@code boxZ}, {@code voxelXY}, {@code voxelZ} may be 0 ("from the
	 * optics", "from the image"); {@code model} is {@link #NONE} or a PSF model key, {@code optics} null with none.
	 */
	public record Options(String image, double boxXY, double boxZ, double beadDiameter, double threshold, boolean rejectSaturated, double outlierZ,
			BackgroundMode background, Averaging averaging, boolean symmetrize, double voxelXY, double voxelZ, String model, Optics optics) {

		public Options {
			if (image == null || image.isBlank()) throw new IllegalArgumentException("No bead stack given (image=)");
			if (!(boxXY >= 0) || !(boxZ >= 0)) throw new IllegalArgumentException("Box sizes must be 0 (from the optics) or positive µm");
			if (!(voxelXY >= 0) || !(voxelZ >= 0)) throw new IllegalArgumentException("Voxel sizes must be 0 (from the image) or positive µm");
			if (!NONE.equals(model)) {
				PsfModels.get(model);
				if (optics == null) throw new IllegalArgumentException("The optics are missing for the " + model + " model");
			}
		}

		public String macroOptions() {
			final StringBuilder s = new StringBuilder("image=").append(MacroOptions.quote(image)).append(" box_xy=").append(n(boxXY)).append(" box_z=")
					.append(n(boxZ)).append(" bead_diameter=").append(n(beadDiameter)).append(" threshold=").append(n(threshold));
			if (rejectSaturated) s.append(" reject_saturated");
			s.append(" outlier_z=").append(n(outlierZ)).append(" background=").append(background.key()).append(" averaging=").append(averaging.key());
			if (symmetrize) s.append(" symmetrize");
			s.append(" voxel_xy=").append(n(voxelXY)).append(" voxel_z=").append(n(voxelZ)).append(" optics=").append(model);
			final Optics o = optics;
			if (o != null)
				s.append(" modality=").append(o.modality().key()).append(" na=").append(n(o.na())).append(" immersion_index=").append(n(o.immersionIndex()))
						.append(" sample_index=").append(n(o.sampleIndex())).append(" depth=").append(n(o.depth())).append(" emission=")
						.append(n(o.emissionWavelength())).append(" excitation=").append(n(o.excitationWavelength())).append(" pinhole=")
						.append(n(o.pinholeAiryUnits())).append(" sheet_thickness=").append(n(o.sheetThickness()));
			return s.toString();
		}

		private static String n(final double v) {
			return Double.isNaN(v) ? "0" : MacroOptions.number(v);
		}
	}

	/** What a run makes (nothing shown yet). */
	public record Result(ImagePlus psf, ResultsTable beads, ResultsTable fwhm, Overlay overlay, BeadPsf.Result measurement, List<String> warnings) {}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.PSF_FROM_BEADS, () -> {
			final Options o = PsfFromBeadsDialog.show();
			if (o == null) throw Commands.cancelled();
			final Result r = run(o);
			Tables.show(r.beads(), "Beads");
			Tables.show(r.fwhm(), "Bead PSF FWHM");
			r.psf().show(); // last, so that the PSF is the current image for the next macro line
		});
	}


	/** Measures the PSF of the beads in the open image {@code o.image()}; adds the bead ROIs to its overlay. */
	public static Result run(final Options o) {
		final long start = System.nanoTime();
		final ImagePlus imp = Commands.image(o.image(), "bead stack");
		Volume stack = ImageBridge.toVolume(imp, "The bead stack");
		final boolean is3D = stack.nz() > 1;
		// voxel size: typed in, or the image's calibration (never 1 pixel = 1 µm)
		if (o.voxelXY() > 0 && (o.voxelZ() > 0 || !is3D)) stack = stack.withVoxelSize(VoxelSize.microns(o.voxelXY(), o.voxelXY(), o.voxelZ() > 0 ? o.voxelZ() : 1));
		else if (!stack.voxelSize().isCalibrated())
			throw new IllegalArgumentException("'" + imp.getTitle() + "' has no voxel size: enter voxel_xy and voxel_z in µm (or set them in Image > Properties...)");
		final double um = PsfGrid.micronsPer(stack.voxelSize());
		double boxXY = o.boxXY(), boxZ = is3D ? o.boxZ() : 0;
		if (!is3D && o.boxZ() > 0)
			throw new IllegalArgumentException("'" + imp.getTitle() + "' is a single plane but box_z is " + MacroOptions.number(o.boxZ())
					+ " µm: give a z-stack, or set box_z to 0 for a 2D PSF");
		if (boxXY == 0 || (is3D && boxZ == 0)) {
			if (o.optics() == null) throw new IllegalArgumentException("Enter the box size (box_xy" + (is3D ? ", box_z" : "") + " in µm), or give the optics to choose it");
			final double[] b = BeadPsf.defaultBox(o.optics());
			if (boxXY == 0) boxXY = b[0];
			if (is3D && boxZ == 0) boxZ = b[1];
		}
		final int bits = imp.getBitDepth();
		final BeadOptions bo = new BeadOptions(boxXY, boxZ, o.beadDiameter(), o.threshold(), o.rejectSaturated(), bits == 24 ? 32 : bits, o.outlierZ(),
				o.background(), o.averaging(), o.symmetrize());
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final Volume in = stack;
		final BeadPsf.Result m = Commands.withImageJThreads(() -> BeadPsf.measure(in, bo, monitor));
		final double[] model = o.optics() == null ? null : Commands.withImageJThreads(() -> BeadPsf.modelFwhm(o.model(), o.optics(), m.psf()));
		final List<String> warnings = new ArrayList<>(m.warnings());
		for (final String w : warnings) IJ.log(COMMAND + ": " + w);

		final ImagePlus psf = ImageBridge.toImagePlus(m.psf(), ij.WindowManager.makeUniqueName("psf-beads-" + ConvolveWithPsf.stripExtension(imp.getTitle()) + ".tif"));
		final Map<BeadStatus, Integer> counts = m.counts();
		final var builder = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp))
				.run("box_um", String.format(Locale.ROOT, "%.4g x %.4g x %.4g", m.psf().nx() * m.psf().voxelSize().dx(), m.psf().ny() * m.psf().voxelSize().dy(),
						m.psf().nz() * m.psf().voxelSize().dz()))
				.run("bit_depth", bits).run("beads_found", m.beads().size()).run("beads_accepted", counts.get(BeadStatus.ACCEPTED))
				.run("satellites", m.satellites()).run("detection_threshold", m.threshold()).run("negative_voxels_clipped", m.clipped())
				.run("fwhm_x_um", m.fwhm()[0]).run("fwhm_y_um", m.fwhm()[1]);
		if (is3D) builder.run("fwhm_z_um", m.fwhm()[2]);
		for (final BeadStatus st : BeadStatus.values())
			if (st != BeadStatus.ACCEPTED && counts.get(st) > 0) builder.run("rejected_" + st.name().toLowerCase(Locale.ROOT), counts.get(st));
		if (model != null) {
			builder.run("model_fwhm_x_um", model[0]).run("model_fwhm_y_um", model[1]);
			if (is3D) builder.run("model_fwhm_z_um", model[2]);
		}
		for (final String w : warnings) builder.warning(w);
		ImageProvenance.attach(psf, builder, start);

		final Overlay overlay = BeadOutputs.overlay(imp, m.beads(), m.fwhm()[0] / (stack.voxelSize().dx() * um));
		monitor.done(String.format(Locale.ROOT, "%d of %d beads averaged; FWHM %.3f x %.3f%s µm", counts.get(BeadStatus.ACCEPTED), m.beads().size(),
				m.fwhm()[0], m.fwhm()[1], is3D ? String.format(Locale.ROOT, " x %.3f", m.fwhm()[2]) : ""));
		return new Result(psf, BeadOutputs.beadTable(m.beads()), BeadOutputs.fwhmTable(m, model, o.beadDiameter(), is3D), overlay, m, List.copyOf(warnings));
	}
}
