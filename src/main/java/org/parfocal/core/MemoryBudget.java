package org.parfocal.core;

import java.util.Locale;

/** Checks, before allocating, that a computation fits in the Java heap, and says how much it needs. */
public final class MemoryBudget {

	/** Collections asked for before a shortage is reported (waits of 50, 100, 200 ms between them). */
	private static final int GC_ATTEMPTS = 4;

	private MemoryBudget() {}

	/** Bytes the heap can still give: max − (total − free). */
	public static long available() {
		final Runtime rt = Runtime.getRuntime();
		return rt.maxMemory() - (rt.totalMemory() - rt.freeMemory());
	}

	/**
	 * @throws IllegalArgumentException "Not enough memory for WHAT: needs about X, the Java heap has Y free"
	 */
	public static void require(final long bytes, final String what) {
		long free = available();
		if (bytes <= free) return;
		// A collection asked for while another thread holds an array in a native (JNI critical) section — the
		// FFTW path does — is skipped or deferred, so free memory read at once still counts that garbage: a
		// Spark block task next to another failed so with 19 MB "free" in a 192 MB heap whose live data were
		// about 80 MB (class histogram). Ask again a few times before refusing.
		for (int attempt = 0; attempt < GC_ATTEMPTS && bytes > free; attempt++) {
			System.gc();
			free = available();
			if (bytes > free && attempt + 1 < GC_ATTEMPTS) {
				try {
					Thread.sleep(50L << attempt);
				} catch (final InterruptedException e) {
					Thread.currentThread().interrupt();
					break;
				}
				free = available();
			}
		}
		if (bytes > free)
			throw new IllegalArgumentException("Not enough memory for " + what + ": it needs about " + format(bytes)
					+ ", the Java heap has " + format(free) + " free (of " + format(Runtime.getRuntime().maxMemory()) + ")");
	}

	/** "1.5 GB"-style size (powers of 1024). */
	public static String format(final long bytes) {
		final String[] u = { "bytes", "KB", "MB", "GB", "TB", "PB" };
		double v = bytes;
		int i = 0;
		while (v >= 1024 && i < u.length - 1) {
			v /= 1024;
			i++;
		}
		return i == 0 ? bytes + " bytes" : String.format(Locale.ROOT, "%.1f %s", v, u[i]);
	}
}
