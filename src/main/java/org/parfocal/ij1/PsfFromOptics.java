package org.parfocal.ij1;

import java.util.Locale;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.Plot;
import ij.measure.ResultsTable;
import ij.plugin.PlugIn;

import org.parfocal.command.OpticsRequest;
import org.parfocal.command.PsfFromOpticsRequest;
import org.parfocal.core.Volume;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Nyquist;
import org.parfocal.psf.OpticsFields;
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
 * Read by {@link PsfFromOpticsRequest#from} (the one reader of the keys, for dialog and replay); this class makes the images and the record.
 */
public class PsfFromOptics implements PlugIn {

	static final String COMMAND = "PSF from Optics";

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.PSF_FROM_OPTICS, () -> {
			final PsfFromOpticsRequest o = showDialog(WindowManager.getCurrentImage(), true);
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
	 * The dialog, or null if cancelled ({@link OpticsDialog}). Voxel sizes default to {@code cur}'s (may be null);
	 * {@code withProfiles} adds the show_profiles checkbox (Deconvolve and Blind Deconvolve leave it out).
	 */
	static PsfFromOpticsRequest showDialog(final ImagePlus cur, final boolean withProfiles) {
		return OpticsDialog.show(cur, withProfiles);
	}

	/** Computes the PSF and its summaries. */
	public static Result run(final PsfFromOpticsRequest request) {
		final OpticsRequest o = request.optics();
		final long start = System.nanoTime();
		final PsfGrid grid = o.grid();
		IJ.showStatus(COMMAND + ": " + o.model() + " " + grid.nx() + "x" + grid.ny() + "x" + grid.nz() + "...");
		final Volume psf = Commands.withImageJThreads(() -> PsfModels.get(o.model()).compute(o.optics(), grid));
		final String title = WindowManager.makeUniqueName("psf-" + o.model() + "-" + o.optics().modality().key() + ".tif");
		final ImagePlus imp = ImageBridge.toImagePlus(psf, title);
		final double fx = Fwhm.lateral(psf), fy = Fwhm.lateralY(psf), fz = Fwhm.axial(psf);
		final String warning = Nyquist.check(o.optics(), o.voxelXY(), o.voxelXY(), o.voxelZ());
		if (warning != null) IJ.log(COMMAND + ": " + warning);
		final var builder = ImageProvenance.start(COMMAND, request.macroOptions()).run("grid", grid.nx() + "x" + grid.ny() + "x" + grid.nz())
				.run("fwhm_x_um", fx).run("fwhm_y_um", fy).run("fwhm_z_um", fz);
		if (warning != null) builder.warning(warning);
		recordIgnored(COMMAND, o, builder);
		ImageProvenance.attach(imp, builder, start);
		IJ.showStatus(COMMAND + String.format(Locale.ROOT, ": FWHM %.3f x %.3f x %.3f µm", fx, fy, fz));
		return new Result(imp, PsfSummaries.profiles(psf, o), PsfSummaries.table(o, fx, fy, fz), warning);
	}

	/**
	 * Fields this model and modality do not use ({@link OpticsFields#ignored}): kept as entered, so the record
	 * repeats the dialog, and listed in the record under {@code ignored} with the reason; the Log says so once.
	 */
	static void recordIgnored(final String command, final OpticsRequest o, final org.parfocal.provenance.Provenance.Builder prov) {
		final Map<String, String> ignored = o.ignored();
		if (ignored.isEmpty()) return;
		prov.run("ignored", ignored);
		IJ.log(command + ": not used by " + o.model() + " " + o.optics().modality().key() + ", ignored: " + OpticsFields.sentence(ignored));
	}
}
