package org.parfocal.command;

import java.util.List;

import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.deconv.PsfPreparation;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Where a run's PSF comes from, with the one preparation every front end uses ({@link #prepare}): the menu
 * commands, the preview, the block runner and the cluster runner. A PSF from the optics gets a box fitted to
 * the stack ({@link PsfPreparation#gridFor}: a widefield box that holds the defocus cone over the stack's
 * depth); a given PSF is resampled to the stack's voxels and, if asked, re-centred. No {@code ij.*}.
 */
public sealed interface PsfSource {

	/** One PSF per channel of the target; notes for the user (resampling, re-centring, box warnings) go to {@code notes}. */
	List<Volume> prepare(PsfPreparation.Target target, List<String> notes);

	/** A PSF computed from the optics. */
	record FromOptics(OpticsRequest optics) implements PsfSource {

		/** The grid the PSF is computed on for this target. */
		public PsfGrid grid(final PsfPreparation.Target t) {
			return PsfPreparation.gridFor(optics.optics(), optics.voxelXY(), optics.voxelZ(), optics.sizeXY(), optics.sizeZ(), t.nx(), t.ny(), t.nz());
		}

		@Override
		public List<Volume> prepare(final PsfPreparation.Target target, final List<String> notes) {
			final Volume v = PsfModels.get(optics.model()).compute(optics.optics(), grid(target));
			return PsfPreparation.fromOptics(v, target, optics.optics(), notes);
		}
	}

	/** A given PSF stack (one channel for all, or one per channel), titled {@code title} in notes. */
	record Given(Hyperstack psf, String title, boolean recentre) implements PsfSource {

		@Override
		public List<Volume> prepare(final PsfPreparation.Target target, final List<String> notes) {
			return PsfPreparation.fromStack(target, psf, title, notes, recentre);
		}
	}
}
