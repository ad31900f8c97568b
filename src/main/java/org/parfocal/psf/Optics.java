package org.parfocal.psf;

import java.util.Locale;

/**
 * Immutable description of the microscope and the sample, everything a PSF model needs. Lengths and
 * wavelengths are in micrometres (µm), indices are refractive indices (dimensionless).
 * <p>
 * Geometry (Gibson &amp; Lanni, JOSA A 8(10) 1991): the objective is designed for an immersion layer of index
 * {@code immersionIndexDesign} and thickness {@code workingDistance}, and a coverslip of index
 * {@code coverslipIndexDesign} and thickness {@code coverslipThicknessDesign}, with the emitter on the coverslip.
 * The actual layers are {@code immersionIndex}, {@code coverslipIndex}, {@code coverslipThickness}; the emitter
 * sits {@code depth} µm below the coverslip in a medium of index {@code sampleIndex}. Models without depth
 * aberration (Born &amp; Wolf, Gaussian) use only NA, {@code immersionIndex} and the wavelengths.
 * <p>
 * {@code excitationWavelength} is needed for {@link Modality#CONFOCAL} and {@link Modality#TWO_PHOTON}
 * (for two-photon it is the laser wavelength, e.g. 0.92 µm), {@code sheetThickness} (FWHM of the sheet
 * along z, µm) for {@link Modality#LIGHT_SHEET}; otherwise they may be NaN. {@code pinholeAiryUnits} is the
 * pinhole diameter in Airy units, 1 AU = 1.22·λ<sub>em</sub>/NA in the sample plane (common practice); 0
 * means an ideal closed pinhole.
 * <p>
 * Build with {@link #builder()}; every constructor call validates and throws {@link IllegalArgumentException}
 * with a one-line message.
 */
public record Optics(Modality modality, double na, double immersionIndex, double immersionIndexDesign,
		double sampleIndex, double coverslipIndex, double coverslipIndexDesign, double coverslipThickness,
		double coverslipThicknessDesign, double workingDistance, double emissionWavelength,
		double excitationWavelength, double depth, double pinholeAiryUnits, double sheetThickness) {

	public Optics {
		if (modality == null) throw new IllegalArgumentException("The modality is missing");
		if (!(na > 0) || !Double.isFinite(na)) throw new IllegalArgumentException("NA must be positive, got " + fmt(na));
		index("immersion index", immersionIndex);
		index("design immersion index", immersionIndexDesign);
		index("sample index", sampleIndex);
		index("coverslip index", coverslipIndex);
		index("design coverslip index", coverslipIndexDesign);
		if (na >= immersionIndex)
			throw new IllegalArgumentException("NA " + fmt(na) + " must be below the immersion index " + fmt(immersionIndex));
		if (na >= immersionIndexDesign)
			throw new IllegalArgumentException("NA " + fmt(na) + " must be below the design immersion index " + fmt(immersionIndexDesign));
		thickness("coverslip thickness", coverslipThickness);
		thickness("design coverslip thickness", coverslipThicknessDesign);
		thickness("working distance", workingDistance);
		thickness("depth", depth);
		if (modality.usesEmission()) wavelength("emission", emissionWavelength);
		else if (!Double.isNaN(emissionWavelength)) wavelength("emission", emissionWavelength);
		if (modality.usesExcitation()) {
			if (Double.isNaN(excitationWavelength))
				throw new IllegalArgumentException("A " + modality.key() + " PSF needs the excitation wavelength (µm)");
			wavelength("excitation", excitationWavelength);
		}
		if (modality == Modality.TWO_PHOTON && !Double.isNaN(emissionWavelength) && excitationWavelength <= emissionWavelength)
			throw new IllegalArgumentException("Two-photon excitation wavelength " + fmt(excitationWavelength)
					+ " µm is not longer than the emission " + fmt(emissionWavelength) + " µm: enter the laser wavelength (about twice a one-photon one)");
		if (modality == Modality.CONFOCAL && !(pinholeAiryUnits >= 0 && pinholeAiryUnits <= 20))
			throw new IllegalArgumentException("Pinhole must be between 0 and 20 Airy units, got " + fmt(pinholeAiryUnits));
		if (modality == Modality.LIGHT_SHEET && !(sheetThickness > 0 && sheetThickness <= 1000))
			throw new IllegalArgumentException("Light-sheet thickness (FWHM) must be between 0 and 1000 µm, got " + fmt(sheetThickness));
	}

	private static void index(final String what, final double n) {
		if (!(n >= 1 && n <= 3))
			throw new IllegalArgumentException("The " + what + " must be between 1 and 3, got " + fmt(n));
	}

	private static void thickness(final String what, final double t) {
		if (!(t >= 0 && t <= 10000))
			throw new IllegalArgumentException("The " + what + " must be between 0 and 10000 µm, got " + fmt(t));
	}

	private static void wavelength(final String what, final double l) {
		if (!(l > 0)) throw new IllegalArgumentException("The " + what + " wavelength must be positive, got " + fmt(l) + " µm");
		if (!(l >= 0.1 && l <= 5))
			throw new IllegalArgumentException("The " + what + " wavelength " + fmt(l) + " µm is implausible: give wavelengths in µm (e.g. 0.52)");
	}

	static String fmt(final double v) {
		return String.format(Locale.ROOT, "%.6g", v).replaceAll("\\.?0+(?=$|e)", "");
	}

	/** Half-angle of the aperture in the immersion medium, asin(NA/n<sub>i</sub>) (radians). */
	public double apertureAngle() { return Math.asin(na / immersionIndex); }

	/** One Airy unit: the diameter of the Airy disk 1.22·λ<sub>em</sub>/NA in the sample plane (µm). */
	public double airyUnit() { return 1.22 * emissionWavelength / na; }

	/** Pinhole radius in the sample plane (µm); 0 for a closed pinhole. */
	public double pinholeRadius() { return 0.5 * pinholeAiryUnits * airyUnit(); }

	/**
	 * Longest wavelength that shapes the PSF (µm): sets the grid extent.
	 */
	public double longestWavelength() {
		double l = modality.usesEmission() ? emissionWavelength : 0;
		if (modality.usesExcitation()) l = Math.max(l, excitationWavelength);
		return l;
	}

	public Builder toBuilder() { return new Builder(this); }

	public static Builder builder() { return new Builder(); }

	/** "NA 1.4, n_i 1.518, ..." for provenance. */
	@Override
	public String toString() {
		final StringBuilder s = new StringBuilder(modality.key()).append(", NA ").append(fmt(na)).append(", immersion ").append(fmt(immersionIndex))
				.append(" (design ").append(fmt(immersionIndexDesign)).append("), sample ").append(fmt(sampleIndex)).append(", coverslip ")
				.append(fmt(coverslipIndex)).append('/').append(fmt(coverslipThickness)).append(" µm (design ").append(fmt(coverslipIndexDesign))
				.append('/').append(fmt(coverslipThicknessDesign)).append(" µm), working distance ").append(fmt(workingDistance))
				.append(" µm, depth ").append(fmt(depth)).append(" µm");
		if (modality.usesEmission()) s.append(", emission ").append(fmt(emissionWavelength)).append(" µm");
		if (modality.usesExcitation()) s.append(", excitation ").append(fmt(excitationWavelength)).append(" µm");
		if (modality == Modality.CONFOCAL) s.append(", pinhole ").append(fmt(pinholeAiryUnits)).append(" AU");
		if (modality == Modality.LIGHT_SHEET) s.append(", sheet FWHM ").append(fmt(sheetThickness)).append(" µm");
		return s.toString();
	}

	/**
	 * Mutable helper for {@link Optics}. Defaults: widefield; immersion index 1.518; design immersion index =
	 * immersion index; sample index = immersion index; coverslip 1.522 and 170 µm, design the same; working
	 * distance 150 µm; depth 0; pinhole 1 AU; excitation and sheet thickness unset (NaN).
	 */
	public static final class Builder {
		private Modality modality = Modality.WIDEFIELD;
		private double na = Double.NaN, ni = 1.518, niDesign = Double.NaN, ns = Double.NaN, ng = 1.522, ngDesign = Double.NaN,
				tg = 170, tgDesign = Double.NaN, wd = 150, emission = Double.NaN, excitation = Double.NaN, depth = 0, pinhole = 1,
				sheet = Double.NaN;

		private Builder() {}

		private Builder(final Optics o) {
			modality = o.modality;
			na = o.na;
			ni = o.immersionIndex;
			niDesign = o.immersionIndexDesign;
			ns = o.sampleIndex;
			ng = o.coverslipIndex;
			ngDesign = o.coverslipIndexDesign;
			tg = o.coverslipThickness;
			tgDesign = o.coverslipThicknessDesign;
			wd = o.workingDistance;
			emission = o.emissionWavelength;
			excitation = o.excitationWavelength;
			depth = o.depth;
			pinhole = o.pinholeAiryUnits;
			sheet = o.sheetThickness;
		}

		public Builder modality(final Modality m) { modality = m; return this; }
		public Builder na(final double v) { na = v; return this; }
		public Builder immersionIndex(final double v) { ni = v; return this; }
		public Builder immersionIndexDesign(final double v) { niDesign = v; return this; }
		public Builder sampleIndex(final double v) { ns = v; return this; }
		public Builder coverslipIndex(final double v) { ng = v; return this; }
		public Builder coverslipIndexDesign(final double v) { ngDesign = v; return this; }
		public Builder coverslipThickness(final double v) { tg = v; return this; }
		public Builder coverslipThicknessDesign(final double v) { tgDesign = v; return this; }
		public Builder workingDistance(final double v) { wd = v; return this; }
		public Builder emissionWavelength(final double v) { emission = v; return this; }
		public Builder excitationWavelength(final double v) { excitation = v; return this; }
		public Builder depth(final double v) { depth = v; return this; }
		public Builder pinholeAiryUnits(final double v) { pinhole = v; return this; }
		public Builder sheetThickness(final double v) { sheet = v; return this; }

		/** @throws IllegalArgumentException with a one-line message if a value is missing or out of range */
		public Optics build() {
			if (Double.isNaN(na)) throw new IllegalArgumentException("The NA is missing");
			if (modality != null && modality.usesEmission() && Double.isNaN(emission))
				throw new IllegalArgumentException("The emission wavelength (µm) is missing");
			return new Optics(modality, na, ni, Double.isNaN(niDesign) ? ni : niDesign, Double.isNaN(ns) ? ni : ns, ng,
					Double.isNaN(ngDesign) ? ng : ngDesign, tg, Double.isNaN(tgDesign) ? tg : tgDesign, wd, emission, excitation, depth,
					pinhole, sheet);
		}
	}
}
