package org.parfocal.cli;

import java.awt.GraphicsEnvironment;
import java.io.IOException;
import java.io.OutputStream;
import java.io.PrintStream;
import java.lang.reflect.Method;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import ij.IJ;
import ij.Macro;
import ij.Menus;
import ij.macro.Interpreter;

import org.parfocal.ij1.CommandFailure;

/**
 * Batch entry: runs an ImageJ 1.x macro without a display and reports failure through the exit code.
 *
 * <pre>
 * java -javaagent:&lt;ij1-patcher jar&gt;=init --add-opens=java.base/java.lang=ALL-UNNAMED \
 *      -Djava.awt.headless=true -Dij1.plugin.dirs=&lt;folder or jar dir with plugins.config&gt; \
 *      -cp &lt;Parfocal jar + runtime deps&gt; org.parfocal.cli.HeadlessMacro macro.ijm [argument]
 * </pre>
 *
 * <p>The macro sees {@code argument} through {@code getArgument()}. Everything the macro writes with
 * {@code print()}/{@code IJ.log} goes to standard output. Exit code 0 means the macro ran to its end
 * (or called {@code exit}); 1 means it failed — a macro error, a plugin error, or {@code exit("Error: ...")} —
 * with one line {@code Macro failed: <message> (line N)}
 * on standard error; 2 means bad usage or a JVM started without the recipe above.
 *
 * <p>ImageJ's own {@code -batch} mode exits 0 when a macro fails, and a plugin exception inside a
 * macro is only logged by {@code ij.Executer}, after which the macro goes on. This entry treats both
 * as failures: macro errors are read from the interpreter (errors are not shown as dialogs), and a
 * Java stack trace written to the log during the run stops the macro and fails it.
 */
public final class HeadlessMacro {

	/** Exit code for a macro that failed. */
	public static final int EXIT_FAILED = 1;
	/** Exit code for bad usage or a JVM set up without the headless recipe. */
	public static final int EXIT_USAGE = 2;

	private HeadlessMacro() {}

	public static void main(final String[] args) {
		System.exit(runMain(args));
	}

	/** A macro that ends with {@code exit("Error: ...")} has failed; see {@link #run}. */
	public static final String EXIT_ERROR_PREFIX = "Error:";

	/** Does the work of {@link #main} and returns the exit code instead of exiting. */
	static int runMain(final String[] args) {
		if (args.length < 1 || args.length > 2 || args[0].startsWith("-")) {
			System.err.println("Usage: HeadlessMacro <macro.ijm> [argument]");
			return EXIT_USAGE;
		}
		final String setupProblem = setupProblem();
		if (setupProblem != null) {
			System.err.println(setupProblem);
			return EXIT_USAGE;
		}
		final String macro;
		try {
			macro = Files.readString(Path.of(args[0]), StandardCharsets.UTF_8);
		}
		catch (final NoSuchFileException e) {
			System.err.println("Macro file not found: " + args[0]);
			return EXIT_USAGE;
		}
		catch (final IOException e) {
			System.err.println("Cannot read macro file " + args[0] + ": " + e.getMessage());
			return EXIT_USAGE;
		}
		final Outcome outcome = run(macro, args.length > 1 ? args[1] : null);
		if (outcome.failed()) {
			System.err.println("Macro failed: " + outcome.errorLine());
			return EXIT_FAILED;
		}
		return 0;
	}

	/**
	 * Returns why this JVM cannot run macros headless, or null if it can. Checked before any ImageJ
	 * class is initialised by this entry, so the message replaces a HeadlessException later on.
	 */
	static String setupProblem() {
		if (!GraphicsEnvironment.isHeadless()) {
			return "HeadlessMacro needs -Djava.awt.headless=true (ImageJ would open windows and error dialogs)";
		}
		try {
			IJ.class.getField("_hooks");
		}
		catch (final NoSuchFieldException e) {
			return "ImageJ 1.x is not patched for headless use: start java with "
				+ "-javaagent:<ij1-patcher jar>=init --add-opens=java.base/java.lang=ALL-UNNAMED";
		}
		return null;
	}

	/**
	 * What a macro run produced.
	 *
	 * @param log every message the run wrote to the ImageJ log, in order
	 * @param errorMessage the macro error or the first Java exception line; null on success
	 * @param line the macro line of the error, 1-based; 0 if unknown or on success
	 * @param returnValue what the macro returned ({@code return} at top level), or null
	 */
	public record Outcome(List<String> log, String errorMessage, int line, String returnValue) {

		public boolean failed() {
			return errorMessage != null;
		}

		/** The one-line failure description, e.g. {@code Undefined variable (line 3)}. */
		public String errorLine() {
			if (errorMessage == null) return null;
			final String oneLine = errorMessage.strip().replaceAll("\\s*\\R\\s*", " ");
			return line > 0 ? oneLine + " (line " + line + ")" : oneLine;
		}
	}

	/**
	 * Runs macro code on the calling thread and reports its outcome; never throws for a macro error.
	 * The caller's JVM must be set up as in the class comment (or have a display).
	 */
	public static synchronized Outcome run(final String macro, final String argument) {
		ensureInitialized();
		final LogTap out = LogTap.installOut();
		final LogTap err = LogTap.installErr();
		final int mark = out.mark();
		final int errMark = err.mark();
		final Interpreter interpreter = new Interpreter();
		out.abortOnException(interpreter);
		err.swallowMacroErrors(true);
		IJ.getErrorMessage(); // clear any earlier error
		CommandFailure.take(); // and any earlier command failure
		String returned = null;
		String unexpected = null;
		boolean cancelled = false;
		try {
			returned = interpreter.run(macro, argument);
		}
		catch (final RuntimeException e) {
			// errors, aborts and exit() unwind with MACRO_CANCELED; anything else is a failure itself
			if (!Macro.MACRO_CANCELED.equals(e.getMessage())) unexpected = e.toString();
			else cancelled = true;
		}
		finally {
			out.abortOnException(null);
			err.swallowMacroErrors(false);
		}
		final List<String> log = out.since(mark);
		String error = interpreter.getErrorMessage();
		int line = 0;
		// ij1-patcher makes Interpreter.showError print "Macro Error: <message> in line N\n..." to
		// System.err instead of opening a dialog; that text is the only public place of the line.
		for (final String shown : err.since(errMark)) {
			final Matcher m = MACRO_ERROR.matcher(shown);
			if (m.find()) {
				if (error == null) error = m.group(1);
				line = Integer.parseInt(m.group(2));
				break;
			}
		}
		if (error == null) {
			final LogTap.Trace trace = out.firstTraceSince(mark);
			if (trace != null) error = trace.firstLine();
		}
		if (error == null) error = unexpected;
		// A Parfocal command (or macro function) that failed aborted the macro: its line is the reason. (The interpreter's
		// own message is then a consequence of the abort, e.g. "';' expected" inside a for loop; an abort from inside a
		// call() ends the macro without any message.)
		final String commandFailure = CommandFailure.take();
		if (commandFailure != null) error = commandFailure;
		// Convention for batch macros: exit("Error: <why>") ends the macro as a failure (a plain exit() or an
		// exit with any other message is a normal end). Without a display, exit's message is the last line.
		if (error == null && cancelled && !log.isEmpty() && log.get(log.size() - 1).startsWith(EXIT_ERROR_PREFIX))
			error = log.get(log.size() - 1).substring(EXIT_ERROR_PREFIX.length()).strip();
		return new Outcome(log, error, line, returned);
	}

	/**
	 * Builds ImageJ's command table (menus and plugins.config files) if nothing has yet. IJ.run
	 * does this on first use, but macro functions such as {@code List.setCommands} need it earlier.
	 */
	public static void ensureInitialized() {
		if (Menus.getCommands() != null) return;
		try {
			final Method init = IJ.class.getDeclaredMethod("init"); // what IJ.run calls; not public
			init.setAccessible(true);
			init.invoke(null);
		}
		catch (final ReflectiveOperationException e) {
			throw new IllegalStateException("cannot initialise ImageJ 1.x: " + e, e);
		}
	}

	private static final Pattern MACRO_ERROR =
		Pattern.compile("\\A(?:Macro Error|No Image): (.*?) in line (\\d+)\\s*$", Pattern.MULTILINE);

	/**
	 * Wraps {@code System.out} (or {@code System.err}) to see what ImageJ 1.x reports. Without an
	 * ImageJ window each {@code IJ.log} message is one {@code System.out.println(String)} call. A
	 * message holding a Java stack trace is how {@code ij.Executer} and {@code IJ.handleException}
	 * report a plugin exception: the out tap records it and can abort the running macro there, so
	 * the macro fails at that line instead of going on. The err tap sees the macro errors that
	 * ij1-patcher prints in place of ImageJ's error dialog.
	 */
	public static final class LogTap extends PrintStream {

		private static final Pattern TRACE_LINE = Pattern.compile("(?m)^\\s*at [\\w$.<>/]+\\(.*\\)\\s*$");
		private static final Pattern TRACE_HEAD =
			Pattern.compile("(?m)^([\\w$.]+(?:Exception|Error|Throwable)\\b.*)$");
		private static final Pattern CAUSE = Pattern.compile("(?m)^Caused by: (.*)$");
		private static LogTap out;
		private static LogTap err;

		/** A stack trace seen in the log; {@code firstLine}, e.g. "java.lang.Foo: message", is its root cause. */
		public record Trace(String firstLine, int messageIndex) {}

		private final boolean isErr;
		private final List<String> messages = new ArrayList<>();
		private final List<Trace> traces = new ArrayList<>();
		private volatile Interpreter abortTarget;
		private volatile boolean swallowMacroErrors;

		private LogTap(final PrintStream target, final boolean isErr) {
			super(target, true, StandardCharsets.UTF_8);
			this.isErr = isErr;
		}

		/** Installs the tap on {@code System.out} once per JVM and returns it. */
		public static synchronized LogTap installOut() {
			if (out == null || System.out != out) {
				out = new LogTap(System.out, false);
				System.setOut(out);
			}
			return out;
		}

		/** Installs the tap on {@code System.err} once per JVM and returns it. */
		public static synchronized LogTap installErr() {
			if (err == null || System.err != err) {
				err = new LogTap(System.err, true);
				System.setErr(err);
			}
			return err;
		}

		/** Position to pass to {@link #since}. */
		public synchronized int mark() {
			return messages.size();
		}

		/** Messages printed after {@code mark}. */
		public synchronized List<String> since(final int mark) {
			return new ArrayList<>(messages.subList(Math.min(mark, messages.size()), messages.size()));
		}

		/** First stack trace printed after {@code mark}, or null. */
		public synchronized Trace firstTraceSince(final int mark) {
			for (final Trace trace : traces) {
				if (trace.messageIndex() >= mark) return trace;
			}
			return null;
		}

		/** While non-null, a logged stack trace aborts this interpreter (the macro stops there). */
		public void abortOnException(final Interpreter interpreter) {
			abortTarget = interpreter;
		}

		/** While true, the err tap keeps ImageJ's multi-line macro error text off the stream. */
		public void swallowMacroErrors(final boolean swallow) {
			swallowMacroErrors = swallow;
		}

		@Override
		public void println(final String message) {
			if (message == null) {
				super.println(message);
				return;
			}
			Trace trace = null;
			synchronized (this) {
				messages.add(message);
				final Matcher head = TRACE_HEAD.matcher(message);
				if (!isErr && TRACE_LINE.matcher(message).find() && head.find()) {
					// reflection wrappers say nothing: report the root cause instead
					final Matcher cause = CAUSE.matcher(message);
					String first = head.group(1).strip();
					while (cause.find()) first = cause.group(1).strip();
					trace = new Trace(first, messages.size() - 1);
					traces.add(trace);
				}
			}
			if (isErr && swallowMacroErrors && MACRO_ERROR.matcher(message).find()) return;
			final String shown = isErr ? message : displayed(message);
			if (shown != null) super.println(shown);
			final Interpreter target = abortTarget;
			if (trace != null && target != null) {
				abortTarget = null;
				target.abort(trace.firstLine()); // reports the error at the current macro line
			}
		}

		/** Log-window commands as plain output shows them: \\Update:text prints text, others nothing. */
		private static String displayed(final String message) {
			if (message.startsWith("\\Update")) {
				final int colon = message.indexOf(':');
				return colon >= 0 ? message.substring(colon + 1) : null;
			}
			if (message.startsWith("\\")) return null;
			return message;
		}
	}
}
