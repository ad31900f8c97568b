package org.parfocal.command;

import java.util.Map;

import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.OpticsFields;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * A PSF from the optics, as the keys of {@link DeconvolveKeys#OPTICS} describe it: the model's key, the optics,
 * the voxel sizes (µm) and the grid sizes (0 = from the optics).
 */
public record OpticsRequest(String model, Optics optics, double voxelXY, double voxelZ, int sizeXY, int sizeZ) {

	public OpticsRequest {
		PsfModels.get(model); // validates the key in one line
		if (!(voxelXY > 0) || !(voxelZ > 0))
			throw new IllegalArgumentException("Enter the voxel size (voxel_xy and voxel_z in µm): the PSF cannot assume 1 pixel = 1 µm");
		if (sizeXY < 0 || sizeZ < 0) throw new IllegalArgumentException("Sizes must be 0 (from the optics) or positive odd numbers");
	}

	/**
	 * The optics keys of a run (defaults from {@link DeconvolveKeys#OPTICS} for those not given), as the optics dialog
	 * reads them: a wavelength or sheet thickness the modality ignores is kept when positive, so it is recorded as entered.
	 */
	public static OpticsRequest from(final KeyTable.Values v) {
		final Modality modality = Modality.parse(v.text("modality"));
		final double emission = v.number("emission"), excitation = v.number("excitation"), sheet = v.number("sheet_thickness");
		final Optics optics = Optics.builder().modality(modality).na(v.number("na")).immersionIndex(v.number("immersion_index"))
				.immersionIndexDesign(v.number("immersion_index_design")).sampleIndex(v.number("sample_index"))
				.coverslipIndex(v.number("coverslip_index")).coverslipIndexDesign(v.number("coverslip_index_design"))
				.coverslipThickness(v.number("coverslip_thickness")).coverslipThicknessDesign(v.number("coverslip_thickness_design"))
				.workingDistance(v.number("working_distance")).depth(v.number("depth"))
				.emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
				.excitationWavelength(modality.usesExcitation() || excitation > 0 ? excitation : Double.NaN).pinholeAiryUnits(v.number("pinhole"))
				.sheetThickness(modality == Modality.LIGHT_SHEET || sheet > 0 ? sheet : Double.NaN).build();
		return new OpticsRequest(v.text("model"), optics, v.number("voxel_xy"), v.number("voxel_z"), v.whole("size_xy"), v.whole("size_z"));
	}

	/** The grid the PSF is sampled on (as {@code PSF from Optics...} chooses it). */
	public PsfGrid grid() {
		if (sizeXY != 0 && sizeZ != 0) return new PsfGrid(sizeXY, sizeXY, sizeZ, voxelXY, voxelXY, voxelZ);
		final PsfGrid auto = PsfGrid.forOptics(optics, voxelXY, voxelXY, voxelZ);
		return new PsfGrid(sizeXY == 0 ? auto.nx() : sizeXY, sizeXY == 0 ? auto.ny() : sizeXY, sizeZ == 0 ? auto.nz() : sizeZ, voxelXY, voxelXY, voxelZ);
	}

	/** The fields the model and modality do not use, with the reasons, in dialog order ({@link OpticsFields#ignored}). */
	public Map<String, String> ignored() {
		return OpticsFields.ignored(PsfModels.get(model), optics.modality(), sizeXY != 0 && sizeZ != 0);
	}

	/** Computes the PSF (µm, unit sum, centred). */
	public Volume compute() {
		return PsfModels.get(model).compute(optics, grid());
	}

	/** The optics dialog's part of a recorded line, in dialog order as the Recorder writes it (a field not set is 0). */
	public String macroOptions() {
		final Optics o = optics;
		return "model=" + model + " modality=" + o.modality().key() + " na=" + n(o.na()) + " immersion_index=" + n(o.immersionIndex())
				+ " sample_index=" + n(o.sampleIndex()) + " coverslip_index=" + n(o.coverslipIndex()) + " coverslip_thickness="
				+ n(o.coverslipThickness()) + " depth=" + n(o.depth()) + " immersion_index_design=" + n(o.immersionIndexDesign())
				+ " coverslip_index_design=" + n(o.coverslipIndexDesign()) + " coverslip_thickness_design=" + n(o.coverslipThicknessDesign())
				+ " working_distance=" + n(o.workingDistance()) + " emission=" + n(o.emissionWavelength()) + " excitation="
				+ n(o.excitationWavelength()) + " pinhole=" + n(o.pinholeAiryUnits()) + " sheet_thickness=" + n(o.sheetThickness())
				+ " voxel_xy=" + n(voxelXY) + " voxel_z=" + n(voxelZ) + " size_xy=" + sizeXY + " size_z=" + sizeZ;
	}

	private static String n(final double v) {
		return Double.isNaN(v) ? "0" : MacroOptions.number(v);
	}
}
