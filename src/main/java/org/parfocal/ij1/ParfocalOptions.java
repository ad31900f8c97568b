package org.parfocal.ij1;

import ij.IJ;
import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.command.OtherKeys;
import ij.plugin.PlugIn;

import org.parfocal.fft.FftBackend;

/**
 * {@code Plugins > Parfocal > Parfocal Options...}: settings that hold for every Parfocal command, kept in
 * ImageJ's preferences. Today one: the FFT library ({@code auto} takes FFTW when its natives are installed,
 * else the pure-Java JTransforms; {@code fftw}; {@code java}). A {@code -Dparfocal.fft=} on ImageJ's command line
 * wins over the saved choice. The library of each run is in its provenance record.
 * <p>
 * Macro keys (public API): {@code fft_library}.
 */
public class ParfocalOptions implements PlugIn {

	static final String COMMAND = "Parfocal Options";
	/** ImageJ preference key (IJ_Prefs.txt) of the FFT library. */
	static final String PREF_FFT = "parfocal.fft";
	private static final String[] CHOICES = { "auto", "fftw", "java" };
	private static boolean applied;

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.PARFOCAL_OPTIONS, () -> {
			applySaved();
			final GenericDialog gd = new GenericDialog(COMMAND);
			gd.addChoice(OtherKeys.OPTIONS.key("fft_library").label(), CHOICES, System.getProperty(FftBackend.PROPERTY, OtherKeys.OPTIONS.key("fft_library").shownValue()));
			gd.addMessage("FFTW here: " + (FftBackend.FFTW.available() ? FftBackend.FFTW.description() : "not installed (" + FftBackend.FFTW.unavailableReason() + ")"));
			gd.addHelp(DialogHelp.options().html());
			gd.showDialog();
			if (gd.wasCanceled()) throw Commands.cancelled();
			final String choice = Commands.checkChoice("fft_library", gd.getNextChoice(), "FFT library (auto, fftw or java)");
			set(choice);
			IJ.showStatus(COMMAND + ": FFT library " + FftBackend.selected().description());
		});
	}

	/** Selects the FFT library for the following runs and saves the choice. */
	static void set(final String choice) {
		// with a display, ImageJ hands a macro's choice over unchecked: refuse a word that is not one of ours
		if (!java.util.List.of(CHOICES).contains(choice))
			throw new IllegalArgumentException("'" + choice + "' is not a valid FFT library (auto, fftw or java) (fft_library=)");
		if (!"auto".equals(choice) && !FftBackend.valueOf(choice.toUpperCase(java.util.Locale.ROOT)).available())
			throw new IllegalArgumentException("FFT library " + choice + " cannot be used here: " + FftBackend.FFTW.unavailableReason());
		System.setProperty(FftBackend.PROPERTY, choice);
		Prefs.set(PREF_FFT, choice);
		applied = true;
	}

	/** Once per session: the saved choice becomes the selection, unless the command line set one. */
	static synchronized void applySaved() {
		if (applied) return;
		applied = true;
		final String saved = Prefs.get(PREF_FFT, null);
		if (saved != null && System.getProperty(FftBackend.PROPERTY) == null && java.util.List.of(CHOICES).contains(saved))
			System.setProperty(FftBackend.PROPERTY, saved);
	}
}
