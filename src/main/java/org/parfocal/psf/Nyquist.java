package org.parfocal.psf;

import static org.parfocal.psf.Optics.fmt;

/**
 * Nyquist sampling for a widefield PSF: half the period of the OTF cut-off. The widefield OTF extends laterally to
 * 2·NA/λ and axially to n·(1 − cos α)/λ (α = asin(NA/n)), giving the steps λ/(4·NA) and λ/(2·n·(1 − cos α)).
 * Source: common practice in fluorescence microscopy, from memory (the support of the incoherent OTF, as in
 * Born &amp; Wolf's treatment of the 3D transfer function). Confocal and two-photon PSFs have wider OTFs; these
 * steps with the emission wavelength are then a coarse, optimistic bound.
 */
public final class Nyquist {

	private Nyquist() {}

	/** Largest lateral step λ/(4·NA), µm. */
	public static double lateral(final double lambda, final double na) {
		return lambda / (4 * na);
	}

	/** Largest axial step λ/(2·n·(1 − cos α)), α = asin(NA/n), µm. */
	public static double axial(final double lambda, final double n, final double na) {
		if (!(na < n)) throw new IllegalArgumentException("NA " + fmt(na) + " must be below the index " + fmt(n));
		return lambda / (2 * n * (1 - Math.cos(Math.asin(na / n))));
	}

	/**
	 * Null when the voxel sizes (µm) sample the PSF at least at Nyquist, else a one-line message with the numbers,
	 * using the shortest wavelength in use and the immersion index.
	 */
	public static String check(final Optics o, final double dx, final double dy, final double dz) {
		final double lambda = Math.min(o.modality().usesEmission() ? o.emissionWavelength() : Double.POSITIVE_INFINITY,
				o.modality().usesExcitation() ? o.excitationWavelength() : Double.POSITIVE_INFINITY);
		final double lat = lateral(lambda, o.na()), ax = axial(lambda, o.immersionIndex(), o.na());
		final StringBuilder s = new StringBuilder();
		if (Math.max(dx, dy) > lat)
			s.append("lateral step ").append(fmt(Math.max(dx, dy))).append(" µm is coarser than Nyquist ").append(fmt(lat)).append(" µm (λ/(4·NA))");
		if (dz > ax) {
			if (s.length() > 0) s.append("; ");
			s.append("axial step ").append(fmt(dz)).append(" µm is coarser than Nyquist ").append(fmt(ax)).append(" µm (λ/(2·n·(1−cos α)))");
		}
		return s.length() == 0 ? null : "Undersampled: " + s;
	}
}
