package org.parfocal.command;

import java.util.Map;

import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfModels;

/**
 * What one {@code PSF from Beads...} run is asked to do, read from its macro options through {@link BeadsKeys}:
 * the one reader of those keys, for the dialog (in and outside macros), the record's replay and any other front
 * end. {@link BeadsRunner} runs it. No {@code ij.*}, no AWT.
 *
 * @param image the bead recording's title or file
 * @param boxXY box width (µm), 0 = from the optics
 * @param boxZ box depth (µm), 0 = from the optics (or a 2D image)
 * @param beadDiameter bead diameter (µm), 0 = unknown
 * @param voxelXY lateral voxel size (µm), 0 = from the image
 * @param voxelZ axial step (µm), 0 = from the image
 * @param model {@link #NONE} or the key of the PSF model the measured FWHM is compared with
 * @param optics the optics of that model, null with {@link #NONE}
 */
public record BeadsRequest(String image, double boxXY, double boxZ, double beadDiameter, double threshold, boolean rejectSaturated, double outlierZ,
		BackgroundMode background, Averaging averaging, boolean symmetrize, double voxelXY, double voxelZ, String model, Optics optics) {

	/** The {@code optics=} value that compares with no model. */
	public static final String NONE = "none";

	public BeadsRequest {
		if (image == null || image.isBlank()) throw new IllegalArgumentException("No bead stack given (image=)");
		if (!(boxXY >= 0) || !(boxZ >= 0)) throw new IllegalArgumentException("Box sizes must be 0 (from the optics) or positive µm (box_xy=, box_z=)");
		if (!(voxelXY >= 0) || !(voxelZ >= 0))
			throw new IllegalArgumentException("Voxel sizes must be 0 (from the image) or positive µm (voxel_xy=, voxel_z=)");
		if (!NONE.equals(model)) {
			try {
				PsfModels.get(model);
			} catch (final IllegalArgumentException e) {
				throw new IllegalArgumentException(e.getMessage() + " (optics=)");
			}
			if (optics == null) throw new IllegalArgumentException("The optics are missing for the " + model + " model");
		}
	}

	/**
	 * Reads the options (keys checked by {@link CommandKeys#check}, or known to be the command's); keys not given
	 * take the table's defaults. The optics are built only when {@code optics=} names a model; a wavelength, or the
	 * sheet, that the modality does not use is kept when given above 0.
	 *
	 * @throws IllegalArgumentException one line naming the key
	 */
	public static BeadsRequest from(final Map<String, String> options) {
		final KeyTable.Values v = BeadsKeys.MAIN.read(options);
		final String model = v.text("optics");
		final Modality modality = v.parsed("modality", Modality::parse);
		final double na = v.number("na"), ni = v.number("immersion_index"), ns = v.number("sample_index"), depth = v.number("depth");
		final double emission = v.number("emission"), excitation = v.number("excitation"), pinhole = v.number("pinhole"), sheet = v.number("sheet_thickness");
		final Optics optics = NONE.equals(model) ? null
				: Optics.builder().modality(modality).na(na).immersionIndex(ni).sampleIndex(ns).depth(depth)
						.emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
						.excitationWavelength(modality.usesExcitation() || excitation > 0 ? excitation : Double.NaN).pinholeAiryUnits(pinhole)
						.sheetThickness(modality == Modality.LIGHT_SHEET || sheet > 0 ? sheet : Double.NaN).build();
		return new BeadsRequest(v.text("image"), v.number("box_xy"), v.number("box_z"), v.number("bead_diameter"), v.number("threshold"),
				v.flag("reject_saturated"), v.number("outlier_z"), v.parsed("background", BackgroundMode::parse),
				v.parsed("averaging", Averaging::parse), v.flag("symmetrize"), v.number("voxel_xy"),
				v.number("voxel_z"), model, optics);
	}

	/** The options string a macro passes to {@code run("PSF from Beads...", ...)} (the record's options; the optics only with a model). */
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
