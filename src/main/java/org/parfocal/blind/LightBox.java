package org.parfocal.blind;

import java.util.List;
import java.util.Locale;

import org.parfocal.core.Volume;

/**
 * A PSF box that holds the model's light: the smallest odd box, centred on the origin voxel, that holds at
 * least {@link #FRACTION} of the light the model puts into the largest box the image allows (odd sizes of at
 * most the image's). A widefield PSF's planes each hold about the same light (the defocus cone spreads it but
 * keeps it), so its box is bounded only by the image; when the largest box's end planes still carry more
 * than {@link #SHALLOW} of its brightest plane's light, the stack is too shallow to hold the cone and a note
 * says so.
 * <p>
 * Measured on the model's own light, where {@code psf/PsfExtent} sizes a widefield box from the optics'
 * defocus cone: the blind engine's parameter spaces (a fitted Gaussian or widefield shape) have no aperture
 * to draw a cone from. Box sums from a summed-area table in double.
 */
public final class LightBox {

	/** Share of the light the box must hold. */
	public static final double FRACTION = 0.95;
	/** End-plane light, relative to the brightest plane, above which the stack is called too shallow. */
	public static final double SHALLOW = 0.25;

	private LightBox() {}

	/** The largest odd box within an image of shape n. */
	public static int[] largest(final int[] n) {
		return new int[] { n[0] % 2 == 1 ? n[0] : n[0] - 1, n[1] % 2 == 1 ? n[1] : n[1] - 1, n[2] % 2 == 1 ? n[2] : Math.max(1, n[2] - 1) };
	}

	/**
	 * The smallest centred box of {@code reference} (a model PSF on the largest box, any sum) holding at least
	 * {@link #FRACTION} of its light, by voxel count; lateral sizes equal when the reference is square.
	 * Notes (shallow stack) go to {@code notes}.
	 */
	public static int[] holding(final Volume reference, final List<String> notes) {
		final int kx = reference.nx(), ky = reference.ny(), kz = reference.nz();
		final double[] sat = summed(reference);
		final double total = box(sat, kx, ky, kz, (kx - 1) / 2, (ky - 1) / 2, (kz - 1) / 2);
		if (!(total > 0)) throw new IllegalArgumentException("The model PSF has no light");
		final int cx = (kx - 1) / 2, cy = (ky - 1) / 2, cz = (kz - 1) / 2;
		int[] best = { kx, ky, kz };
		long bestVol = (long) kx * ky * kz;
		for (int sz = 0; sz <= Math.min(cz, kz - 1 - cz); sz++) {
			// smallest lateral half-width r (x and y scaled alike) reaching the fraction at this axial half-width
			final int rmax = Math.min(Math.min(cx, kx - 1 - cx), Math.min(cy, ky - 1 - cy));
			int lo = 0, hi = rmax;
			if (box(sat, kx, ky, kz, hi, hi, sz) < FRACTION * total) continue;
			while (lo < hi) {
				final int mid = (lo + hi) >>> 1;
				if (box(sat, kx, ky, kz, mid, mid, sz) >= FRACTION * total) hi = mid;
				else lo = mid + 1;
			}
			final long vol = (long) (2 * lo + 1) * (2 * lo + 1) * (2 * sz + 1);
			if (vol < bestVol) {
				bestVol = vol;
				best = new int[] { 2 * lo + 1, 2 * lo + 1, 2 * sz + 1 };
			}
		}
		if (kz > 1) {
			double maxPlane = 0;
			final double[] plane = new double[kz];
			final float[] d = reference.data();
			for (int z = 0; z < kz; z++) {
				double s = 0;
				for (int i = z * kx * ky, e = i + kx * ky; i < e; i++) s += d[i];
				plane[z] = s;
				maxPlane = Math.max(maxPlane, s);
			}
			final double end = Math.max(plane[0], plane[kz - 1]) / maxPlane;
			if (end > SHALLOW)
				notes.add(String.format(Locale.ROOT,
						"The stack is too shallow to hold the widefield cone: in a %d-plane PSF box the end planes still carry %.0f %% of the brightest plane's light; out-of-focus light from beyond the stack is not modelled (record more planes)",
						kz, 100 * end));
		}
		if (bestVol == (long) kx * ky * kz && box(sat, kx, ky, kz, cx, cy, cz) < FRACTION * total)
			notes.add("No box within the image holds 95 % of the model PSF's light");
		return best;
	}

	/** Light of the reference in the box of half-widths (rx, ry, rz) about the centre. */
	static double fraction(final Volume reference, final int[] box) {
		final int kx = reference.nx(), ky = reference.ny(), kz = reference.nz();
		final double[] sat = summed(reference);
		return box(sat, kx, ky, kz, Math.min((box[0] - 1) / 2, (kx - 1) / 2), Math.min((box[1] - 1) / 2, (ky - 1) / 2), Math.min((box[2] - 1) / 2, (kz - 1) / 2))
				/ box(sat, kx, ky, kz, (kx - 1) / 2, (ky - 1) / 2, (kz - 1) / 2);
	}

	private static double[] summed(final Volume v) {
		final int kx = v.nx(), ky = v.ny(), kz = v.nz();
		final double[] s = new double[(kx + 1) * (ky + 1) * (kz + 1)];
		final float[] d = v.data();
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < ky; y++)
				for (int x = 0; x < kx; x++)
					s[idx(x + 1, y + 1, z + 1, kx, ky)] = d[x + kx * (y + ky * z)] + s[idx(x, y + 1, z + 1, kx, ky)] + s[idx(x + 1, y, z + 1, kx, ky)]
							+ s[idx(x + 1, y + 1, z, kx, ky)] - s[idx(x, y, z + 1, kx, ky)] - s[idx(x, y + 1, z, kx, ky)] - s[idx(x + 1, y, z, kx, ky)]
							+ s[idx(x, y, z, kx, ky)];
		return s;
	}

	private static int idx(final int x, final int y, final int z, final int kx, final int ky) {
		return x + (kx + 1) * (y + (ky + 1) * z);
	}

	private static double box(final double[] s, final int kx, final int ky, final int kz, final int rx, final int ry, final int rz) {
		final int x0 = (kx - 1) / 2 - rx, x1 = (kx - 1) / 2 + rx + 1, y0 = (ky - 1) / 2 - ry, y1 = (ky - 1) / 2 + ry + 1, z0 = (kz - 1) / 2 - rz,
				z1 = (kz - 1) / 2 + rz + 1;
		return s[idx(x1, y1, z1, kx, ky)] - s[idx(x0, y1, z1, kx, ky)] - s[idx(x1, y0, z1, kx, ky)] - s[idx(x1, y1, z0, kx, ky)] + s[idx(x0, y0, z1, kx, ky)]
				+ s[idx(x0, y1, z0, kx, ky)] + s[idx(x1, y0, z0, kx, ky)] - s[idx(x0, y0, z0, kx, ky)];
	}
}
