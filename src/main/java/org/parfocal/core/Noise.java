package org.parfocal.core;

import org.apache.commons.math3.random.RandomGenerator;
import org.apache.commons.math3.random.Well19937c;

/**
 * Seeded shot noise for simulated acquisitions. Each z plane draws from its own generator seeded from
 * (seed, plane), so the result depends only on the seed and never on the number of threads.
 */
public final class Noise {

	private Noise() {}

	/**
	 * New volume of Poisson counts with mean {@code scale · v} (negative means count as 0), divided back by
	 * {@code scale} so intensities keep their units. {@code scale} is photons per intensity unit.
	 */
	public static Volume poisson(final Volume v, final double scale, final long seed) {
		if (!(scale > 0) || !Double.isFinite(scale)) throw new IllegalArgumentException("Photon scale must be positive, got " + scale);
		final Volume out = Volume.zeros(v.nx(), v.ny(), v.nz(), v.voxelSize());
		final float[] in = v.data(), o = out.data();
		final int plane = v.nx() * v.ny();
		Parallel.forRange(v.nz(), z -> {
			final RandomGenerator rng = new Well19937c(new int[] { (int) seed, (int) (seed >>> 32), z });
			for (int i = z * plane, e = i + plane; i < e; i++) {
				final double mean = in[i] * scale;
				o[i] = mean > 0 ? (float) (poisson(rng, mean) / scale) : 0f;
			}
		});
		return out;
	}

	/**
	 * One Poisson draw. Written by hand because Commons Math's samplers build a distribution object (with its
	 * tables) for every mean, which costs seconds per million voxels of a simulated stack. Small means use
	 * inversion by sequential search; means of 10 and above use Hörmann's transformed rejection with squeeze
	 * (PTRS; W. Hörmann, "The transformed rejection method for generating Poisson random variables",
	 * Insurance: Mathematics and Economics 12, 1993).
	 */
	public static long poisson(final RandomGenerator rng, final double mean) {
		if (mean < 10) {
			// inversion: walk the CDF from 0
			double p = Math.exp(-mean), cdf = p;
			final double u = rng.nextDouble();
			long k = 0;
			while (u > cdf && k < 1000) {
				k++;
				p *= mean / k;
				cdf += p;
			}
			return k;
		}
		final double slam = Math.sqrt(mean), loglam = Math.log(mean);
		final double b = 0.931 + 2.53 * slam, a = -0.059 + 0.02483 * b;
		final double invalpha = 1.1239 + 1.1328 / (b - 3.4), vr = 0.9277 - 3.6224 / (b - 2);
		while (true) {
			final double u = rng.nextDouble() - 0.5, v = rng.nextDouble();
			final double us = 0.5 - Math.abs(u);
			final long k = (long) Math.floor((2 * a / us + b) * u + mean + 0.43);
			if (us >= 0.07 && v <= vr) return k;
			if (k < 0 || (us < 0.013 && v > us)) continue;
			if (Math.log(v) + Math.log(invalpha) - Math.log(a / (us * us) + b) <= -mean + k * loglam - logFactorial(k)) return k;
		}
	}

	/** ln k! (exact sum for small k, Stirling series otherwise). */
	static double logFactorial(final long k) {
		if (k < 16) {
			double s = 0;
			for (int i = 2; i <= k; i++) s += Math.log(i);
			return s;
		}
		final double x = k + 1;
		return (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * x) - 1 / (360 * x * x * x) + 1 / (1260 * Math.pow(x, 5));
	}
}
