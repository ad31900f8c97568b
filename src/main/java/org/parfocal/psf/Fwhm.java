package org.parfocal.psf;

import org.parfocal.core.Volume;

/**
 * Full width at half maximum of sampled profiles, with linear interpolation between the two samples that
 * straddle half the maximum on each side (sub-voxel). The maximum is the highest sample; the width is
 * measured around it. Returns NaN when a side never falls below half the maximum (profile too short).
 */
public final class Fwhm {

	private Fwhm() {}

	/** FWHM of {@code f} sampled every {@code spacing}, in the units of {@code spacing}. */
	public static double of(final double[] f, final double spacing) {
		int p = 0;
		for (int i = 1; i < f.length; i++) if (f[i] > f[p]) p = i;
		return of(f, p, spacing);
	}

	/** FWHM around the sample {@code peak}. */
	public static double of(final double[] f, final int peak, final double spacing) {
		final double half = 0.5 * f[peak];
		if (!(half > 0)) return Double.NaN;
		int i = peak;
		while (i < f.length - 1 && f[i + 1] > half) i++;
		if (i == f.length - 1) return Double.NaN;
		final double right = i + (f[i] - half) / (f[i] - f[i + 1]);
		i = peak;
		while (i > 0 && f[i - 1] > half) i--;
		if (i == 0) return Double.NaN;
		final double left = i - (f[i] - half) / (f[i] - f[i - 1]);
		return (right - left) * spacing;
	}

	/** Lateral FWHM along x through the brightest voxel, in the volume's units (µm for a PSF). */
	public static double lateral(final Volume psf) {
		final int[] p = peak(psf);
		final double[] f = new double[psf.nx()];
		for (int x = 0; x < f.length; x++) f[x] = psf.get(x, p[1], p[2]);
		return of(f, p[0], psf.voxelSize().dx());
	}

	/** Lateral FWHM along y through the brightest voxel. */
	public static double lateralY(final Volume psf) {
		final int[] p = peak(psf);
		final double[] f = new double[psf.ny()];
		for (int y = 0; y < f.length; y++) f[y] = psf.get(p[0], y, p[2]);
		return of(f, p[1], psf.voxelSize().dy());
	}

	/** Axial FWHM along z through the brightest voxel. */
	public static double axial(final Volume psf) {
		final int[] p = peak(psf);
		final double[] f = new double[psf.nz()];
		for (int z = 0; z < f.length; z++) f[z] = psf.get(p[0], p[1], z);
		return of(f, p[2], psf.voxelSize().dz());
	}

	/** {x, y, z} of the brightest voxel (the first one in storage order on ties). */
	public static int[] peak(final Volume v) {
		final float[] d = v.data();
		int arg = 0;
		for (int i = 1; i < d.length; i++) if (d[i] > d[arg]) arg = i;
		return new int[] { arg % v.nx(), (arg / v.nx()) % v.ny(), arg / (v.nx() * v.ny()) };
	}
}
