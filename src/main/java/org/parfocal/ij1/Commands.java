package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.Supplier;

import ij.ImagePlus;
import ij.Macro;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;

import net.imglib2.parallel.Parallelization;

import org.parfocal.core.Monitor;
import org.parfocal.command.CommandKeys;

/**
 * What every Parfocal command shares: picking images by title, running the core with ImageJ's thread count,
 * reading dialogs in macros, and turning a core error into one clear line for the user ({@link CommandGuard}: an
 * error dialog interactively; in a macro the message, then the macro is aborted so a batch run fails visibly).
 */
final class Commands {

	private Commands() {}

	/** Titles of the open images, or an empty array. */
	static String[] imageTitles() {
		final int[] ids = WindowManager.getIDList();
		if (ids == null) return new String[0];
		final String[] t = new String[ids.length];
		for (int i = 0; i < ids.length; i++) t[i] = WindowManager.getImage(ids[i]).getTitle();
		return t;
	}

	/** The open image with this title. @throws IllegalArgumentException if none */
	static ImagePlus image(final String title, final String role) {
		final ImagePlus imp = WindowManager.getImage(title);
		if (imp == null) throw new IllegalArgumentException("No open image called '" + title + "' for the " + role);
		return imp;
	}

	/** Title of the current image, or the first in the list. */
	static String currentTitle(final String[] titles) {
		final ImagePlus cur = WindowManager.getCurrentImage();
		return cur != null ? cur.getTitle() : titles.length > 0 ? titles[0] : "";
	}

	/**
	 * The default image of a deconvolution dialog: the current image unless its title says PSF, else the first
	 * that does not.
	 */
	static String currentNonPsfTitle(final String[] titles) {
		final String cur = currentTitle(titles);
		if (!cur.toLowerCase(Locale.ROOT).contains("psf")) return cur;
		for (final String t : titles) if (!t.toLowerCase(Locale.ROOT).contains("psf")) return t;
		return cur;
	}

	/**
	 * In a macro, the choice the dialog returned must be the value the macro gave: without a display
	 * ij1-patcher's dialog silently falls back to the default for an unknown value, which would run the
	 * command on the wrong image. Choices shown in words ({@link ChoiceWords}) come back as their macro values.
	 */
	static String checkChoice(final String key, final String chosen, final String what) {
		final String options = Macro.getOptions();
		final String value = ChoiceWords.value(key, chosen);
		if (options == null) {
			ChoiceWords.recordValue(key, chosen, value); // the Recorder keeps the macro value, not the words shown
			return value;
		}
		final String given = Macro.getValue(options, key, null);
		if (given != null && !given.equals(chosen))
			throw new IllegalArgumentException("'" + given + "' is not a valid " + what + " (" + key + "=)");
		return value;
	}

	/**
	 * The dialog's next number. In a macro, a value that is not a number is an error naming the key, not the
	 * default (see {@link #checkChoice}).
	 */
	static double number(final GenericDialog gd, final String key) {
		final String options = Macro.getOptions();
		final String given = options == null ? null : Macro.getValue(options, key, null);
		final double v;
		try {
			v = gd.getNextNumber();
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException("'" + given + "' is not a number (" + key + "=)");
		}
		if (given != null) {
			try {
				Double.parseDouble(given.trim());
			} catch (final NumberFormatException e) {
				throw new IllegalArgumentException("'" + given + "' is not a number (" + key + "=)");
			}
		}
		return v;
	}

	/**
	 * In a macro, an old value of a choice is replaced by its current one before the dialog reads the options
	 * (a released macro value keeps working though the dialog lists the new one).
	 */
	static void acceptOldValue(final String key, final String oldValue, final String newValue) {
		final String options = Macro.getOptions();
		if (options == null) return;
		final String given = Macro.getValue(options, key, null);
		if (given == null || !given.trim().equalsIgnoreCase(oldValue)) return;
		Macro.setOptions(options.replaceFirst("(^|\\s)" + java.util.regex.Pattern.quote(key) + "=\\[?" + java.util.regex.Pattern.quote(given) + "\\]?(?=\\s|$)",
				"$1" + key + "=" + newValue));
	}

	/**
	 * A dialog default: the value remembered from the last interactive run, but in a macro always the documented
	 * default {@code d} (as ImageJ's own filters do), so a macro that omits a key gets the same result everywhere.
	 */
	static double remembered(final String prefsKey, final double d) {
		return isMacro() ? d : Prefs.get(prefsKey, d);
	}

	/** See {@link #remembered(String, double)}. */
	static boolean remembered(final String prefsKey, final boolean d) {
		return isMacro() ? d : Prefs.get(prefsKey, d);
	}

	/** See {@link #remembered(String, double)}. */
	static String remembered(final String prefsKey, final String d) {
		return isMacro() ? d : Prefs.get(prefsKey, d);
	}

	/** True while a macro (or a headless replay) drives the command. */
	static boolean isMacro() {
		return Macro.getOptions() != null;
	}

	/**
	 * Runs core work with ImageJ's thread setting (Edit > Options > Memory & Threads). Core exceptions pass
	 * through unwrapped (ImgLib2's Callable variant would wrap them).
	 */
	static <T> T withImageJThreads(final Supplier<T> work) {
		final List<T> result = new ArrayList<>(1);
		Parallelization.runWithNumThreads(Math.max(1, Prefs.getThreads()), () -> {
			result.add(work.get());
		});
		return result.get(0);
	}

	/**
	 * Runs a command body; core errors become one line for the user, cancellation clears the progress bar
	 * ({@link CommandGuard#run}). Returns true when the body completed.
	 */
	static boolean run(final String command, final Runnable body) {
		return CommandGuard.run(command, body);
	}

	/** Runs a command body after checking the macro's keys against {@code keys} (see {@link #acceptKeys}). */
	static boolean run(final String command, final CommandKeys.Command keys, final Runnable body) {
		return run(command, () -> {
			acceptKeys(keys);
			body.run();
		});
	}

	/**
	 * In a macro: an unknown key is an error naming the closest known key, a missing required key an error, and
	 * old key names are translated (as whole keys) so the dialogs read them under their new names, and choices
	 * given in the words a dialog shows become their macro values ({@link ChoiceWords}).
	 */
	static void acceptKeys(final CommandKeys.Command keys) {
		final String options = Macro.getOptions();
		if (options == null) return;
		final String checked = ChoiceWords.valuesForWords(CommandKeys.check(keys, options));
		if (!checked.equals(options)) Macro.setOptions(checked);
	}

	/** The exception to throw when the user cancelled a dialog: nothing is made and nothing recorded. */
	static Monitor.CancelledException cancelled() {
		return new Monitor.CancelledException();
	}

	/** Reports an error as one line, then aborts a running macro ({@link CommandGuard#fail}). */
	static void fail(final String command, final String message) {
		CommandGuard.fail(command, message);
	}
}
