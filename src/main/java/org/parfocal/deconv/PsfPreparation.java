package org.parfocal.deconv;

import java.util.ArrayList;
import java.util.List;

import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfExtent;
import org.parfocal.psf.PsfGrid;

/**
 * The PSF per channel of a stack to deconvolve, from a PSF computed from the optics or from a given PSF stack:
 * fitted to the stack (a 2D stack takes the central plane, a given PSF is resampled to the stack's voxels and
 * optionally re-centred), with notes for the user (resampling, re-centring, one PSF for several channels) and
 * the box and sampling warnings of {@link PsfExtent}. No {@code ij.*}: the commands convert their images first.
 */
public final class PsfPreparation {

	private PsfPreparation() {}

	/**
	 * The stack a PSF is prepared for: its shape, channel count and voxel size (all a preparation needs, so a
	 * block-wise run that never holds the stack prepares its PSF the same way as a whole-stack run).
	 */
	public record Target(int nx, int ny, int nz, int channels, VoxelSize voxelSize) {

		/** The target of a stack in memory. */
		public static Target of(final Hyperstack in) {
			return new Target(in.nx(), in.ny(), in.nz(), in.channels(), in.voxelSize());
		}

		int[] shape() {
			return new int[] { nx, ny, nz };
		}
	}

	/**
	 * The grid of a PSF from optics for a stack of {@code nx × ny × nz}: sizes given ({@code sizeXY},
	 * {@code sizeZ} not 0) are kept; a size of 0 ("from the optics") is chosen for the stack
	 * ({@link PsfExtent#forStack}: a widefield box spans the stack's depth and holds the defocus cone over it).
	 */
	public static PsfGrid gridFor(final Optics optics, final double voxelXY, final double voxelZ, final int sizeXY, final int sizeZ, final int nx,
			final int ny, final int nz) {
		if (sizeXY != 0 && sizeZ != 0) return new PsfGrid(sizeXY, sizeXY, sizeZ, voxelXY, voxelXY, voxelZ);
		final PsfGrid auto = PsfExtent.forStack(optics, voxelXY, voxelXY, voxelZ, nx, ny, nz);
		return new PsfGrid(sizeXY == 0 ? auto.nx() : sizeXY, sizeXY == 0 ? auto.ny() : sizeXY, sizeZ == 0 ? auto.nz() : sizeZ, voxelXY, voxelXY, voxelZ);
	}

	/** A PSF computed from {@code optics}, used for every channel of {@code in} (its central plane for a 2D stack). */
	public static List<Volume> fromOptics(final Volume computed, final Hyperstack in, final Optics optics, final List<String> notes) {
		return fromOptics(computed, Target.of(in), optics, notes);
	}

	/** A PSF computed from {@code optics}, used for every channel of the target (its central plane for a 2D stack). */
	public static List<Volume> fromOptics(final Volume computed, final Target in, final Optics optics, final List<String> notes) {
		final List<Volume> out = new ArrayList<>();
		final Volume fitted = in.nz() == 1 && computed.nz() > 1 ? centralPlane(computed) : computed;
		for (int c = 0; c < in.channels(); c++) out.add(fitted);
		if (in.channels() > 1) notes.add("one PSF from the optics used for all " + in.channels() + " channels");
		notes.addAll(PsfExtent.warnings(fitted, in.shape(), microns(in.voxelSize()), optics));
		return out;
	}

	/**
	 * The PSF per channel from a given PSF stack {@code p} (titled {@code title}): one channel for all, or one per
	 * image channel; resampled to the image's voxel size if needed; a PSF whose centre of mass is more than half
	 * a voxel off its centre voxel is re-centred (whole voxels, {@link Psfs#recentred}) when {@code recentre},
	 * else a warning note is added.
	 */
	public static List<Volume> fromStack(final Hyperstack in, final Hyperstack p, final String title, final List<String> notes, final boolean recentre) {
		return fromStack(Target.of(in), p, title, notes, recentre);
	}

	/** See {@link #fromStack(Hyperstack, Hyperstack, String, List, boolean)}, for a target. */
	public static List<Volume> fromStack(final Target in, final Hyperstack p, final String title, final List<String> notes, final boolean recentre) {
		if (p.frames() != 1) throw new IllegalArgumentException("The PSF '" + title + "' has " + p.frames() + " frames; one is expected");
		if (p.channels() != 1 && p.channels() != in.channels())
			throw new IllegalArgumentException("The PSF has " + p.channels() + " channels but the image has " + in.channels()
					+ ": give one PSF, or one channel per image channel");
		if (p.channels() == 1 && in.channels() > 1)
			notes.add("one PSF ('" + title + "') used for all " + in.channels() + " channels; give one channel per image channel for their own PSFs");
		final List<Volume> out = new ArrayList<>();
		for (int c = 0; c < in.channels(); c++) {
			Volume v = p.get(p.channels() == 1 ? 0 : c, 0);
			v = matchVoxelSize(v, in.voxelSize(), notes);
			final String offCentre = Psfs.centroidWarning(v);
			if (offCentre != null && recentre) {
				final double[] off = Psfs.centroidOffset(v);
				v = Psfs.recentred(v);
				notes.add("PSF re-centred: its centre of mass was off its centre voxel by " + fmt(off[0]) + ", " + fmt(off[1]) + ", " + fmt(off[2]) + " voxels");
			} else if (offCentre != null) notes.add("Warning: " + offCentre);
			out.add(v);
			for (final String w : PsfExtent.warnings(v, in.shape(), microns(in.voxelSize()), null))
				if (!notes.contains(w)) notes.add(w);
		}
		return out;
	}

	/** {dx, dy, dz} in µm, or null for an uncalibrated stack or an unknown unit. */
	static double[] microns(final VoxelSize v) {
		if (!v.isCalibrated()) return null;
		try {
			final double f = PsfGrid.micronsPer(v);
			return new double[] { v.dx() * f, v.dy() * f, v.dz() * f };
		} catch (final IllegalArgumentException e) {
			return null;
		}
	}

	private static Volume matchVoxelSize(final Volume psf, final VoxelSize image, final List<String> notes) {
		final VoxelSize p = psf.voxelSize();
		if (!p.isCalibrated() || !image.isCalibrated()) return psf;
		final double fp = PsfGrid.micronsPer(p), fi = PsfGrid.micronsPer(image);
		final double[] a = { p.dx() * fp, p.dy() * fp, p.dz() * fp }, b = { image.dx() * fi, image.dy() * fi, image.dz() * fi };
		boolean same = true;
		for (int d = 0; d < (psf.nz() > 1 ? 3 : 2); d++) same &= Math.abs(a[d] - b[d]) <= 1e-3 * b[d];
		if (same) return psf;
		final Volume r = Psfs.resampleTo(psf.withVoxelSize(VoxelSize.microns(a[0], a[1], a[2])), VoxelSize.microns(b[0], b[1], b[2]));
		notes.add("PSF resampled from " + fmt(a[0]) + " x " + fmt(a[1]) + " x " + fmt(a[2]) + " µm to the image's " + fmt(b[0]) + " x " + fmt(b[1])
				+ " x " + fmt(b[2]) + " µm voxels (" + r.nx() + "x" + r.ny() + "x" + r.nz() + ")");
		return r;
	}

	/** Four significant digits, no trailing zeros. */
	public static String fmt(final double v) {
		return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).stripTrailingZeros().toPlainString();
	}

	private static Volume centralPlane(final Volume v) {
		final Volume out = Volume.zeros(v.nx(), v.ny(), 1, v.voxelSize());
		System.arraycopy(v.data(), ((v.nz() - 1) / 2) * v.nx() * v.ny(), out.data(), 0, v.nx() * v.ny());
		return Psfs.normalized(out);
	}
}
