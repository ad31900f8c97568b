package org.parfocal.command;

import java.util.Map;

/**
 * What one {@code PSF from Optics...} run is asked to do: the optics ({@link OpticsRequest}, keys
 * {@link DeconvolveKeys#OPTICS}) and the command's own {@code show_profiles} ({@link OtherKeys#PROFILES}). The one
 * reader of those keys for the dialog (in and outside macros), the record's replay and any other front end; the
 * same dialog without {@code show_profiles} gives Deconvolve's and Blind Deconvolve's optics. No {@code ij.*}, no AWT.
 *
 * @param optics the model, optics, voxel sizes and grid sizes (validated by {@link OpticsRequest})
 * @param showProfiles also show the profile plot and the FWHM table
 */
public record PsfFromOpticsRequest(OpticsRequest optics, boolean showProfiles) {

	/** PSF from Optics' keys in dialog order: the optics, then {@code show_profiles}. */
	public static final KeyTable KEYS = KeyTable.of("PSF from Optics").all(DeconvolveKeys.OPTICS).all(OtherKeys.PROFILES).build();

	public PsfFromOpticsRequest {
		if (optics == null) throw new IllegalArgumentException("No optics given");
	}

	/**
	 * Reads the options (keys checked and old names translated by {@link CommandKeys#check}, or known to be the
	 * command's); keys not given take the tables' defaults.
	 *
	 * @throws IllegalArgumentException one line naming the key
	 */
	public static PsfFromOpticsRequest from(final Map<String, String> options) {
		final KeyTable.Values v = KEYS.read(options);
		return new PsfFromOpticsRequest(OpticsRequest.from(v), v.flag("show_profiles"));
	}

	/** The options string a macro passes to {@code run("PSF from Optics...", ...)} (the record's options). */
	public String macroOptions() {
		return optics.macroOptions() + (showProfiles ? " show_profiles" : "");
	}
}
