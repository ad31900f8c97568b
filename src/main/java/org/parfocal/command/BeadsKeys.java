package org.parfocal.command;

/**
 * The keys of {@code PSF from Beads...}, in dialog order (headings: PSF box and beads, Detection and rejection,
 * Optics for comparison), each described once ({@link Key}).
 */
public final class BeadsKeys {

	private BeadsKeys() {}

	public static final KeyTable MAIN = KeyTable.of("PSF from Beads")
			.text("image", "Image:", "", "", "the bead recording (a calibrated stack)")
			.number("box_xy", "Box_xy:", 0, Double.NaN, Double.NaN, "&micro;m", "width of the box cut around each bead; 0 = from the optics below (needs Optics)")
			.number("box_z", "Box_z:", 0, Double.NaN, Double.NaN, "&micro;m", "depth of the box; 0 = from the optics (or a 2D image)")
			.number("bead_diameter", "Bead_diameter:", 0.1, Double.NaN, Double.NaN, "&micro;m", "diameter of the beads; beads larger than the PSF are noted; 0 = unknown")
			.number("threshold", "Threshold:", 6, Double.NaN, Double.NaN, "&times; noise", "a bead is a local maximum this many robust noise levels above the background")
			.flag("reject_saturated", "Reject_saturated beads (peak at the bit-depth maximum)", true, "reject beads whose peak reaches the maximum of the bit depth")
			.number("outlier_z", "Outlier_z:", 3.5, Double.NaN, Double.NaN, "robust z-score",
					"reject beads whose fitted width or brightness lies this far from the others' median; 0 = off")
			.word("background", "Background:", "stack", "<code>stack</code>: one level for the stack; <code>border</code>: per bead, from the border of its box")
			.word("averaging", "Averaging:", "mean", "<code>mean</code> or <code>median</code> of the aligned beads (the median resists a stray bead)")
			.flag("symmetrize", "Symmetrize radially", false, "average the result around the optical axis")
			.number("voxel_xy", "Voxel_xy:", 0, Double.NaN, Double.NaN, "&micro;m", "lateral voxel size; 0 = from the image's calibration")
			.number("voxel_z", "Voxel_z:", 0, Double.NaN, Double.NaN, "&micro;m", "axial step; 0 = from the image's calibration")
			.word("optics", "Optics:", "none", "a PSF model to compare the measured FWHM with, or <code>none</code>; the fields below are ignored with none")
			.word("modality", "Modality:", "widefield", "as in PSF from Optics")
			.number("na", "NA:", 1.4, Double.NaN, Double.NaN, "", "numerical aperture")
			.number("immersion_index", "Immersion_index:", 1.518, Double.NaN, Double.NaN, "", "immersion medium index")
			.number("sample_index", "Sample_index:", 1.518, Double.NaN, Double.NaN, "", "sample (mounting medium) index")
			.number("depth", "Depth:", 0, Double.NaN, Double.NaN, "&micro;m", "depth of the beads below the coverslip")
			.number("emission", "Emission:", 0.52, Double.NaN, Double.NaN, "&micro;m", "emission wavelength")
			.number("excitation", "Excitation:", 0.488, Double.NaN, Double.NaN, "&micro;m", "excitation wavelength (confocal, two-photon only)")
			.number("pinhole", "Pinhole:", 1, Double.NaN, Double.NaN, "Airy units", "pinhole diameter (confocal only)")
			.number("sheet_thickness", "Sheet_thickness:", 2, Double.NaN, Double.NaN, "&micro;m (FWHM)", "light-sheet thickness (light-sheet only)")
			.build();
}
