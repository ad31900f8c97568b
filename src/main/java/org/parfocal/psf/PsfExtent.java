package org.parfocal.psf;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import org.parfocal.core.Volume;

/**
 * How large a PSF's box must be for a given stack, and whether a given PSF looks too small or the stack too
 * coarsely sampled.
 * <p>
 * <b>Widefield box for a stack.</b> A widefield PSF does not fade with defocus: every plane carries the same
 * light (conservation of energy through the focus), spread over the geometric defocus cone, a disk of radius
 * |z|·tan α at defocus z (α the aperture half-angle; common practice, e.g. Born &amp; Wolf §8.8, from memory).
 * Light of an emitter anywhere in the stack reaches every plane of it, so the PSF box must span the stack's
 * depth, and laterally hold the cone over that depth. {@link #forStack} gives that box: axially the largest
 * odd size not above the stack's planes (the convolution engine accepts PSFs up to the image size; with
 * non-circulant edges the object domain then extends by the PSF's half-size beyond each face), laterally
 * max(4.5·λ/NA, z<sub>max</sub>·tan α + 2·λ/NA), capped likewise at the image size. For a light sheet the sheet
 * bounds the axial extent ({@link PsfGrid#forOptics}) and the cone rule applies within it; confocal and
 * two-photon PSFs fade with defocus and keep {@link PsfGrid#forOptics}, capped at the image size.
 * <p>
 * <b>Checks of a given PSF</b> ({@link #warnings}): lateral truncation (in a plane carrying much light, the box's outer ring is
 * still above {@link #EDGE_LEVEL} of the plane's mean level, {@link #edgeLevel}), axial truncation of a widefield-like PSF (its outer planes still carry
 * more than {@link #OUTER_PLANE_SHARE} of its brightest plane's light while it spans fewer planes than the stack
 * could use), and undersampling (voxels coarser than the Nyquist interval of the optics, λ/(4·NA) laterally and
 * λ/(2·n·(1 − cos α)) axially, the support of the widefield OTF; without optics: a PSF whose lateral FWHM
 * spans fewer than 1.5 voxels; at the Nyquist interval it spans about 2). All of these are warnings: the run goes on.
 */
public final class PsfExtent {

	/** {@link #edgeLevel} above which a PSF looks cut off laterally. */
	public static final double EDGE_LEVEL = 0.3;
	/** Light of an outer plane, relative to the brightest plane, above which a short widefield PSF looks cut off. */
	public static final double OUTER_PLANE_SHARE = 0.25;

	private PsfExtent() {}

	/** The largest odd number ≤ n (at least 1). */
	static int oddAtMost(final int n) {
		return Math.max(1, n % 2 == 1 ? n : n - 1);
	}

	/**
	 * Slope tan α of the defocus cone's edge, α = asin(NA/n<sub>i</sub>) the aperture angle in the immersion,
	 * at most {@link #MAX_CONE_SLOPE} (near-grazing rays carry little light).
	 */
	public static double coneSlope(final Optics o) {
		return Math.min(Math.tan(o.apertureAngle()), MAX_CONE_SLOPE);
	}

	/** Largest cone slope used for the box (NA/n = 0.96). */
	public static final double MAX_CONE_SLOPE = 3.5;

	/**
	 * The box of a PSF for a stack of {@code nx × ny × nz} voxels of {@code dx × dy × dz} µm (see the class
	 * comment); a 2D stack (nz = 1) gets a single plane.
	 */
	public static PsfGrid forStack(final Optics o, final double dx, final double dy, final double dz, final int nx, final int ny, final int nz) {
		final PsfGrid base = PsfGrid.forOptics(o, dx, dy, dz);
		final int mx = oddAtMost(nx), my = oddAtMost(ny), mz = oddAtMost(nz);
		if (nz == 1) return new PsfGrid(Math.min(base.nx(), mx), Math.min(base.ny(), my), 1, dx, dy, dz);
		if (o.modality() != Modality.WIDEFIELD && o.modality() != Modality.LIGHT_SHEET)
			return new PsfGrid(Math.min(base.nx(), mx), Math.min(base.ny(), my), Math.min(base.nz(), mz), dx, dy, dz);
		final int sz = o.modality() == Modality.WIDEFIELD ? Math.min(mz, PsfGrid.MAX_AXIAL) : Math.min(base.nz(), mz);
		final double zmax = (sz - 1) / 2 * dz;
		final double lambda = o.longestWavelength();
		final double half = Math.max(4.5 * lambda / o.na(), zmax * coneSlope(o) + 2 * lambda / o.na());
		return new PsfGrid(Math.min(lateral(half, dx), mx), Math.min(lateral(half, dy), my), sz, dx, dy, dz);
	}

	private static int lateral(final double half, final double d) {
		return (int) Math.max(3, Math.min(1025, 2 * Math.ceil(half / d) + 1));
	}

	/**
	 * How much light reaches the lateral edge of the box: over the planes that carry at least a quarter of the
	 * brightest plane's light, the largest ratio of the mean value on the plane's outermost ring of voxels to the
	 * plane's mean value. About 1 when the plane's light fills the box (a defocus disk cut by the box), near 0
	 * when it fades well inside.
	 */
	public static double edgeLevel(final Volume psf) {
		final double[] sums = planeSums(psf);
		double max = 0;
		for (final double v : sums) max = Math.max(max, v);
		final int nx = psf.nx(), ny = psf.ny(), ring = 2 * nx + 2 * ny - 4;
		double level = 0;
		for (int z = 0; z < psf.nz(); z++) {
			if (!(sums[z] >= 0.25 * max) || sums[z] <= 0) continue;
			double edge = 0;
			for (int x = 0; x < nx; x++) edge += psf.get(x, 0, z) + psf.get(x, ny - 1, z);
			for (int y = 1; y < ny - 1; y++) edge += psf.get(0, y, z) + psf.get(nx - 1, y, z);
			level = Math.max(level, (edge / ring) / (sums[z] / ((double) nx * ny)));
		}
		return level;
	}

	/** Light of each plane. */
	public static double[] planeSums(final Volume psf) {
		final double[] s = new double[psf.nz()];
		for (int z = 0; z < psf.nz(); z++)
			for (int y = 0; y < psf.ny(); y++)
				for (int x = 0; x < psf.nx(); x++) s[z] += psf.get(x, y, z);
		return s;
	}

	/**
	 * Warnings (one line each, none when all is well) about {@code psf} (not modified) for an image of
	 * {@code imageShape} with voxel sizes {@code voxelMicrons} (µm, or null when unknown); {@code optics} may be
	 * null (then the sampling check uses the PSF's own width).
	 */
	public static List<String> warnings(final Volume psf, final int[] imageShape, final double[] voxelMicrons, final Optics optics) {
		final List<String> w = new ArrayList<>();
		if (psf.nx() >= 3 && psf.ny() >= 3) {
			final double e = edgeLevel(psf);
			if (e > EDGE_LEVEL)
				w.add(String.format(Locale.ROOT, "the PSF looks cut off laterally: the edge of its %d x %d box is still at %.0f %% of a plane's mean level"
						+ " (above %.0f %%); a larger box (for a widefield PSF one that holds the defocus cone over the stack's depth) models the blur better", psf.nx(),
						psf.ny(), 100 * e, 100 * EDGE_LEVEL));
		}
		if (psf.nz() >= 3 && imageShape[2] > 1) {
			final double[] s = planeSums(psf);
			double max = 0;
			for (final double v : s) max = Math.max(max, v);
			final double outer = Math.min(s[0], s[s.length - 1]) / max;
			if (outer > OUTER_PLANE_SHARE && psf.nz() < oddAtMost(imageShape[2]))
				w.add(String.format(Locale.ROOT, "the PSF looks cut off axially: its outer planes still carry %.0f %% of its brightest plane's light, but it spans"
						+ " %d of the stack's %d planes; a widefield PSF should span the stack's depth (%d planes)", 100 * outer, psf.nz(), imageShape[2],
						oddAtMost(imageShape[2])));
		}
		if (voxelMicrons != null && optics != null) {
			final double lambda = optics.emissionWavelength() > 0 ? optics.emissionWavelength() : optics.longestWavelength();
			final double nyqXY = lambda / (4 * optics.na());
			final double nyqZ = lambda / (2 * optics.immersionIndex() * (1 - Math.cos(optics.apertureAngle())));
			final double dxy = Math.max(voxelMicrons[0], voxelMicrons[1]);
			if (dxy > 1.05 * nyqXY)
				w.add(String.format(Locale.ROOT, "the stack is undersampled laterally: %.3g µm pixels for a Nyquist interval of %.3g µm (λ/(4·NA)); deconvolution"
						+ " cannot restore detail finer than the pixels", dxy, nyqXY));
			if (imageShape[2] > 1 && voxelMicrons[2] > 1.05 * nyqZ)
				w.add(String.format(Locale.ROOT, "the stack is undersampled axially: %.3g µm steps for a Nyquist interval of %.3g µm (λ/(2·n·(1 − cos α)))",
						voxelMicrons[2], nyqZ));
		} else if (psf.nx() >= 3) {
			final double f = lateralFwhmVoxels(psf);
			if (f < 1.5)
				w.add(String.format(Locale.ROOT, "the stack looks undersampled: the PSF's lateral FWHM spans %.2g voxels (fewer than 1.5; about 2 at the Nyquist"
						+ " interval)", f));
		}
		return w;
	}

	/** FWHM in voxels along x through the brightest voxel, linear interpolation between samples. */
	static double lateralFwhmVoxels(final Volume psf) {
		int bx = 0, by = 0, bz = 0;
		float best = -Float.MAX_VALUE;
		for (int z = 0; z < psf.nz(); z++)
			for (int y = 0; y < psf.ny(); y++)
				for (int x = 0; x < psf.nx(); x++)
					if (psf.get(x, y, z) > best) {
						best = psf.get(x, y, z);
						bx = x;
						by = y;
						bz = z;
					}
		final double half = best / 2.0;
		double left = 0, right = psf.nx() - 1;
		for (int x = bx; x > 0; x--)
			if (psf.get(x - 1, by, bz) < half) {
				final double a = psf.get(x - 1, by, bz), b = psf.get(x, by, bz);
				left = x - 1 + (half - a) / (b - a);
				break;
			}
		for (int x = bx; x < psf.nx() - 1; x++)
			if (psf.get(x + 1, by, bz) < half) {
				final double a = psf.get(x, by, bz), b = psf.get(x + 1, by, bz);
				right = x + (a - half) / (a - b);
				break;
			}
		return right - left;
	}
}
