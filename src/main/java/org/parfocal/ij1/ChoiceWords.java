package org.parfocal.ij1;

import java.awt.Choice;
import java.awt.GraphicsEnvironment;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Vector;

import ij.gui.GenericDialog;
import ij.plugin.frame.Recorder;

import org.parfocal.provenance.MacroOptions;

/**
 * Choices shown in words, recorded as their macro values. A dialog adds its choices with the macro values (as
 * the headless dialog and macros need them), then {@link #show} replaces the items of the on-screen
 * {@link Choice}s by words. Reading goes through {@link Commands#checkChoice}, which maps a word back to its
 * value ({@link #value}) and, while the macro Recorder is on, rewrites the option the dialog has just recorded
 * ({@code method=[Richardson-Lucy + total variation]}) into the macro value ({@code method=richardson-lucy-tv}),
 * so recorded macros keep the released values. Macros may give either the value or the words.
 */
final class ChoiceWords {

	private ChoiceWords() {}

	/** Macro key → (macro value → words), in list order. Keys shared by commands mean the same there. */
	private static final Map<String, Map<String, String>> WORDS = new LinkedHashMap<>();
	static {
		words("method", "richardson-lucy", "Richardson-Lucy", "richardson-lucy-tv", "Richardson-Lucy + total variation",
				"accelerated-richardson-lucy", "Richardson-Lucy, accelerated", "wiener", "Wiener filter (one step)");
		words("stop", "fixed", "after all the iterations", "relative-change", "when the change per iteration < threshold",
				"held-out", "where the result best matches held-out photons");
		words("edges", "extended", "object extends past the stack", "periodic", "stack repeats itself (fast)", "zero",
				"nothing outside (for comparisons)");
		words("psf", Deconvolve.FROM_OPTICS, "compute from the optics (next dialog)", BlindDeconvolve.GAUSSIAN, "Gaussian of the widths below");
		// PSF models found through SciJava that are not listed here are shown by their key
		words("model", "gaussian", "Gaussian approximation", "born-wolf", "Born & Wolf (in focus, matched sample)", "gibson-lanni",
				"Gibson & Lanni (aberrations with depth)", "richards-wolf", "Richards & Wolf (vectorial, high NA)");
		words("modality", "widefield", "widefield", "confocal", "confocal (pinhole)", "two-photon", "two-photon (excitation only)", "light-sheet",
				"light sheet (sheet thickness)");
		words("output", OutputDepth.FLOAT.key(), OutputDepth.FLOAT.words(), OutputDepth.SCALED_16.key(), OutputDepth.SCALED_16.words());
		// Blind Deconvolve
		words("estimate", BlindDeconvolve.FREE_FORM, "free-form (voxel by voxel from the start)", BlindDeconvolve.MODEL_FIT,
				"fit the model of the start", BlindDeconvolve.MODEL_FIT_REFINED, "fit the model of the start, then refine",
				BlindDeconvolve.WIDEFIELD_FIT, "fit a widefield shape (Gaussian start)", BlindDeconvolve.WIDEFIELD_FIT_REFINED,
				"fit a widefield shape, then refine");
		words("support_units", BlindDeconvolve.VOXELS, "voxels (odd sizes)", BlindDeconvolve.MICRONS, "µm");
		// PSF from Beads ("background" is a choice only there; elsewhere a level typed in, whose values have no words)
		words("background", org.parfocal.beads.BackgroundMode.BORDER.key(), "per bead, from its box border", org.parfocal.beads.BackgroundMode.STACK.key(),
				"one level for the whole stack");
		words("averaging", org.parfocal.beads.Averaging.MEAN.key(), "mean of the aligned beads", org.parfocal.beads.Averaging.MEDIAN.key(),
				"median of the aligned beads");
		WORDS.put("optics", WORDS.get("model")); // the models to compare with; "none" stays "none"
	}

	private static void words(final String key, final String... valueWords) {
		final Map<String, String> m = new LinkedHashMap<>();
		for (int i = 0; i < valueWords.length; i += 2) m.put(valueWords[i], valueWords[i + 1]);
		WORDS.put(key, m);
	}

	/** The words shown for a macro value (the value itself when it has none). */
	static String word(final String key, final String value) {
		final Map<String, String> m = WORDS.get(key);
		return m == null ? value : m.getOrDefault(value, value);
	}

	/**
	 * The macro value of a choice: a value is returned as is (case-insensitively matched), words become their
	 * value; anything else is returned unchanged, for the caller's own message.
	 */
	static String value(final String key, final String chosen) {
		final Map<String, String> m = WORDS.get(key);
		if (m == null || chosen == null) return chosen;
		final String t = chosen.trim();
		for (final Map.Entry<String, String> e : m.entrySet()) {
			if (e.getKey().equalsIgnoreCase(t)) return e.getKey();
			if (e.getValue().equalsIgnoreCase(t)) return e.getKey();
		}
		return chosen;
	}

	/**
	 * In a macro, choices given in words are replaced by their macro values before a dialog reads the options
	 * (without a display ij1-patcher's dialog only knows the values it was given).
	 */
	static String valuesForWords(final String options) {
		if (options == null) return null;
		final List<MacroOptions.Token> tokens;
		try {
			tokens = MacroOptions.tokens(options);
		} catch (final IllegalArgumentException e) {
			return options;
		}
		final StringBuilder sb = new StringBuilder(options);
		for (int i = tokens.size() - 1; i >= 0; i--) {
			final MacroOptions.Token t = tokens.get(i);
			if (t.value() == null || !WORDS.containsKey(t.key().toLowerCase(Locale.ROOT))) continue;
			final String v = value(t.key().toLowerCase(Locale.ROOT), t.value());
			if (!v.equals(t.value()) && WORDS.get(t.key().toLowerCase(Locale.ROOT)).containsKey(v))
				sb.replace(t.start(), t.end(), t.key() + "=" + MacroOptions.quote(v));
		}
		return sb.toString();
	}

	/**
	 * Shows the dialog's choices in words: {@code keys} are the macro keys of the dialog's choices in the order
	 * they were added. Items with words are replaced, the selection kept. Does nothing without a display (the
	 * headless dialog has no components) or in a macro (the dialog is not shown).
	 */
	static void show(final GenericDialog gd, final String... keys) {
		if (GraphicsEnvironment.isHeadless() || Commands.isMacro()) return;
		final Vector<?> choices = gd.getChoices();
		if (choices == null) return;
		for (int i = 0; i < Math.min(keys.length, choices.size()); i++) {
			final Map<String, String> m = WORDS.get(keys[i]);
			if (m == null || !(choices.get(i) instanceof Choice c)) continue;
			final String selected = c.getSelectedItem();
			final List<String> items = new java.util.ArrayList<>();
			for (int k = 0; k < c.getItemCount(); k++) items.add(c.getItem(k));
			c.removeAll();
			for (final String it : items) c.add(m.getOrDefault(it, it));
			if (selected != null) c.select(m.getOrDefault(selected, selected));
		}
	}

	/**
	 * While the Recorder is on (an interactive run), replaces the last recorded {@code key=words} by
	 * {@code key=value}. ImageJ's Recorder keeps the options of the running command as one string; it is
	 * rebuilt option by option with {@link Recorder#recordOption}, which is how the dialog wrote it.
	 */
	static void recordValue(final String key, final String shown, final String value) {
		if (shown == null || shown.equals(value)) return;
		rerecord(key, shown, value);
	}

	/**
	 * While the Recorder is on, removes the last recorded option {@code key} (a default left out of the line, so
	 * that it reads as lines recorded before the key existed).
	 */
	static void forgetRecorded(final String key) {
		rerecord(key, null, null);
	}

	/** Rebuilds the Recorder's options with the last {@code key} (whose value is {@code shown}, or any when null) set to {@code value}, or removed when null. */
	private static void rerecord(final String key, final String shown, final String value) {
		if (!Recorder.record || Commands.isMacro()) return;
		final String options = Recorder.getCommandOptions();
		if (options == null) return;
		final List<MacroOptions.Token> tokens;
		try {
			tokens = MacroOptions.tokens(options);
		} catch (final IllegalArgumentException e) {
			return; // not ours to repair
		}
		int last = -1;
		for (int i = 0; i < tokens.size(); i++)
			if (tokens.get(i).key().equalsIgnoreCase(key) && (shown == null || shown.equals(tokens.get(i).value()))) last = i;
		if (last < 0) return;
		Recorder.resetCommandOptions();
		for (int i = 0; i < tokens.size(); i++) {
			final MacroOptions.Token t = tokens.get(i);
			if (i == last && value == null) continue;
			final String v = i == last ? value : t.value();
			if (v == null) Recorder.recordOption(t.key());
			else Recorder.recordOption(t.key(), v.isEmpty() ? "[]" : v);
		}
	}

	/** Lower-case check used by tests and Help: every word list is unique per key. */
	static Map<String, String> of(final String key) {
		final Map<String, String> m = WORDS.get(key.toLowerCase(Locale.ROOT));
		return m == null ? Map.of() : java.util.Collections.unmodifiableMap(m);
	}
}
