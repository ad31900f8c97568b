package org.parfocal.core;

/**
 * Separable Gaussian smoothing with a mirrored (half-sample symmetric) border (the border of SciPy's
 * {@code ndimage.gaussian_filter} with {@code mode="reflect"}; kernel radius ⌈3σ⌉, normalised), for bead detection and the anti-aliasing of resampled references. Written
 * by hand because the core's dependencies (ImgLib2 core) carry no Gaussian filter, and both need just three short
 * line passes.
 */
public final class Smoothing {

	private Smoothing() {}

	/** New volume: {@code v} (not changed) convolved with a Gaussian of standard deviations {@code sigma} voxels per axis (0 = none). */
	public static Volume gaussian(final Volume v, final double sx, final double sy, final double sz) {
		Volume out = v.copy();
		out = pass(out, 0, sx);
		out = pass(out, 1, sy);
		out = pass(out, 2, sz);
		return out;
	}

	private static double[] kernel(final double sigma) {
		final int r = Math.max(1, (int) Math.ceil(3 * sigma));
		final double[] k = new double[2 * r + 1];
		double s = 0;
		for (int i = -r; i <= r; i++) s += k[i + r] = Math.exp(-0.5 * i * i / (sigma * sigma));
		for (int i = 0; i < k.length; i++) k[i] /= s;
		return k;
	}

	private static int mirror(int i, final int n) {
		if (n == 1) return 0;
		final int p = 2 * n;
		i = Math.floorMod(i, p);
		return i < n ? i : p - 1 - i;
	}

	private static Volume pass(final Volume in, final int axis, final double sigma) {
		final int[] n = in.shape();
		if (!(sigma > 0) || n[axis] == 1) return in;
		final double[] k = kernel(sigma);
		final int r = k.length / 2;
		final int len = n[axis];
		final int stride = axis == 0 ? 1 : axis == 1 ? n[0] : n[0] * n[1];
		final int lines = in.size() / len;
		final float[] src = in.data();
		final Volume out = Volume.zeros(n[0], n[1], n[2], in.voxelSize());
		final float[] dst = out.data();
		Parallel.forRange(lines, l -> {
			// start index of line l: enumerate the other two axes
			final int start;
			if (axis == 0) start = l * n[0];
			else if (axis == 1) start = (l % n[0]) + (l / n[0]) * n[0] * n[1];
			else start = l;
			final double[] line = new double[len];
			for (int i = 0; i < len; i++) line[i] = src[start + i * stride];
			for (int i = 0; i < len; i++) {
				double s = 0;
				for (int j = -r; j <= r; j++) s += k[j + r] * line[mirror(i + j, len)];
				dst[start + i * stride] = (float) s;
			}
		});
		return out;
	}
}
