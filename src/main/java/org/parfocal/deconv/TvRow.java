package org.parfocal.deconv;

/**
 * One row of the Richardson–Lucy update with total-variation regularisation (Dey et al., Microsc. Res. Tech.
 * 2006): x_new = x · c / (1 − λ·div(∇x/|∇x|_ε)), with forward differences and zero flux across the domain edges.
 * Shared by the non-blind and the blind solvers so both compute exactly the same numbers.
 */
public final class TvRow {

	private TvRow() {}

	/**
	 * |∇x|_ε = √(ε² + dx² + dy² + dz²) at voxel l = (i, iy, iz) of an mx × my × mz object (forward differences,
	 * zero across the upper edges).
	 */
	public static float gradNorm(final float[] x, final int l, final int i, final int iy, final int iz, final int mx, final int my, final int mz,
			final float eps) {
		final int plane = mx * my;
		final float xl = x[l];
		final float dx = i + 1 < mx ? x[l + 1] - xl : 0f;
		final float dy = iy + 1 < my ? x[l + mx] - xl : 0f;
		final float dz = iz + 1 < mz ? x[l + plane] - xl : 0f;
		return (float) Math.sqrt(eps * eps + dx * dx + dy * dy + dz * dz);
	}

	/**
	 * div(∇x/|∇x|_ε) at voxel l = (i, iy, iz) of an mx × my × mz array: the normalised gradient N(l) − N(l − e_d)
	 * summed over the axes (forward differences, zero flux across the edges). Also the blind solver's TV
	 * factor of the PSF, on the PSF box.
	 */
	public static float divergence(final float[] x, final int l, final int i, final int iy, final int iz, final int mx, final int my, final int mz,
			final float eps) {
		final int plane = mx * my;
		final float xo = x[l];
		final float g = gradNorm(x, l, i, iy, iz, mx, my, mz, eps);
		float div = 0;
		if (i + 1 < mx) div += (x[l + 1] - xo) / g;
		if (iy + 1 < my) div += (x[l + mx] - xo) / g;
		if (iz + 1 < mz) div += (x[l + plane] - xo) / g;
		if (i > 0) div -= (xo - x[l - 1]) / gradNorm(x, l - 1, i - 1, iy, iz, mx, my, mz, eps);
		if (iy > 0) div -= (xo - x[l - mx]) / gradNorm(x, l - mx, i, iy - 1, iz, mx, my, mz, eps);
		if (iz > 0) div -= (xo - x[l - plane]) / gradNorm(x, l - plane, i, iy, iz - 1, mx, my, mz, eps);
		return div;
	}

	/**
	 * Updates object row {@code or} into {@code t[o .. o + mx)}, where {@code t} holds the correction factors on
	 * entry (Hᵀ of the data ratio); {@code invW} (may be null) divides by the sensitivity Hᵀ1. Adds
	 * Σ|x_new − x|, Σx and Σx_new of the row into {@code acc[0..2]}. Negative results are set to 0.
	 */
	public static void update(final float[] x, final float[] t, final int o, final int or, final float[] invW, final float lambda, final float eps,
			final int mx, final int my, final int mz, final double[] acc) {
		final int c = or * mx, iy = or % my, iz = or / my;
		double change = 0, before = 0, after = 0;
		for (int i = 0; i < mx; i++) {
			final int l = c + i;
			final float xo = x[l];
			float v = xo * t[o + i];
			if (invW != null) v = v * invW[l];
			v = v / (1f - lambda * divergence(x, l, i, iy, iz, mx, my, mz, eps));
			if (!(v > 0)) v = 0;
			change += Math.abs(v - xo);
			before += xo;
			after += v;
			t[o + i] = v;
		}
		acc[0] = change;
		acc[1] = before;
		acc[2] = after;
	}
}
