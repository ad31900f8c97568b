package org.parfocal.fft;

/**
 * Transform lengths that JTransforms handles with its fast mixed-radix path. Its 1D plans factor a length
 * into 4, 2, 3 and 5 and fall back to Bluestein's algorithm (about 3–4× slower) otherwise, so the fast
 * sizes are the 5-smooth numbers (2^a·3^b·5^c).
 */
public final class FastSizes {

	private FastSizes() {}

	/** Smallest 5-smooth number ≥ n (n ≥ 1). */
	public static int next(final int n) {
		if (n < 1) throw new IllegalArgumentException("Size must be at least 1, got " + n);
		for (long m = n;; m++)
			if (isFast(m)) {
				if (m > Integer.MAX_VALUE) throw new IllegalArgumentException("No transform size for " + n);
				return (int) m;
			}
	}

	/** True if n has no prime factor above 5. */
	public static boolean isFast(long n) {
		if (n < 1) return false;
		for (final int p : new int[] { 2, 3, 5 })
			while (n % p == 0) n /= p;
		return n == 1;
	}
}
