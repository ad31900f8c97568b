package org.parfocal.ij1;

import java.util.List;

import ij.ImagePlus;

import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.deconv.PsfPreparation;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * The PSF per channel for Deconvolve (and Blind Deconvolve's given PSF, the preview): the ImageJ side of
 * {@link PsfPreparation} — the open PSF image read through the bridge, or the model computed from the optics
 * on ImageJ's thread count.
 */
final class DeconvolvePsfs {

	private DeconvolvePsfs() {}

	/**
	 * One PSF per channel of {@code in}: from {@code optics} when given, else from {@code psfImp} (resampled to the
	 * image's voxel size if needed; re-centred when {@code recentre}, else an off-centre PSF gets a warning note).
	 */
	static List<Volume> psfsFor(final Hyperstack in, final ImagePlus psfImp, final PsfFromOptics.Options optics, final List<String> notes,
			final boolean recentre) {
		if (optics != null) {
			final PsfGrid grid = gridFor(optics, in);
			final Volume v = Commands.withImageJThreads(() -> PsfModels.get(optics.model()).compute(optics.optics(), grid));
			return PsfPreparation.fromOptics(v, in, optics.optics(), notes);
		}
		return PsfPreparation.fromStack(in, ImageBridge.toCore(psfImp), psfImp.getTitle(), notes, recentre);
	}

	/** The grid of a PSF from optics for this stack ({@link PsfPreparation#gridFor}). */
	static PsfGrid gridFor(final PsfFromOptics.Options optics, final Hyperstack in) {
		return PsfPreparation.gridFor(optics.optics(), optics.voxelXY(), optics.voxelZ(), optics.sizeXY(), optics.sizeZ(), in.nx(), in.ny(), in.nz());
	}
}
