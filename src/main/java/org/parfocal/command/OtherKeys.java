package org.parfocal.command;

/**
 * The keys of the small commands, each described once ({@link Key}): Export Provenance as Macro, Write Report,
 * Parfocal Options, and PSF from Optics' {@code show_profiles} (its other keys are {@link DeconvolveKeys#OPTICS}).
 */
public final class OtherKeys {

	private OtherKeys() {}

	/** PSF from Optics' own checkbox, after the optics. */
	public static final KeyTable PROFILES = KeyTable.of("PSF from Optics")
			.flag("show_profiles", "Show_profiles and FWHM table", true, "also show a plot of the lateral and axial profiles and a table of FWHM")
			.build();

	/** Export Provenance as Macro (the dialog starts at a file beside the image). */
	public static final KeyTable EXPORT = KeyTable.of("Export Provenance as Macro")
			.text("macro", "Macro:", "", "file", "the .ijm file to write")
			.flag("replace", "Replace an existing file", false, "overwrite a file of that name (otherwise it is refused)")
			.build();

	/** Write Report (the dialog starts at a file beside the image). */
	public static final KeyTable REPORT = KeyTable.of("Write Report")
			.text("file", "File:", "", "file", "the .html file to write (default: beside the image)")
			.flag("replace", "Replace an existing report", false, "overwrite a file of that name (otherwise it is refused)")
			.build();

	/** Parfocal Options (the dialog starts at the library in use). */
	public static final KeyTable OPTIONS = KeyTable.of("Parfocal Options")
			.word("fft_library", "FFT_library:", "auto", "<code>auto</code> (FFTW when installed, else JTransforms), <code>fftw</code> or "
					+ "<code>java</code> (JTransforms, pure Java); the results agree within rounding")
			.build();
}
