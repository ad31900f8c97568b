package org.parfocal.ij1;

import java.awt.Color;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.Prefs;
import ij.gui.GenericDialog;
import ij.gui.OvalRoi;
import ij.gui.Overlay;
import ij.gui.Roi;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.beads.Bead;
import org.parfocal.beads.BeadOptions;
import org.parfocal.beads.BeadPsf;
import org.parfocal.beads.BeadStatus;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * {@code Plugins > Parfocal > PSF from Beads...}: measures an averaged PSF from a recording of sub-resolution beads
 * ({@link BeadPsf}). Outputs a calibrated 32-bit unit-sum PSF (new image, with provenance), a table with one row per
 * bead (position, peak, fitted FWHM, accepted or why not), a table of the average's FWHM beside the optics model's
 * when optics are given, and ROIs of the beads in the input's overlay.
 * <p>
 * The ROIs go into the input image's overlay rather than onto a copy: an overlay does not touch pixels (the input's
 * SHA-256 in the provenance is unchanged), bead stacks are large and a copy would double the memory, and the user
 * sees the beads on the data they know. ROIs this command added before are replaced; other overlay ROIs are kept.
 * <p>
 * Macro keys (public API): {@code image box_xy box_z bead_diameter threshold reject_saturated outlier_z background
 * averaging symmetrize voxel_xy voxel_z optics modality na immersion_index sample_index depth emission excitation
 * pinhole sheet_thickness}. Lengths in µm; 0 for box and voxel sizes means "from the optics" and "from the image".
 */
public class PsfFromBeads implements PlugIn {

	static final String COMMAND = "PSF from Beads";
	/** Overlay ROIs of this command are named with this prefix, so that a rerun replaces only them. */
	static final String ROI_PREFIX = "parfocal-bead ";
	static final String NONE = "none";
	static final Color ACCEPTED = new Color(40, 200, 240), REJECTED = new Color(250, 120, 30);
	private static final String PREFS = "parfocal.beads.";

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
		Commands.run(COMMAND, org.parfocal.provenance.CommandKeys.PSF_FROM_BEADS, () -> {
			final Options o = showDialog();
			if (o == null) throw Commands.cancelled();
			final Result r = run(o);
			Tables.show(r.beads(), "Beads");
			Tables.show(r.fwhm(), "Bead PSF FWHM");
			r.psf().show(); // last, so that the PSF is the current image for the next macro line
		});
	}

	Options showDialog() {
		final String[] titles = Commands.imageTitles();
		if (titles.length == 0) throw new IllegalArgumentException("Open a bead stack first");
		final String[] models = new String[PsfModels.keys().length + 1];
		models[0] = NONE;
		System.arraycopy(PsfModels.keys(), 0, models, 1, models.length - 1);
		final GenericDialog gd = new GenericDialog(COMMAND);
		gd.addChoice("Image:", titles, Commands.currentTitle(titles));
		gd.addMessage("PSF box and beads (µm)");
		gd.addNumericField("Box_xy:", Commands.remembered(PREFS + "boxxy", 0), 3, 8, "µm; 0 = from the optics");
		gd.addNumericField("Box_z:", Commands.remembered(PREFS + "boxz", 0), 3, 8, "µm; 0 = 2D image, or from the optics");
		gd.addNumericField("Bead_diameter:", Commands.remembered(PREFS + "diameter", 0.1), 3, 8, "µm; 0 = unknown");
		gd.addMessage("Detection and rejection");
		gd.addNumericField("Threshold:", Commands.remembered(PREFS + "threshold", 6), 2, 8, "× noise above the background");
		gd.addCheckbox("Reject_saturated beads (peak at the bit-depth maximum)", Commands.remembered(PREFS + "saturated", true));
		gd.addNumericField("Outlier_z:", Commands.remembered(PREFS + "outlier", 3.5), 2, 8, "robust z-score limit; 0 = off");
		gd.addChoice("Background:", BackgroundMode.keys(), Commands.remembered(PREFS + "background", BackgroundMode.STACK.key()));
		gd.addChoice("Averaging:", Averaging.keys(), Commands.remembered(PREFS + "averaging", Averaging.MEAN.key()));
		gd.addCheckbox("Symmetrize radially", false);
		gd.addNumericField("Voxel_xy:", 0, 4, 8, "µm; 0 = from the image");
		gd.addNumericField("Voxel_z:", 0, 4, 8, "µm; 0 = from the image");
		gd.addMessage("Optics for comparison (optional)");
		gd.addChoice("Optics:", models, Commands.remembered(PREFS + "model", NONE));
		gd.addChoice("Modality:", Modality.keys(), Commands.remembered(PREFS + "modality", "widefield"));
		gd.addNumericField("NA:", Commands.remembered(PREFS + "na", 1.4), 3);
		gd.addNumericField("Immersion_index:", Commands.remembered(PREFS + "ni", 1.518), 4);
		gd.addNumericField("Sample_index:", Commands.remembered(PREFS + "ns", 1.518), 4);
		gd.addNumericField("Depth:", 0, 2, 6, "µm below the coverslip");
		gd.addNumericField("Emission:", Commands.remembered(PREFS + "emission", 0.52), 3, 6, "µm");
		gd.addNumericField("Excitation:", Commands.remembered(PREFS + "excitation", 0.488), 3, 6, "µm (confocal, two-photon)");
		gd.addNumericField("Pinhole:", 1, 2, 6, "Airy units (confocal)");
		gd.addNumericField("Sheet_thickness:", 2, 2, 6, "µm FWHM (light-sheet)");
		gd.addHelp(DialogHelp.beads().html());
		DeconvolveHints.followBeads(gd, NONE); // "0 = from the optics" only when optics are chosen
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String image = Commands.checkChoice("image", gd.getNextChoice(), "image title");
		final double boxXY = Commands.number(gd, "box_xy"), boxZ = Commands.number(gd, "box_z"), diameter = Commands.number(gd, "bead_diameter");
		final double threshold = Commands.number(gd, "threshold");
		final boolean saturated = gd.getNextBoolean();
		final double outlier = Commands.number(gd, "outlier_z");
		final BackgroundMode background = BackgroundMode.parse(Commands.checkChoice("background", gd.getNextChoice(), "background (border or stack)"));
		final Averaging averaging = Averaging.parse(Commands.checkChoice("averaging", gd.getNextChoice(), "averaging (mean or median)"));
		final boolean symmetrize = gd.getNextBoolean();
		final double vxy = Commands.number(gd, "voxel_xy"), vz = Commands.number(gd, "voxel_z");
		final String model = Commands.checkChoice("optics", gd.getNextChoice(), "optics model (none, " + String.join(", ", PsfModels.keys()) + ")");
		final Modality modality = Modality.parse(Commands.checkChoice("modality", gd.getNextChoice(), "modality"));
		final double na = Commands.number(gd, "na"), ni = Commands.number(gd, "immersion_index"), ns = Commands.number(gd, "sample_index");
		final double depth = Commands.number(gd, "depth"), emission = Commands.number(gd, "emission"), excitation = Commands.number(gd, "excitation");
		final double pinhole = Commands.number(gd, "pinhole"), sheet = Commands.number(gd, "sheet_thickness");
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "boxxy", boxXY);
			Prefs.set(PREFS + "boxz", boxZ);
			Prefs.set(PREFS + "diameter", diameter);
			Prefs.set(PREFS + "threshold", threshold);
			Prefs.set(PREFS + "saturated", saturated);
			Prefs.set(PREFS + "outlier", outlier);
			Prefs.set(PREFS + "background", background.key());
			Prefs.set(PREFS + "averaging", averaging.key());
			Prefs.set(PREFS + "model", model);
			Prefs.set(PREFS + "modality", modality.key());
			Prefs.set(PREFS + "na", na);
			Prefs.set(PREFS + "ni", ni);
			Prefs.set(PREFS + "ns", ns);
			Prefs.set(PREFS + "emission", emission);
			Prefs.set(PREFS + "excitation", excitation);
		}
		final Optics optics = NONE.equals(model) ? null
				: Optics.builder().modality(modality).na(na).immersionIndex(ni).sampleIndex(ns).depth(depth)
						.emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
						.excitationWavelength(modality.usesExcitation() || excitation > 0 ? excitation : Double.NaN).pinholeAiryUnits(pinhole)
						.sheetThickness(modality == Modality.LIGHT_SHEET || sheet > 0 ? sheet : Double.NaN).build();
		return new Options(image, boxXY, boxZ, diameter, threshold, saturated, outlier, background, averaging, symmetrize, vxy, vz, model, optics);
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

		final Overlay overlay = overlay(imp, m.beads(), m.fwhm()[0] / (stack.voxelSize().dx() * um));
		monitor.done(String.format(Locale.ROOT, "%d of %d beads averaged; FWHM %.3f x %.3f%s µm", counts.get(BeadStatus.ACCEPTED), m.beads().size(),
				m.fwhm()[0], m.fwhm()[1], is3D ? String.format(Locale.ROOT, " x %.3f", m.fwhm()[2]) : ""));
		return new Result(psf, beadTable(m.beads()), fwhmTable(m, model, o.beadDiameter(), is3D), overlay, m, List.copyOf(warnings));
	}

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
