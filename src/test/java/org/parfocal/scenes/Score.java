package org.parfocal.scenes;

import org.parfocal.core.Volume;

/**
 * Quality against the truth of a scene: PSNR in dB, 10·log10(max(truth)² / MSE), with the estimate converted
 * from ADU (after offset) to photons by the scene's true gain (PSNR as usual in image restoration, common
 * practice).
 */
public final class Score {

	private Score() {}

	/** PSNR of an estimate in ADU after offset (x fastest, the truth's shape) against the truth in photons. */
	public static double psnr(final float[] estimateAdu, final Scene s) {
		final float[] t = s.truth().data();
		if (estimateAdu.length != t.length) throw new IllegalArgumentException("estimate and truth differ in size");
		final double inv = 1 / s.gain();
		double se = 0, max = 0;
		for (int i = 0; i < t.length; i++) {
			final double d = estimateAdu[i] * inv - t[i];
			se += d * d;
			max = Math.max(max, t[i]);
		}
		return 10 * Math.log10(max * max / (se / t.length));
	}

	/** PSNR of doing nothing: the recording after the true offset and the true background removal. */
	public static double inputPsnr(final Scene s) {
		final float[] r = s.recording().data(), b = s.background().data();
		final float[] e = new float[r.length];
		for (int i = 0; i < r.length; i++) e[i] = (float) (r[i] - s.offset() - b[i] * s.gain());
		return psnr(e, s);
	}

	public static double psnr(final Volume estimateAdu, final Scene s) {
		return psnr(estimateAdu.data(), s);
	}
}
