package org.parfocal.ij1;

import java.util.concurrent.Callable;

import ij.IJ;
import ij.ImagePlus;
import ij.Macro;
import ij.Prefs;
import ij.WindowManager;
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

	/** True while a macro (or a headless replay) drives the command. */
	static boolean isMacro() {
		return Macro.getOptions() != null;
	}

	/** Runs core work with ImageJ's thread setting (Edit > Options > Memory & Threads). */
	static <T> T withImageJThreads(final Callable<T> work) {
		return Parallelization.runWithNumThreads(Math.max(1, Prefs.getThreads()), work);
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
		} catch (final IllegalArgumentException | IllegalStateException e) {
			fail(command, e.getMessage());
			return false;
		} catch (final OutOfMemoryError e) {
			fail(command, "Out of memory: give ImageJ more (Edit > Options > Memory & Threads) or use a smaller image");
			return false;
		}
	}

	/** Reports an error as one line; aborts a running macro so the failure is seen. */
	static void fail(final String command, final String message) {
		IJ.showProgress(1.0);
		final String line = command + ": " + message;
		if (Interpreter.getInstance() != null || isMacro() || GraphicsHeadless.isHeadless()) {
			IJ.log("Error: " + line);
			System.err.println("Error: " + line);
			Interpreter.abort();
		} else IJ.error("Parfocal", line);
	}

	/** Small indirection so tests and headless runs never open dialogs. */
	static final class GraphicsHeadless {
		static boolean isHeadless() {
			return java.awt.GraphicsEnvironment.isHeadless();
		}
	}
}
