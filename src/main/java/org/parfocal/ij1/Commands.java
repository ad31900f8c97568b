package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.function.Supplier;

import ij.IJ;
import ij.ImagePlus;
import ij.Macro;
import ij.Prefs;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.macro.Interpreter;

import net.imglib2.parallel.Parallelization;

import org.parfocal.core.Monitor;

/**
 * What every Parfocal command shares: picking images by title, running the core with ImageJ's thread count,
 * and turning a core error into one clear line for the user (an error dialog interactively; in a macro the
 * message, then the macro is aborted so a batch run fails visibly).
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
	 * command on the wrong image.
	 */
	static String checkChoice(final String key, final String chosen, final String what) {
		final String options = Macro.getOptions();
		if (options == null) return chosen;
		final String given = Macro.getValue(options, key, null);
		if (given != null && !given.equals(chosen))
			throw new IllegalArgumentException("'" + given + "' is not a valid " + what + " (" + key + "=)");
		return chosen;
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
	 * Runs a command body; core errors become one line for the user, cancellation clears the progress bar.
	 * Returns true when the body completed.
	 */
	static boolean run(final String command, final Runnable body) {
		try {
			body.run();
			return true;
		} catch (final Monitor.CancelledException e) {
			IJ.showProgress(1.0);
			IJ.showStatus(command + ": cancelled, nothing was created");
			return false;
		} catch (final NumberFormatException e) {
			// Thrown by ij1-patcher's headless dialog while it reads the macro options.
			final String m = String.valueOf(e.getMessage());
			final int q = m.indexOf('"');
			fail(command, (q >= 0 ? "'" + m.substring(q + 1, m.lastIndexOf('"')) + "'" : "A value") + " is not a number");
			return false;
		} catch (final IllegalArgumentException | IllegalStateException e) {
			fail(command, e.getMessage());
			return false;
		} catch (final OutOfMemoryError e) {
			fail(command, "Out of memory: give ImageJ more (Edit > Options > Memory & Threads) or use a smaller image");
			return false;
		}
	}

	/**
	 * Reports an error as one line (ImageJ's error dialog; without a display ij1-patcher prints it), then aborts
	 * a running macro so that a batch run fails visibly instead of going on without the output.
	 */
	static void fail(final String command, final String message) {
		IJ.showProgress(1.0);
		IJ.error("Parfocal", command + ": " + message);
		if (Interpreter.getInstance() != null) Interpreter.abort();
	}
}
