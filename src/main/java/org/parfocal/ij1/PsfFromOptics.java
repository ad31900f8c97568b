package org.parfocal.ij1;

import java.awt.Color;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.gui.Plot;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Nyquist;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * {@code Plugins > Parfocal > PSF from Optics...}: computes a PSF from the objective, the sample and the
 * modality. Outputs a calibrated 32-bit PSF (new image, with provenance), a plot of its lateral and axial
 * profiles and a table of their FWHM beside the Nyquist steps; warns when the voxels are coarser than Nyquist.
 * <p>
 * Macro keys (public API): {@code model modality na immersion_index immersion_index_design sample_index
 * coverslip_index coverslip_index_design coverslip_thickness coverslip_thickness_design working_distance depth
 * emission excitation pinhole sheet_thickness voxel_xy voxel_z size_xy size_z show_profiles}. Lengths in µm.
 */
public class PsfFromOptics implements PlugIn {

	static final String COMMAND = "PSF from Optics";
	private static final String PREFS = "parfocal.psfoptics.";

	/** Everything the dialog decides; sizes 0 mean "chosen from the optics". */
	public record Options(String model, Optics optics, double voxelXY, double voxelZ, int sizeXY, int sizeZ, boolean showProfiles) {

		public Options {
			PsfModels.get(model); // validates the key
			if (!(voxelXY > 0) || !(voxelZ > 0))
				throw new IllegalArgumentException("Enter the voxel size (voxel_xy and voxel_z in µm): the PSF cannot assume 1 pixel = 1 µm");
			if (sizeXY < 0 || sizeZ < 0) throw new IllegalArgumentException("Sizes must be 0 (from the optics) or positive odd numbers");
		}

		/** The grid the PSF is sampled on. */
		public PsfGrid grid() {
			if (sizeXY == 0 || sizeZ == 0) {
				final PsfGrid auto = PsfGrid.forOptics(optics, voxelXY, voxelXY, voxelZ);
				return new PsfGrid(sizeXY == 0 ? auto.nx() : sizeXY, sizeXY == 0 ? auto.ny() : sizeXY, sizeZ == 0 ? auto.nz() : sizeZ, voxelXY,
						voxelXY, voxelZ);
			}
			return new PsfGrid(sizeXY, sizeXY, sizeZ, voxelXY, voxelXY, voxelZ);
		}

		public String macroOptions() {
			final Optics o = optics;
			// in dialog order, as the Recorder writes them
			return "model=" + model + " modality=" + o.modality().key() + " na=" + n(o.na()) + " immersion_index=" + n(o.immersionIndex())
					+ " sample_index=" + n(o.sampleIndex()) + " coverslip_index=" + n(o.coverslipIndex()) + " coverslip_thickness="
					+ n(o.coverslipThickness()) + " depth=" + n(o.depth()) + " immersion_index_design=" + n(o.immersionIndexDesign())
					+ " coverslip_index_design=" + n(o.coverslipIndexDesign()) + " coverslip_thickness_design=" + n(o.coverslipThicknessDesign())
					+ " working_distance=" + n(o.workingDistance()) + " emission=" + n(o.emissionWavelength()) + " excitation="
					+ n(o.excitationWavelength()) + " pinhole=" + n(o.pinholeAiryUnits()) + " sheet_thickness=" + n(o.sheetThickness())
					+ " voxel_xy=" + n(voxelXY) + " voxel_z=" + n(voxelZ) + " size_xy=" + sizeXY + " size_z=" + sizeZ
					+ (showProfiles ? " show_profiles" : "");
		}

		private static String n(final double v) {
			return Double.isNaN(v) ? "0" : MacroOptions.number(v);
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.provenance.CommandKeys.PSF_FROM_OPTICS, () -> {
			final Options o = showDialog(WindowManager.getCurrentImage(), true);
			if (o == null) throw Commands.cancelled();
			final Result r = run(o);
			if (o.showProfiles()) {
				r.profiles().show();
				Tables.show(r.table(), "PSF FWHM");
			} else Tables.keep(r.table(), "PSF FWHM"); // macros read it without the profiles too
			r.psf().show(); // last, so that the PSF is the current image for the next macro line
		});
	}

	/** The PSF, its profile plot and its FWHM table (not shown). */
	public record Result(ImagePlus psf, Plot profiles, ResultsTable table, String warning) {}

	/**
	 * The dialog, or null if cancelled. Voxel sizes default to {@code calibrationSource}'s (may be null).
	 * {@code withProfiles} adds the show_profiles checkbox; Deconvolve, which asks for the optics with this
	 * same dialog when the PSF is to be computed, leaves it out.
	 */
	static Options showDialog(final ImagePlus cur, final boolean withProfiles) {
		VoxelSize vs = cur == null ? VoxelSize.UNCALIBRATED : ImageBridge.voxelSize(cur.getCalibration());
		double dxy = 0, dz = 0;
		try {
			final double f = PsfGrid.micronsPer(vs);
			dxy = vs.dx() * f;
			dz = vs.dz() * f;
		} catch (final IllegalArgumentException e) {
			// uncalibrated: the user must type the voxel size; 0 is refused with a message
		}
		// interactively, the optics of the image's record (or of its inputs' records) come first (OpticsDefaults)
		final java.util.Map<String, String> rec = OpticsDefaults.of(cur);
		final GenericDialog gd = new GenericDialog(COMMAND);
		gd.addChoice("Model:", PsfModels.keys(), OpticsDefaults.word(rec, "model", PsfModels.keys(), Commands.remembered(PREFS + "model", "gibson-lanni")));
		gd.addChoice("Modality:", Modality.keys(), OpticsDefaults.word(rec, "modality", Modality.keys(), Commands.remembered(PREFS + "modality", "widefield")));
		gd.addMessage("Objective and sample (lengths in µm)");
		gd.addNumericField("NA:", OpticsDefaults.number(rec, "na", Commands.remembered(PREFS + "na", 1.4)), 3);
		gd.addNumericField("Immersion_index:", OpticsDefaults.number(rec, "immersion_index", Commands.remembered(PREFS + "ni", 1.518)), 4, 8, "medium in use");
		gd.addNumericField("Sample_index:", OpticsDefaults.number(rec, "sample_index", Commands.remembered(PREFS + "ns", 1.518)), 4);
		gd.addNumericField("Coverslip_index:", OpticsDefaults.number(rec, "coverslip_index", 1.522), 4, 8, "glass in use");
		gd.addNumericField("Coverslip_thickness:", OpticsDefaults.number(rec, "coverslip_thickness", 170), 1, 8, "µm, glass in use");
		gd.addNumericField("Depth:", OpticsDefaults.number(rec, "depth", Commands.remembered(PREFS + "depth", 0)), 2, 8, "µm below the coverslip");
		gd.addMessage("What the objective is corrected for (Gibson & Lanni only)");
		gd.addNumericField("Immersion_index_design:", OpticsDefaults.number(rec, "immersion_index_design", Commands.remembered(PREFS + "nid", 1.518)), 4, 8, "on the objective");
		gd.addNumericField("Coverslip_index_design:", OpticsDefaults.number(rec, "coverslip_index_design", 1.522), 4);
		gd.addNumericField("Coverslip_thickness_design:", OpticsDefaults.number(rec, "coverslip_thickness_design", 170), 1, 8, "µm, on the barrel");
		gd.addNumericField("Working_distance:", OpticsDefaults.number(rec, "working_distance", 150), 1, 8, "µm");
		gd.addMessage("Light");
		gd.addNumericField("Emission:", OpticsDefaults.number(rec, "emission", Commands.remembered(PREFS + "emission", 0.52)), 3, 6, "µm");
		gd.addNumericField("Excitation:", OpticsDefaults.number(rec, "excitation", Commands.remembered(PREFS + "excitation", 0.488)), 3, 6, "µm (confocal, two-photon)");
		gd.addNumericField("Pinhole:", OpticsDefaults.number(rec, "pinhole", 1), 2, 6, "Airy units (confocal)");
		gd.addNumericField("Sheet_thickness:", OpticsDefaults.number(rec, "sheet_thickness", 2), 2, 6, "µm FWHM (light-sheet)");
		gd.addMessage("Sampling");
		gd.addNumericField("Voxel_xy:", dxy, 4, 8, "µm (from the current image)");
		gd.addNumericField("Voxel_z:", dz, 4, 8, "µm");
		gd.addNumericField("Size_xy:", 0, 0, 6, "voxels, odd; 0 = from the optics");
		gd.addNumericField("Size_z:", 0, 0, 6, "voxels, odd; 0 = from the optics");
		if (withProfiles) gd.addCheckbox("Show_profiles and FWHM table", true);
		gd.addHelp(DialogHelp.psfFromOptics(withProfiles).html());
		ChoiceWords.show(gd, "model", "modality"); // shown in words, recorded as the macro values
		gd.showDialog();
		if (gd.wasCanceled()) return null;
		final String model = Commands.checkChoice("model", gd.getNextChoice(), "PSF model (" + String.join(", ", PsfModels.keys()) + ")");
		final Modality modality = Modality.parse(Commands.checkChoice("modality", gd.getNextChoice(), "modality"));
		final double na = Commands.number(gd, "na"), ni = Commands.number(gd, "immersion_index");
		final double ns = Commands.number(gd, "sample_index"), ng = Commands.number(gd, "coverslip_index");
		final double tg = Commands.number(gd, "coverslip_thickness"), depth = Commands.number(gd, "depth");
		final double nid = Commands.number(gd, "immersion_index_design"), ngd = Commands.number(gd, "coverslip_index_design");
		final double tgd = Commands.number(gd, "coverslip_thickness_design"), wd = Commands.number(gd, "working_distance");
		final double emission = Commands.number(gd, "emission"), excitation = Commands.number(gd, "excitation");
		final double pinhole = Commands.number(gd, "pinhole"), sheet = Commands.number(gd, "sheet_thickness");
		final double vxy = Commands.number(gd, "voxel_xy"), vz = Commands.number(gd, "voxel_z");
		final double sxy = Commands.number(gd, "size_xy"), sz = Commands.number(gd, "size_z");
		final boolean show = withProfiles && gd.getNextBoolean();
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		if (!Commands.isMacro()) {
			Prefs.set(PREFS + "model", model);
			Prefs.set(PREFS + "modality", modality.key());
			Prefs.set(PREFS + "na", na);
			Prefs.set(PREFS + "ni", ni);
			Prefs.set(PREFS + "nid", nid);
			Prefs.set(PREFS + "ns", ns);
			Prefs.set(PREFS + "depth", depth);
			Prefs.set(PREFS + "emission", emission);
			Prefs.set(PREFS + "excitation", excitation);
		}
		final Optics optics = Optics.builder().modality(modality).na(na).immersionIndex(ni).immersionIndexDesign(nid).sampleIndex(ns)
				.coverslipIndex(ng).coverslipIndexDesign(ngd).coverslipThickness(tg).coverslipThicknessDesign(tgd).workingDistance(wd)
				.depth(depth).emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
				.excitationWavelength(modality.usesExcitation() || excitation > 0 ? excitation : Double.NaN).pinholeAiryUnits(pinhole)
				.sheetThickness(modality == Modality.LIGHT_SHEET || sheet > 0 ? sheet : Double.NaN).build();
		return new Options(model, optics, vxy, vz, (int) sxy, (int) sz, show);
	}

	/** Computes the PSF and its summaries. */
	public static Result run(final Options o) {
		final long start = System.nanoTime();
		final PsfGrid grid = o.grid();
		IJ.showStatus(COMMAND + ": " + o.model() + " " + grid.nx() + "x" + grid.ny() + "x" + grid.nz() + "...");
		final Volume psf = Commands.withImageJThreads(() -> PsfModels.get(o.model()).compute(o.optics(), grid));
		final String title = WindowManager.makeUniqueName("psf-" + o.model() + "-" + o.optics().modality().key() + ".tif");
		final ImagePlus imp = ImageBridge.toImagePlus(psf, title);
		final double fx = Fwhm.lateral(psf), fy = Fwhm.lateralY(psf), fz = Fwhm.axial(psf);
		final String warning = Nyquist.check(o.optics(), o.voxelXY(), o.voxelXY(), o.voxelZ());
		if (warning != null) IJ.log(COMMAND + ": " + warning);
		final var builder = ImageProvenance.start(COMMAND, o.macroOptions()).run("grid", grid.nx() + "x" + grid.ny() + "x" + grid.nz())
				.run("fwhm_x_um", fx).run("fwhm_y_um", fy).run("fwhm_z_um", fz);
		if (warning != null) builder.warning(warning);
		final String ignored = ignored(o.model(), o.optics().modality());
		if (!ignored.isEmpty()) builder.run("ignored", ignored);
		ImageProvenance.attach(imp, builder, start);
		IJ.showStatus(COMMAND + String.format(Locale.ROOT, ": FWHM %.3f x %.3f x %.3f µm", fx, fy, fz));
		return new Result(imp, profiles(psf, o), table(o, fx, fy, fz), warning);
	}

	/**
	 * The dialog's fields that this model and modality do not use, as one sentence for the record (they are kept
	 * as entered, so the record repeats the dialog, and are marked here as not used).
	 */
	static String ignored(final String model, final Modality modality) {
		final List<String> keys = new java.util.ArrayList<>();
		if (!modality.usesExcitation()) keys.add("excitation");
		if (modality != Modality.CONFOCAL) keys.add("pinhole");
		if (modality != Modality.LIGHT_SHEET) keys.add("sheet_thickness");
		if (!"gibson-lanni".equals(model)) keys.addAll(List.of("immersion_index_design", "coverslip_index_design", "coverslip_thickness_design", "working_distance"));
		return keys.isEmpty() ? "" : String.join(", ", keys) + ": not used by " + model + " " + modality.key();
	}

	/** Lateral (through the peak along x) and axial (along z) profiles, each scaled to its peak. */
	static Plot profiles(final Volume psf, final Options o) {
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
	static ResultsTable table(final Options o, final double fx, final double fy, final double fz) {
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
