package org.parfocal.deconv;

import org.parfocal.fft.FastSizes;

/**
 * What the deconvolution assumes about the object beyond the edges of the recorded stack. The keys are the
 * macro values of the {@code edges=} option: keep them.
 * <ul>
 * <li>{@link #NON_CIRCULANT} (default; macro value {@code extended}, formerly {@code non-circulant}, which is
 * still accepted): the object lives on a domain larger than the image by the PSF size
 * minus one along each axis, and only the image window is compared with the data; the update is divided by
 * Hᵀ1, the sensitivity of the data to each object voxel (Bertero &amp; Boccacci, Astron. Astrophys. 2005).
 * Light from outside the field of view is accounted for, so there is no wrap-around ringing at the stack
 * edges. Voxels of the extended domain that the data hardly see (Hᵀ1 below {@value #MIN_SENSITIVITY} of its
 * maximum) are held at zero. For the Wiener filter, which has no non-circulant form, the data are extended by
 * mirroring instead.</li>
 * <li>{@link #PERIODIC}: the image is one period of a periodic object (circular convolution on the image
 * grid). Fast and exact for periodic data, rings at the edges of real stacks.</li>
 * <li>{@link #ZERO}: the object is zero outside the image and nothing is normalised: the model of
 * {@code scipy.signal.convolve(mode="same")}, used by scikit-image's {@code richardson_lucy}. Edge voxels
 * are underestimated; offered for comparison with that reference.</li>
 * </ul>
 */
public enum EdgeMode {
	NON_CIRCULANT("extended"), PERIODIC("periodic"), ZERO("zero");

	/** The first macro value of {@link #NON_CIRCULANT}, still accepted. */
	public static final String OLD_NON_CIRCULANT_KEY = "non-circulant";

	/** Fraction of the largest Hᵀ1 below which an extended-domain voxel is held at zero. */
	public static final double MIN_SENSITIVITY = 1e-3;

	private final String key;

	EdgeMode(final String key) { this.key = key; }

	public String key() { return key; }

	/**
	 * The boxes an iterative engine works on for an image of n voxels and a PSF of k voxels per axis (x, y, z):
	 * the object domain (m voxels, starting at the origin of the FFT grid), where the image window starts in
	 * it (w) and the FFT grid (p, 5-smooth sizes). Non-circulant: m = n + k − 1, w = k − 1 − ⌊(k − 1)/2⌋,
	 * p = next5smooth(m); zero: m = n, w = 0, p = next5smooth(n + k − 1); periodic: m = p = n, w = 0.
	 */
	public record Domains(int[] object, int[] window, int[] grid) {}

	/** The {@link Domains} of this edge mode. */
	public Domains domains(final int[] n, final int[] k) {
		final int[] m = new int[3], w = new int[3], p = new int[3];
		for (int d = 0; d < 3; d++) {
			switch (this) {
			case PERIODIC:
				p[d] = m[d] = n[d];
				break;
			case ZERO:
				m[d] = n[d];
				p[d] = FastSizes.next(n[d] + k[d] - 1);
				break;
			default:
				m[d] = n[d] + k[d] - 1;
				w[d] = k[d] - 1 - (k[d] - 1) / 2;
				p[d] = FastSizes.next(m[d]);
			}
		}
		return new Domains(m, w, p);
	}

	public static EdgeMode parse(final String s) {
		if (s.trim().equalsIgnoreCase(OLD_NON_CIRCULANT_KEY)) return NON_CIRCULANT;
		for (final EdgeMode m : values())
			if (m.key.equalsIgnoreCase(s.trim())) return m;
		throw new IllegalArgumentException("Unknown edge mode '" + s + "': use extended, periodic or zero");
	}

	public static String[] keys() {
		final EdgeMode[] v = values();
		final String[] k = new String[v.length];
		for (int i = 0; i < v.length; i++) k[i] = v[i].key;
		return k;
	}
}
