package org.parfocal.blind;

import org.parfocal.psf.Optics;

/**
 * Where the transfer function of a widefield PSF can be non-zero: the band limit that the blind PSF estimate
 * is projected onto. Frequencies in cycles per µm.
 * <p>
 * <b>Formula.</b> In McCutchen's description (J. Opt. Soc. Am. 54, 1964, "Generalized aperture and the
 * three-dimensional diffraction image") the amplitude transfer function of an aberration-free or aberrated
 * objective lives on a spherical cap of radius ρ = n/λ and half-angle α = asin(NA/n) (aberrations change
 * only its phase); the incoherent OTF is the autocorrelation of that cap, so its support is the set of
 * differences of two cap points. Derived here from that: the largest lateral frequency is
 * <pre>  k_c = 2·NA/λ</pre>
 * (the classical incoherent cutoff), and at lateral frequency k_r the largest axial frequency is reached with one
 * point on the rim of the cap,
 * <pre>  k_z,max(k_r) = √(ρ² − (k_r − NA/λ)²) − ρ·cos α,   0 ≤ k_r ≤ 2·NA/λ,</pre>
 * rising to ρ(1 − cos α) = n(1 − cos α)/λ at k_r = NA/λ and falling to 0 at the cutoff. Below NA/λ the true
 * support also excludes the "missing cone" around the k_z axis; that part is <i>not</i> imposed, because the
 * estimate is truncated to a box and the light of far-defocused planes that leaves the box makes the plane
 * sums vary with z (energy the missing cone would push back into the box edges). The bound used is thus
 * <pre>  |k_z| ≤ ρ(1 − cos α)       for k_r ≤ NA/λ,
 *  |k_z| ≤ k_z,max(k_r)       for NA/λ &lt; k_r ≤ 2·NA/λ,
 *  nothing                    beyond 2·NA/λ,</pre>
 * which contains the true support. n is the immersion index: the PSF's z is the stage position, and moving
 * the stage changes the immersion path (Gibson &amp; Lanni, J. Opt. Soc. Am. A 8, 1991), so the axial
 * frequencies are n<sub>i</sub>·cos θ<sub>i</sub>/λ. λ is the emission wavelength (widefield).
 */
public final class OtfSupport {

	private final double na, lambda, rho, cosAlpha;

	private OtfSupport(final double na, final double lambda, final double n) {
		this.na = na;
		this.lambda = lambda;
		this.rho = n / lambda;
		this.cosAlpha = Math.sqrt(1 - (na / n) * (na / n));
	}

	/** The widefield support for these optics (NA, immersion index, emission wavelength). */
	public static OtfSupport widefield(final Optics o) {
		if (o == null) throw new IllegalArgumentException("The band-limit constraint needs the optics (NA, immersion index, emission wavelength)");
		if (!(o.emissionWavelength() > 0))
			throw new IllegalArgumentException("The band-limit constraint needs the emission wavelength (µm)");
		return new OtfSupport(o.na(), o.emissionWavelength(), o.immersionIndex());
	}

	/** Lateral cutoff 2·NA/λ, cycles/µm. */
	public double lateralCutoff() { return 2 * na / lambda; }

	/** Largest axial frequency anywhere, n(1 − cos α)/λ, cycles/µm. */
	public double axialCutoff() { return rho * (1 - cosAlpha); }

	/** Largest |k_z| kept at lateral frequency {@code kr} (cycles/µm); negative beyond the lateral cutoff. */
	public double axialBound(final double kr) {
		final double a = na / lambda;
		if (kr > 2 * a) return -1;
		if (kr <= a) return axialCutoff();
		final double d = kr - a;
		return Math.sqrt(Math.max(0, rho * rho - d * d)) - rho * cosAlpha;
	}

	/** True if (kr, kz) lies in the kept region (a tiny tolerance keeps the boundary itself). */
	public boolean contains(final double kr, final double kz) {
		final double b = axialBound(kr * (1 - 1e-12));
		return b >= 0 && Math.abs(kz) <= b * (1 + 1e-12);
	}
}
