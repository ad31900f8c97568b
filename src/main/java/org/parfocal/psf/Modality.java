package org.parfocal.psf;

/**
 * How the fluorescence is excited and collected; decides how the excitation and emission PSFs are combined.
 * <ul>
 * <li>{@link #WIDEFIELD}: the emission PSF at the emission wavelength;</li>
 * <li>{@link #CONFOCAL}: excitation PSF × (emission PSF convolved laterally with the pinhole disk);</li>
 * <li>{@link #TWO_PHOTON}: the excitation PSF squared (non-descanned detection: the emission path does not
 * shape the PSF); the excitation wavelength is the laser wavelength, about twice a one-photon one;</li>
 * <li>{@link #LIGHT_SHEET}: the detection PSF times a Gaussian sheet profile along z of the given FWHM.</li>
 * </ul>
 * The keys are the macro values of the modality option: keep them.
 */
public enum Modality {
	WIDEFIELD("widefield"), CONFOCAL("confocal"), TWO_PHOTON("two-photon"), LIGHT_SHEET("light-sheet");

	private final String key;

	Modality(final String key) { this.key = key; }

	/** Lower-case name used in dialogs, macros and provenance. */
	public String key() { return key; }

	/** True if the excitation wavelength takes part in the PSF. */
	public boolean usesExcitation() { return this == CONFOCAL || this == TWO_PHOTON; }

	/** True if the emission wavelength takes part in the PSF. */
	public boolean usesEmission() { return this != TWO_PHOTON; }

	/** Parses a dialog or macro value (case-insensitive). */
	public static Modality parse(final String s) {
		if (s != null)
			for (final Modality m : values())
				if (m.key.equalsIgnoreCase(s.trim())) return m;
		throw new IllegalArgumentException("Unknown modality '" + s + "': use widefield, confocal, two-photon or light-sheet");
	}

	/** All keys, for a dialog's choice list. */
	public static String[] keys() {
		final Modality[] v = values();
		final String[] k = new String[v.length];
		for (int i = 0; i < v.length; i++) k[i] = v[i].key;
		return k;
	}
}
