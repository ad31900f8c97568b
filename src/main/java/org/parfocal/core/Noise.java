package org.parfocal.core;

import org.apache.commons.math3.random.RandomDataGenerator;
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
			final RandomDataGenerator rng = new RandomDataGenerator(new Well19937c(new int[] { (int) seed, (int) (seed >>> 32), z }));
			for (int i = z * plane, e = i + plane; i < e; i++) {
				final double mean = in[i] * scale;
				o[i] = mean > 0 ? (float) (rng.nextPoisson(mean) / scale) : 0f;
			}
		});
		return out;
	}
}
