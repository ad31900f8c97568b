package org.parfocal.deconv;

/**
 * When an iterative method stops. {@link #FIXED}: after the given number of iterations. {@link #RELATIVE_CHANGE}:
 * as soon as Σ|x_k − x_(k−1)| / Σ x_(k−1) over the object falls below the threshold, and at the latest after the
 * given number of iterations. {@link #HELD_OUT}: at the iterate where a Poisson-thinned half of the recording is
 * best predicted by the same method run on the other half ({@link HoldOutStop}), the given number of iterations
 * being the cap. The keys are macro values of the {@code stop=} option: keep them.
 */
public enum Stopping {
	FIXED("fixed"), RELATIVE_CHANGE("relative-change"), HELD_OUT("held-out");

	private final String key;

	Stopping(final String key) { this.key = key; }

	public String key() { return key; }

	public static Stopping parse(final String s) {
		for (final Stopping m : values())
			if (m.key.equalsIgnoreCase(s.trim())) return m;
		throw new IllegalArgumentException("Unknown stopping rule '" + s + "': use fixed, relative-change or held-out");
	}
}
