package org.parfocal.deconv;

/**
 * The deconvolution algorithms. The keys are the macro values of the {@code method=} option: keep them.
 * <ul>
 * <li>{@link #RL}: Richardson–Lucy (Richardson, J. Opt. Soc. Am. 1972; Lucy, Astron. J. 1974), the
 * maximum-likelihood estimate under Poisson noise, x ← x · Hᵀ(y / (Hx + b)) / Hᵀ1;</li>
 * <li>{@link #RL_TV}: Richardson–Lucy with total-variation regularisation (Dey et al., Microsc. Res. Tech.
 * 2006), x ← x · Hᵀ(y / (Hx + b)) / (Hᵀ1 · (1 − λ div(∇x / |∇x|)));</li>
 * <li>{@link #RL_ACCELERATED}: Richardson–Lucy with first-order vector extrapolation (Biggs &amp; Andrews,
 * Appl. Opt. 1997);</li>
 * <li>{@link #WIENER}: one-shot Wiener / Tikhonov-regularised inverse filter, X = conj(Ĥ)·Ŷ / (|Ĥ|² + μ).</li>
 * </ul>
 */
public enum DeconvolutionMethod {
	RL("richardson-lucy"), RL_TV("richardson-lucy-tv"), RL_ACCELERATED("accelerated-richardson-lucy"), WIENER("wiener");

	private final String key;

	DeconvolutionMethod(final String key) { this.key = key; }

	public String key() { return key; }

	/** True for the iterative methods. */
	public boolean isIterative() { return this != WIENER; }

	public static DeconvolutionMethod parse(final String s) {
		for (final DeconvolutionMethod m : values())
			if (m.key.equalsIgnoreCase(s.trim())) return m;
		throw new IllegalArgumentException("Unknown method '" + s + "': use " + String.join(", ", keys()));
	}

	public static String[] keys() {
		final DeconvolutionMethod[] v = values();
		final String[] k = new String[v.length];
		for (int i = 0; i < v.length; i++) k[i] = v[i].key;
		return k;
	}
}
