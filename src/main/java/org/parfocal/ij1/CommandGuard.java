package org.parfocal.ij1;

import java.util.Locale;

import ij.IJ;
import ij.Macro;
import ij.macro.Interpreter;
import ij.plugin.frame.Recorder;

import org.parfocal.core.Monitor;

/**
 * The error path of every command ({@link Commands#run}): a core error becomes one clear line for the user (an
 * error dialog interactively; in a macro the message, then the macro is aborted so a batch run fails visibly),
 * a cancelled run records nothing, and an unexpected error is one line with its stack trace in a file.
 */
final class CommandGuard {

	private CommandGuard() {}

	/**
	 * Runs a command body; core errors become one line for the user, cancellation clears the progress bar.
	 * Returns true when the body completed.
	 */
	static boolean run(final String command, final Runnable body) {
		try {
			ParfocalOptions.applySaved();
			body.run();
			return true;
		} catch (final Monitor.CancelledException e) {
			// A cancelled run (Cancel in a dialog, Esc during the run) made nothing: the Recorder must not record it.
			Recorder.disableCommandRecording();
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
		} catch (final StackOverflowError e) {
			fail(command, "An input is nested too deeply to read (stack overflow)" + details(e));
			return false;
		} catch (final RuntimeException | Error e) {
			if (Macro.MACRO_CANCELED.equals(e.getMessage())) throw e; // the macro is being aborted: let it unwind
			if (java.awt.GraphicsEnvironment.isHeadless() && (e instanceof java.awt.HeadlessException
					|| String.valueOf(e.getMessage()).toLowerCase(Locale.ROOT).contains("headless"))) {
				fail(command, "Without a display this command needs its options, e.g. run(\"" + command + "...\", \"image=... \") (see README)");
				return false;
			}
			// The safety net: an unexpected error is one line; the details go to a file, never to the user's screen.
			fail(command, "Unexpected " + e.getClass().getSimpleName() + where(e) + details(e));
			return false;
		}
	}

	/** " at Class.method:line" of the first Parfocal frame (else the first frame), or "". */
	private static String where(final Throwable e) {
		StackTraceElement first = null;
		for (final StackTraceElement f : e.getStackTrace()) {
			if (first == null) first = f;
			if (f.getClassName().startsWith("org.parfocal.")) {
				first = f;
				break;
			}
		}
		return first == null ? "" : " at " + first.getClassName().substring(first.getClassName().lastIndexOf('.') + 1) + "." + first.getMethodName()
				+ ":" + first.getLineNumber();
	}

	/** Writes the stack trace to a new file in the temporary folder and returns "; details in FILE" (or "" if that fails). */
	private static String details(final Throwable e) {
		try {
			final java.nio.file.Path f = java.nio.file.Files.createTempFile("parfocal-error-", ".txt");
			final java.io.StringWriter w = new java.io.StringWriter();
			e.printStackTrace(new java.io.PrintWriter(w));
			java.nio.file.Files.writeString(f, w.toString(), java.nio.charset.StandardCharsets.UTF_8);
			return "; details in " + f;
		} catch (final java.io.IOException | RuntimeException io) {
			return "";
		}
	}

	/**
	 * Reports an error as one line (ImageJ's error dialog; without a display ij1-patcher prints it), then aborts
	 * a running macro so that a batch run fails visibly instead of going on without the output.
	 */
	static void fail(final String command, final String message) {
		IJ.showProgress(1.0);
		CommandFailure.report(command + ": " + message);
		IJ.error("Parfocal", command + ": " + message);
		if (Interpreter.getInstance() != null) Interpreter.abort();
	}
}
