package org.parfocal.ij1;

import java.util.List;

import ij.ImagePlus;

import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.command.OpticsRequest;
import org.parfocal.command.PsfSource;
import org.parfocal.deconv.PsfPreparation;
import org.parfocal.psf.PsfGrid;

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
	static List<Volume> psfsFor(final Hyperstack in, final ImagePlus psfImp, final OpticsRequest optics, final List<String> notes,
			final boolean recentre) {
		final PsfSource source = source(psfImp, optics, recentre);
		return Commands.withImageJThreads(() -> source.prepare(PsfPreparation.Target.of(in), notes)); // the one preparation (blocks and Spark too)
	}

	/** Where the PSF comes from: {@code optics} when given, else the open image {@code psfImp} (re-centred when {@code recentre}). */
	static PsfSource source(final ImagePlus psfImp, final OpticsRequest optics, final boolean recentre) {
		return optics != null ? new PsfSource.FromOptics(optics) : new PsfSource.Given(ImageBridge.toCore(psfImp), psfImp.getTitle(), recentre);
	}

	/** The grid of a PSF from optics for this stack ({@link PsfPreparation#gridFor}). */
	static PsfGrid gridFor(final OpticsRequest optics, final Hyperstack in) {
		return new PsfSource.FromOptics(optics).grid(PsfPreparation.Target.of(in));
	}
}
