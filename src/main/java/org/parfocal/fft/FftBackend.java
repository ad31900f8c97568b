package org.parfocal.fft;

import java.util.Locale;

/**
 * The library that computes {@link RealFft}'s transforms. Two exist:
 * <ul>
 * <li>{@link #FFTW}: FFTW 3 (Frigo &amp; Johnson, Proc. IEEE 2005) in single precision through the JavaCPP
 * presets ({@code org.bytedeco:fftw} with the natives of the platform), used when its natives load. FFTW is
 * GPL-licensed, so it is an optional runtime dependency that the user installs (README);</li>
 * <li>{@link #JAVA}: JTransforms with Parfocal's radix-3/5 steps ({@link SplitFft}), pure Java, present in every
 * ImageJ.</li>
 * </ul>
 * <b>Selection</b>: the system property {@code parfocal.fft} ({@code auto}, the default, {@code fftw} or
 * {@code java}; read whenever a {@code RealFft} is made, so it can be changed at run time, e.g. by the options
 * command). {@code auto} takes FFTW when its natives load and JTransforms otherwise; {@code fftw} when they do
 * not load is an error with one line saying why. Both give the same transform within float rounding (tests
 * compare them to 1e-5 relative on the golden files).
 */
public enum FftBackend {

	/** JTransforms (pure Java). */
	JAVA("java"),
	/** FFTW through JavaCPP (natives). */
	FFTW("fftw");

	/** The system property that selects the backend. */
	public static final String PROPERTY = "parfocal.fft";

	private final String key;

	FftBackend(final String key) {
		this.key = key;
	}

	/** The value of {@link #PROPERTY} (and of the options key) that selects this backend. */
	public String key() { return key; }

	/** Whether this backend can run here (FFTW: its classes and natives load). */
	public boolean available() {
		return this == JAVA || Probe.ERROR == null;
	}

	/** Why this backend cannot run here, or null if it can. */
	public String unavailableReason() {
		return this == JAVA ? null : Probe.ERROR;
	}

	/**
	 * Whether FFTW loads, asked once. Its classes are only touched behind this check, so that a missing jar (the
	 * usual case in ImageJ) ends in the fallback, not in a linkage error.
	 */
	private static final class Probe {
		static final String ERROR = probe();

		private static String probe() {
			try {
				Class.forName("org.bytedeco.fftw.global.fftw3", false, FftBackend.class.getClassLoader());
				return FftwLibrary.loadError();
			} catch (final ClassNotFoundException | LinkageError e) {
				return "the FFTW jars (org.bytedeco:fftw and javacpp with the natives of this platform) are not on the class path";
			}
		}
	}

	/** Library and version, e.g. "FFTW 3.3.10 (JavaCPP presets 1.5.10), estimated plans", for provenance records. */
	public String description() {
		return this == JAVA ? "JTransforms " + version(org.jtransforms.fft.FloatFFT_1D.class, "3.1") + " (pure Java)" : Probe.ERROR == null ? FftwLibrary.description() : "FFTW (not loaded: " + Probe.ERROR + ")";
	}

	/**
	 * The backend that a {@link RealFft} made now uses, from {@link #PROPERTY}.
	 *
	 * @throws IllegalArgumentException if the property names no backend, or names FFTW and it does not load
	 */
	public static FftBackend selected() {
		final String v = System.getProperty(PROPERTY, "auto").trim().toLowerCase(Locale.ROOT);
		switch (v) {
		case "", "auto":
			return FFTW.available() ? FFTW : JAVA;
		case "java", "jtransforms":
			return JAVA;
		case "fftw":
			if (!FFTW.available())
				throw new IllegalArgumentException("FFTW was selected (" + PROPERTY + "=fftw) but cannot be used: " + FFTW.unavailableReason());
			return FFTW;
		default:
			throw new IllegalArgumentException("Unknown FFT backend '" + v + "' in " + PROPERTY + ": use auto, fftw or java");
		}
	}

	/** Seconds this process has spent planning FFTW transforms (0 on the pure-Java path): part of a first run's cost. */
	public static double planningSeconds() {
		return Probe.ERROR == null ? FftwLibrary.planningSeconds() : 0;
	}

	/** Native bytes allocated now by the FFTW backend (its work buffers, busy or idle; 0 without FFTW). */
	public static long nativeBytes() {
		return Probe.ERROR == null ? FftwLibrary.nativeBytes() : 0;
	}

	static String version(final Class<?> c, final String fallback) {
		final Package p = c.getPackage();
		final String v = p == null ? null : p.getImplementationVersion();
		return v == null ? fallback : v;
	}
}
