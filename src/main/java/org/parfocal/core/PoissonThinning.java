package org.parfocal.core;

import java.util.SplittableRandom;

/**
 * Splits a recording of photon counts into two independent halves by binomial thinning with p = ½: a
 * Poisson(λ) count c gives Binomial(c, ½) and c − Binomial(c, ½), two independent Poisson(λ/2) counts (the
 * thinning property of the Poisson distribution, any probability textbook). Each half is a recording of the same
 * scene with half the light, so a model fitted to one half can be scored by the likelihood of the other
 * (held-out validation; for Richardson–Lucy's stopping point: Coakley, "A cross-validation procedure for
 * stopping the EM algorithm and deconvolution of neutron depth profiling spectra", IEEE Trans. Nucl. Sci. 38,
 * 1991, from memory).
 * <p>
 * Data in other units than photons are converted with {@code photonsPerUnit} (1 / camera gain) and each half
 * is divided back, so the halves are in the data's units with half its level each. Shared by the blind model
 * fit ({@code blind/ModelFit}) and the held-out stop ({@code deconv/HoldOutStop}).
 */
public final class PoissonThinning {

	private PoissonThinning() {}

	/**
	 * {first half, second half} of y: each of round(max(y, 0)·s) photons goes to either half with probability ½
	 * (Binomial(c, ½) as the number of set bits among c random bits: exact, and no library samples a binomial
	 * this cheaply), divided back by s. Sequential and seeded: the same split on every run and thread count.
	 * NaN voxels (left out of the data term) stay NaN in both halves.
	 */
	public static float[][] split(final float[] y, final double photonsPerUnit, final long seed) {
		return split(y, photonsPerUnit, seed, 1);
	}

	/**
	 * {larger part, smaller part} of y: each photon goes to the first part with probability p = 1 − 2^−bits
	 * (½, ¾, ⅞, …), to the second with 2^−bits, so the parts are independent Poisson recordings with p and 1 − p
	 * of the light. A photon joins the first part when at least one of {@code bits} random bits is set (the count
	 * is the set bits of the OR of {@code bits} random words: exact, like the ½ split, which is bits = 1 and
	 * gives the same halves as {@link #split(float[], double, long)}).
	 */
	public static float[][] split(final float[] y, final double photonsPerUnit, final long seed, final int bits) {
		if (!(photonsPerUnit > 0) || !Double.isFinite(photonsPerUnit)) throw new IllegalArgumentException("Photons per unit must be positive, got " + photonsPerUnit);
		if (bits < 1 || bits > 8) throw new IllegalArgumentException("1 to 8 bits per photon, got " + bits);
		final float[] a = new float[y.length], b = new float[y.length];
		final SplittableRandom r = new SplittableRandom(seed);
		for (int i = 0; i < y.length; i++) {
			if (y[i] != y[i]) {
				a[i] = b[i] = Float.NaN;
				continue;
			}
			final double v = y[i] * photonsPerUnit;
			long c = v > 0 ? Math.round(v) : 0;
			long k = 0;
			final long total = c;
			for (; c >= 64; c -= 64) k += Long.bitCount(word(r, bits));
			if (c > 0) k += Long.bitCount(word(r, bits) & ((1L << c) - 1));
			a[i] = (float) (k / photonsPerUnit);
			b[i] = (float) ((total - k) / photonsPerUnit);
		}
		return new float[][] { a, b };
	}

	/** The OR of {@code bits} random words: each bit set with probability 1 − 2^−bits. */
	private static long word(final SplittableRandom r, final int bits) {
		long w = r.nextLong();
		for (int j = 1; j < bits; j++) w |= r.nextLong();
		return w;
	}
}
