package org.parfocal.ij1;

import java.util.List;

import ij.ImagePlus;

import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.PsfStart;
import org.parfocal.blind.SupportBox;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.deconv.PsfPreparation;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Blind Deconvolve's core options from what its dialogs decided: the starting PSF (an open image prepared as
 * Deconvolve prepares a PSF, the optics' PSF on the image's grid, or a Gaussian of the given widths), the support
 * box in voxels, and the optics of the band limit.
 */
final class BlindStartPsf {

	private BlindStartPsf() {}

	/** The core options: the starting PSF, the support box in voxels, the optics. */
	static BlindOptions blindOptions(final BlindDeconvolveOptions o, final Volume image, final ImagePlus psfImp, final List<String> notes) {
		final boolean is3D = image.nz() > 1;
		SupportBox support = supportBox(o, image);
		final PsfStart start;
		Optics optics = null;
		if (BlindDeconvolve.FROM_OPTICS.equals(o.psf())) {
			optics = o.optics().optics();
			final Volume computed = fromOptics(o.optics(), image, notes);
			if (support == null && (computed.nx() > image.nx() || computed.ny() > image.ny() || computed.nz() > image.nz())) {
				support = new SupportBox(fit(computed.nx(), image.nx()), fit(computed.ny(), image.ny()), fit(computed.nz(), image.nz()));
				notes.add("The PSF from the optics (" + computed.nx() + " x " + computed.ny() + " x " + computed.nz() + ") was cropped to the image: support box "
						+ support);
			}
			start = PsfStart.given(computed);
		} else if (BlindDeconvolve.GAUSSIAN.equals(o.psf())) {
			start = PsfStart.gaussian(o.fwhmXY(), o.fwhmZ());
		} else {
			start = PsfStart.given(DeconvolvePsfs.psfsFor(Hyperstack.of(image), psfImp, null, notes, false).get(0));
		}
		if (o.band() != null) optics = o.band().optics();
		if (!is3D && support != null && support.nz() != 1) support = new SupportBox(support.nx(), support.ny(), 1);
		return new BlindOptions(o.iterations(), o.objectUpdates(), o.psfUpdates(), o.objectTv(), o.psfTv(), start, support, o.bandLimit(), o.symmetric(),
				o.centring(), optics, o.snapshotInterval(), o.edges(), o.offset(), o.background());
	}

	/** Largest odd size ≤ the image's that is ≤ n. */
	private static int fit(final int n, final int image) {
		final int cap = image % 2 == 1 ? image : image - 1;
		return Math.max(1, Math.min(n, cap));
	}

	/** The user's support box in voxels, or null (automatic) when the sizes are 0. */
	static SupportBox supportBox(final BlindDeconvolveOptions o, final Volume image) {
		final boolean is3D = image.nz() > 1;
		final double sxy = o.supportXY(), sz = is3D ? o.supportZ() : 0;
		if (sxy == 0 && sz == 0) return null;
		if (sxy == 0 || (is3D && sz == 0))
			throw new IllegalArgumentException("Give both support sizes (support_xy and support_z), or 0 for both (automatic)");
		if (BlindDeconvolve.VOXELS.equals(o.supportUnits())) {
			final int nxy = BlindDeconvolveDialog.whole("The support size support_xy", sxy);
			return new SupportBox(nxy, nxy, is3D ? BlindDeconvolveDialog.whole("The support size support_z", sz) : 1);
		}
		final VoxelSize v = image.voxelSize();
		if (!v.isCalibrated())
			throw new IllegalArgumentException("A support box in microns needs the voxel size: calibrate the image, or give the box in voxels");
		final double f = PsfGrid.micronsPer(v);
		return new SupportBox(odd(sxy / (v.dx() * f)), odd(sxy / (v.dy() * f)), is3D ? odd(sz / (v.dz() * f)) : 1);
	}

	/** The odd number of voxels whose extent is nearest to {@code voxels}: 2·round((voxels − 1) / 2) + 1, at least 1. */
	private static int odd(final double voxels) {
		return (int) Math.max(1, 2 * Math.round((voxels - 1) / 2) + 1);
	}

	/** The starting PSF from the optics dialog, on its grid; its central plane for a 2D image. */
	private static Volume fromOptics(final PsfFromOptics.Options optics, final Volume image, final List<String> notes) {
		final VoxelSize v = image.voxelSize();
		if (v.isCalibrated()) {
			final double f = PsfGrid.micronsPer(v);
			final double dx = v.dx() * f, dz = v.dz() * f;
			if (Math.abs(optics.voxelXY() - dx) > 1e-3 * dx || (image.nz() > 1 && Math.abs(optics.voxelZ() - dz) > 1e-3 * dz))
				throw new IllegalArgumentException("The PSF from the optics would be sampled at " + PsfPreparation.fmt(optics.voxelXY()) + " x "
						+ PsfPreparation.fmt(optics.voxelZ()) + " µm but the image's voxels are " + PsfPreparation.fmt(dx) + " x " + PsfPreparation.fmt(dz)
						+ " µm: set voxel_xy and voxel_z to the image's");
		}
		final PsfGrid grid = optics.grid();
		final Volume p = Commands.withImageJThreads(() -> PsfModels.get(optics.model()).compute(optics.optics(), grid)).withVoxelSize(v);
		if (image.nz() > 1 || p.nz() == 1) return p;
		notes.add("The image is 2D: the central plane of the PSF from the optics is the start");
		final Volume plane = Volume.zeros(p.nx(), p.ny(), 1, v);
		System.arraycopy(p.data(), ((p.nz() - 1) / 2) * p.nx() * p.ny(), plane.data(), 0, p.nx() * p.ny());
		return Psfs.normalized(plane);
	}
}
