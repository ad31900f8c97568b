package org.parfocal.testing;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.fail;

import java.awt.EventQueue;
import java.awt.GraphicsEnvironment;
import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicReference;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.api.Assumptions;
import org.parfocal.cli.HeadlessMacro;

import ij.Executer;
import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.Macro;
import ij.Menus;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.io.FileSaver;
import ij.io.Opener;
import ij.macro.Interpreter;
import ij.plugin.frame.Recorder;

/**
 * Runs ImageJ 1.x menu commands from JUnit tests the way a macro (or a user) runs them.
 *
 * <ul>
 * <li>{@link #run}: a menu command by its label with a macro options string, on a given image,
 * headless; returns the images it created (or the image it changed in place).</li>
 * <li>{@link #record}: with a display, runs the command through its real dialog with the macro
 * Recorder on, and returns the line the Recorder wrote ({@code run("Label", "key=value ...");}).
 * {@link #replay} and {@link #replayInHeadlessJvm} run such a line again.</li>
 * <li>{@link #runMacro}: macro code; a macro error becomes an {@link ImageJCommandException}.</li>
 * </ul>
 *
 * <p>The test JVM must load ij1-patcher as a Java agent before any {@code ij.*} class, with
 * {@code ij1.plugin.dirs} naming the folder of {@code plugins.config}; the pom's Surefire
 * {@code argLine} does this. ImageJ 1.x is one global state, so every call here is serialised.
 */
public final class ImageJHarness {

	/** Longest wait for one command or macro; a guard against a hidden modal dialog, not a check. */
	public static final long TIMEOUT_SECONDS = 300;

	private static final Object LOCK = new Object();
	private static final AtomicInteger THREADS = new AtomicInteger();

	private ImageJHarness() {}

	/** What a command run produced. */
	public static final class Result {

		private final ImagePlus input;
		private final List<ImagePlus> created;
		private final ImagePlus current;
		private final List<String> log;

		Result(final ImagePlus input, final List<ImagePlus> created, final ImagePlus current,
			final List<String> log)
		{
			this.input = input;
			this.created = List.copyOf(created);
			this.current = current;
			this.log = List.copyOf(log);
		}

		/** Images the command created (shown or made current), in the order ImageJ registered them. */
		public List<ImagePlus> created() {
			return created;
		}

		/** The current image when the command returned (the input if it worked in place). */
		public ImagePlus current() {
			return current;
		}

		/** IJ.log messages written during the run. */
		public List<String> log() {
			return log;
		}

		/** The single created image; fails the test if the command created none or several. */
		public ImagePlus onlyCreated() {
			if (created.size() != 1) {
				fail("expected the command to create one image, it created " + created.size() + ": " + created);
			}
			return created.get(0);
		}

		/** The last created image, or the input image if the command created none. */
		public ImagePlus output() {
			if (!created.isEmpty()) return created.get(created.size() - 1);
			return current != null ? current : input;
		}
	}

	// -- running commands --

	/**
	 * Runs a menu command as {@code run(command, options)} in a macro would, with {@code imp} as
	 * the current image (may be null for commands that need none). Runs on a thread named
	 * {@code Run$_...} so that {@link Macro#getOptions()} sees the options.
	 *
	 * @throws ImageJCommandException if the command is unknown, reports an error ({@code IJ.error}),
	 *           aborts, or throws (ImageJ only logs that; the harness fails the run)
	 */
	public static Result run(final ImagePlus imp, final String command, final String options) {
		synchronized (LOCK) {
			final HeadlessMacro.LogTap log = HeadlessMacro.LogTap.installOut();
			final int mark = log.mark();
			final Set<Integer> before = imageIds();
			final AtomicReference<ImagePlus> current = new AtomicReference<>();
			final AtomicReference<String> error = new AtomicReference<>();
			onMacroThread(() -> {
				Interpreter.batchMode = true; // show() registers new images instead of opening windows
				IJ.getErrorMessage(); // clear
				try {
					IJ.run(imp, command, options);
				}
				catch (final RuntimeException e) {
					if (!Macro.MACRO_CANCELED.equals(e.getMessage())) throw e;
					error.set("canceled");
				}
				final String message = IJ.getErrorMessage();
				if (message != null) error.set(message);
				current.set(WindowManager.getCurrentImage());
			});
			final List<String> logged = log.since(mark);
			final HeadlessMacro.LogTap.Trace trace = log.firstTraceSince(mark);
			final List<ImagePlus> created = takeNewImages(before);
			if (error.get() != null || trace != null) {
				final String why = error.get() != null ? error.get() : trace.firstLine();
				throw new ImageJCommandException("run(\"" + command + "\", \"" + options + "\") failed: "
					+ why.strip().replaceAll("\\s*\\R\\s*", " "));
			}
			final ImagePlus now = current.get();
			if (now != null && now != imp && !created.contains(now)) created.add(now);
			return new Result(imp, created, now, logged);
		}
	}

	/** Runs a recorded macro line (as returned by {@link #record}) on {@code imp}, in this JVM. */
	public static Result replay(final ImagePlus imp, final String recordedLine) {
		final String[] call = parseRunLine(recordedLine);
		return run(imp, call[0], call[1]);
	}

	/** Splits {@code run("Label", "options");} into {label, options}. */
	public static String[] parseRunLine(final String line) {
		final Matcher m = RUN_LINE.matcher(line.strip());
		if (!m.matches()) {
			throw new IllegalArgumentException("not a recorded run(\"...\", \"...\"); line: " + line);
		}
		return new String[] { unescape(m.group(1)), m.group(2) == null ? "" : unescape(m.group(2)) };
	}

	private static final Pattern RUN_LINE =
		Pattern.compile("run\\(\"((?:[^\"\\\\]|\\\\.)*)\"(?:,\\s*\"((?:[^\"\\\\]|\\\\.)*)\")?\\);");

	private static String unescape(final String s) {
		return s.replace("\\\\", "\u0000").replace("\\\"", "\"").replace("\u0000", "\\");
	}

	// -- macros --

	/** Runs macro code headless-style; returns what it logged. */
	public static HeadlessMacro.Outcome runMacro(final String macro, final String argument) {
		synchronized (LOCK) {
			final Set<Integer> before = imageIds();
			final AtomicReference<HeadlessMacro.Outcome> outcome = new AtomicReference<>();
			try {
				onMacroThread(() -> outcome.set(HeadlessMacro.run(macro, argument)));
			}
			finally {
				takeNewImages(before); // macros leave their images open; don't leak them into the next test
			}
			if (outcome.get().failed()) {
				throw new ImageJCommandException("Macro failed: " + outcome.get().errorLine());
			}
			return outcome.get();
		}
	}

	/** Runs an {@code .ijm} file; see {@link #runMacro(String, String)}. */
	public static HeadlessMacro.Outcome runMacroFile(final Path file, final String argument)
		throws IOException
	{
		return runMacro(Files.readString(file, StandardCharsets.UTF_8), argument);
	}

	// -- recording --

	/** True if this JVM can open windows (the Recorder and real dialogs need that). */
	public static boolean hasDisplay() {
		return !GraphicsEnvironment.isHeadless();
	}

	/** Skips the calling test when there is no display, saying how to get one. */
	public static void assumeDisplay() {
		Assumptions.assumeTrue(hasDisplay(), "no X display: the macro Recorder and real dialogs need one; "
			+ "run the tests under xvfb-run -a (Debian package xvfb)");
	}

	/** Changes the fields of an open GenericDialog, as a user would before pressing OK. */
	@FunctionalInterface
	public interface DialogInput {

		void fill(GenericDialog dialog);

		/** Leaves every field at its default. */
		static DialogInput defaults() {
			return dialog -> {};
		}
	}

	/**
	 * What {@link #record} saw.
	 *
	 * @param line the line the Recorder wrote, e.g. {@code run("Gaussian Blur...", "sigma=2.5");}
	 * @param result the images the recorded run created, or the image it changed in place
	 * @param text everything the Recorder wrote during the run
	 */
	public record Recording(String line, Result result, String text) {

		public Recording(final String line, final Result result) {
			this(line, result, line);
		}
	}

	/**
	 * Records a command the way a user produces a macro line: opens the macro Recorder, runs the
	 * command from a non-macro thread (as a menu click does) so that its dialog really shows, lets
	 * {@code input} fill the dialog, presses OK, and returns the line the Recorder wrote for it.
	 * {@code imp} is changed if the command works in place: pass a copy. Needs a display
	 * ({@link #assumeDisplay()}).
	 */
	public static Recording record(final ImagePlus imp, final String command, final DialogInput input) {
		return record(imp, command, input, null);
	}

	/**
	 * As {@link #record(ImagePlus, String, DialogInput)}; {@code beforeOk} (may be null) runs on the calling
	 * thread after {@code input} filled the dialog and before OK is pressed, with the dialog open (e.g. to wait
	 * for a preview).
	 */
	public static Recording record(final ImagePlus imp, final String command, final DialogInput input,
		final java.util.function.Consumer<GenericDialog> beforeOk)
	{
		if (!hasDisplay()) throw new IllegalStateException("record() needs a display; call assumeDisplay() first");
		synchronized (LOCK) {
			final Set<Integer> before = imageIds();
			Recorder recorder = Recorder.getInstance();
			final boolean ownRecorder = recorder == null;
			if (ownRecorder) recorder = new Recorder(false); // not shown; records all the same
			final int start = recorder.getText().length();
			final AtomicReference<Throwable> failure = new AtomicReference<>();
			final AtomicReference<ImagePlus> current = new AtomicReference<>();
			final HeadlessMacro.LogTap log = HeadlessMacro.LogTap.installOut();
			final int mark = log.mark();
			// A menu click runs the command on a thread named after it; no "Run$_" prefix, no options.
			final Thread menuThread = new Thread(() -> {
				try {
					Interpreter.batchMode = true;
					IJ.getErrorMessage();
					new Executer(command).run(); // records via Recorder.setCommand/saveCommand
					final String message = IJ.getErrorMessage();
					if (message != null) failure.set(new ImageJCommandException(command + ": " + message));
					current.set(WindowManager.getCurrentImage());
				}
				catch (final Throwable t) {
					failure.set(t);
				}
			}, command);
			if (imp != null) WindowManager.setTempCurrentImage(menuThread, imp);
			menuThread.start();
			List<ImagePlus> created = List.of();
			try {
				final GenericDialog dialog = awaitDialog(menuThread);
				if (dialog != null) {
					onEventThread(() -> input.fill(dialog));
					if (beforeOk != null) beforeOk.accept(dialog);
					onEventThread(() -> dialog.actionPerformed(
						new java.awt.event.ActionEvent(dialog.getButtons()[0], java.awt.event.ActionEvent.ACTION_PERFORMED, "OK")));
				}
				join(menuThread);
				created = new ArrayList<>(takeNewImages(before));
				final HeadlessMacro.LogTap.Trace trace = log.firstTraceSince(mark);
				if (failure.get() == null && trace != null) failure.set(new ImageJCommandException(trace.firstLine()));
				if (failure.get() != null) {
					throw new ImageJCommandException(command + " failed while recording: " + failure.get().getMessage(),
						failure.get());
				}
				if (dialog == null) {
					throw new ImageJCommandException(command + " showed no GenericDialog: nothing to record");
				}
				final String line = recordedLine(recorder.getText().substring(start), command);
				final ImagePlus now = current.get();
				if (now != null && now != imp && !created.contains(now)) created.add(now);
				return new Recording(line, new Result(imp, created, now, log.since(mark)), recorder.getText().substring(start));
			}
			finally {
				if (created.isEmpty()) takeNewImages(before);
				if (ownRecorder) onEventThread(recorder::close);
			}
		}
	}

	/**
	 * Runs a command as a menu click does with the Recorder open, and returns everything the Recorder wrote for
	 * it (may be empty). {@code cancel}: press the dialog's Cancel instead of OK; {@code duringRun} runs on a
	 * helper thread while the command works after OK (e.g. pressing Escape). Needs a display.
	 */
	public static String recorderTextOf(final ImagePlus imp, final String command, final DialogInput input, final boolean cancel,
		final Runnable duringRun)
	{
		if (!hasDisplay()) throw new IllegalStateException("needs a display; call assumeDisplay() first");
		synchronized (LOCK) {
			final Set<Integer> before = imageIds();
			Recorder recorder = Recorder.getInstance();
			final boolean ownRecorder = recorder == null;
			if (ownRecorder) recorder = new Recorder(false);
			final int start = recorder.getText().length();
			final Thread menuThread = new Thread(() -> {
				Interpreter.batchMode = true;
				new Executer(command).run();
			}, command);
			if (imp != null) WindowManager.setTempCurrentImage(menuThread, imp);
			menuThread.start();
			try {
				final GenericDialog dialog = awaitDialog(menuThread);
				if (dialog != null) {
					onEventThread(() -> input.fill(dialog));
					onEventThread(() -> dialog.actionPerformed(new java.awt.event.ActionEvent(dialog.getButtons()[cancel ? 1 : 0],
						java.awt.event.ActionEvent.ACTION_PERFORMED, cancel ? "Cancel" : "OK")));
				}
				Thread helper = null;
				if (duringRun != null) {
					helper = new Thread(() -> {
						while (menuThread.isAlive()) {
							duringRun.run();
							sleep(20);
						}
					});
					helper.start();
				}
				join(menuThread);
				if (helper != null) join(helper);
				return recorder.getText().substring(start);
			}
			finally {
				takeNewImages(before);
				if (ownRecorder) onEventThread(recorder::close);
			}
		}
	}

	private static String recordedLine(final String recorded, final String command) {
		final String prefix = "run(\"" + command.replace("\"", "\\\"") + "\"";
		String found = null;
		for (final String line : recorded.split("\\R")) {
			if (line.startsWith(prefix)) found = line.strip();
		}
		if (found == null) {
			fail("the Recorder wrote no run(\"" + command + "\", ...) line; it wrote: [" + recorded.strip() + "]");
		}
		return found;
	}

	/** Waits for the dialog of the command running on {@code worker}; null if it ended without one. */
	private static GenericDialog awaitDialog(final Thread worker) {
		final long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(TIMEOUT_SECONDS);
		while (System.nanoTime() < deadline) {
			final GenericDialog dialog = GenericDialog.getInstance();
			if (dialog != null && dialog.isShowing()) return dialog;
			if (!worker.isAlive()) return null;
			sleep(10);
		}
		worker.interrupt();
		throw new ImageJCommandException("no dialog appeared and the command did not end within "
			+ TIMEOUT_SECONDS + " s");
	}

	// -- headless replay in a child JVM --

	/** Exit code and output of a {@link HeadlessMacro} run in a child JVM. */
	public record HeadlessRun(int exitCode, String stdout, String stderr) {}

	/**
	 * Runs {@link HeadlessMacro} on a macro file in a fresh JVM started with the recipe of the
	 * batch entry: this JVM's ij1-patcher agent, {@code --add-opens} and {@code ij1.*} options,
	 * {@code -Djava.awt.headless=true}, and the test class path.
	 */
	public static HeadlessRun runHeadlessJvm(final Path macroFile, final String argument)
		throws IOException, InterruptedException
	{
		final List<String> cmd = new ArrayList<>();
		cmd.add(Path.of(System.getProperty("java.home"), "bin", "java").toString());
		for (final String arg : ManagementFactory.getRuntimeMXBean().getInputArguments()) {
			if (arg.startsWith("-javaagent:") || arg.startsWith("--add-opens") || arg.startsWith("-Dij1.")
				|| arg.startsWith("-Xmx"))
			{
				cmd.add(arg);
			}
		}
		cmd.add("-Djava.awt.headless=true");
		cmd.add("-cp");
		cmd.add(testClassPath());
		cmd.add(HeadlessMacro.class.getName());
		cmd.add(macroFile.toString());
		if (argument != null) cmd.add(argument);
		final Path dir = Files.createTempDirectory("parfocal-headless");
		try {
			final Path out = dir.resolve("stdout.txt");
			final Path err = dir.resolve("stderr.txt");
			final Process process = new ProcessBuilder(cmd).redirectOutput(out.toFile())
				.redirectError(err.toFile()).start();
			if (!process.waitFor(TIMEOUT_SECONDS, TimeUnit.SECONDS)) {
				process.destroyForcibly();
				fail("headless JVM did not end within " + TIMEOUT_SECONDS + " s: " + cmd);
			}
			return new HeadlessRun(process.exitValue(), Files.readString(out), Files.readString(err));
		}
		finally {
			deleteTree(dir);
		}
	}

	/**
	 * Replays a recorded line in a fresh headless JVM through {@link HeadlessMacro} (no display at
	 * all, as in batch use): saves {@code imp} as TIFF, runs {@code open(in); <line> saveAs("Tiff",
	 * out);} and returns the image that was current at the end.
	 */
	public static ImagePlus replayInHeadlessJvm(final ImagePlus imp, final String recordedLine)
		throws IOException, InterruptedException
	{
		return replayInHeadlessJvm(recordedLine, imp);
	}

	/**
	 * Like {@link #replayInHeadlessJvm(ImagePlus, String)} for commands that take several open images:
	 * each input is saved as a TIFF named by its title (so it reopens under the same title), all are
	 * opened in order, the line runs, and the image current at the end is returned.
	 */
	public static ImagePlus replayInHeadlessJvm(final String recordedLine, final ImagePlus... inputs)
		throws IOException, InterruptedException
	{
		parseRunLine(recordedLine);
		final Path dir = Files.createTempDirectory("parfocal-replay");
		try {
			final StringBuilder macro = new StringBuilder();
			for (final ImagePlus imp : inputs) {
				final Path in = dir.resolve(imp.getTitle());
				if (!new FileSaver(imp).saveAsTiff(in.toString())) fail("could not save " + in);
				macro.append("open(\"").append(in).append("\");\n");
			}
			final Path out = dir.resolve("replay-output.tif");
			macro.append(recordedLine).append("\nsaveAs(\"Tiff\", \"").append(out).append("\");\n");
			final Path file = dir.resolve("replay.ijm");
			Files.writeString(file, macro);
			final HeadlessRun run = runHeadlessJvm(file, null);
			assertEquals(0, run.exitCode(), () -> "headless replay of " + recordedLine + " failed:\n" + run.stderr()
				+ run.stdout());
			final ImagePlus result = new Opener().openImage(out.toString());
			if (result == null) fail("headless replay wrote no readable " + out + "\n" + run.stderr());
			return result;
		}
		finally {
			deleteTree(dir);
		}
	}

	/**
	 * Makes images "open" the way a macro in batch mode sees them, so commands find them by title
	 * (choices such as {@code image=} or {@code psf=}).
	 */
	public static void open(final ImagePlus... imps) {
		Interpreter.batchMode = true;
		for (final ImagePlus imp : imps) Interpreter.addBatchModeImage(imp);
	}

	/** Forgets every image opened with {@link #open} or created by a command (call it after each test). */
	public static void closeAll() {
		for (final int id : Interpreter.getBatchModeImageIDs()) {
			final ImagePlus imp = WindowManager.getImage(id);
			if (imp != null) Interpreter.removeBatchModeImage(imp);
		}
	}

	/** Menu label to class name for every command ImageJ knows, after initialising ImageJ. */
	public static java.util.Map<String, String> installedCommands() {
		synchronized (LOCK) {
			onMacroThread(HeadlessMacro::ensureInitialized);
			final java.util.Map<String, String> commands = new java.util.TreeMap<>();
			Menus.getCommands().forEach((k, v) -> commands.put(String.valueOf(k), String.valueOf(v)));
			return commands;
		}
	}

	private static String testClassPath() {
		final String surefire = System.getProperty("surefire.test.class.path");
		return surefire != null && !surefire.isEmpty() ? surefire : System.getProperty("java.class.path");
	}

	// -- pixels --

	/** Fails unless both images have the same dimensions and every value agrees within {@code tol}. */
	public static void assertSamePixels(final ImagePlus expected, final ImagePlus actual, final double tol) {
		assertEquals(Arrays.toString(expected.getDimensions()), Arrays.toString(actual.getDimensions()), "dimensions");
		final ImageStack a = expected.getStack();
		final ImageStack b = actual.getStack();
		for (int z = 1; z <= a.getSize(); z++) {
			final float[] pa = (float[]) a.getProcessor(z).convertToFloatProcessor().getPixels();
			final float[] pb = (float[]) b.getProcessor(z).convertToFloatProcessor().getPixels();
			for (int i = 0; i < pa.length; i++) {
				if (!(Math.abs(pa[i] - pb[i]) <= tol)) {
					final int w = expected.getWidth();
					fail("pixel (x=" + i % w + ", y=" + i / w + ", slice=" + z + "): expected " + pa[i] + ", got "
						+ pb[i] + " (tolerance " + tol + ")");
				}
			}
		}
	}

	// -- plumbing --

	private static void onMacroThread(final Runnable body) {
		final AtomicReference<Throwable> thrown = new AtomicReference<>();
		final Thread thread = new Thread(() -> {
			try {
				body.run();
			}
			catch (final Throwable t) {
				thrown.set(t);
			}
			finally {
				Macro.setOptions(null);
				WindowManager.setTempCurrentImage(null);
			}
		}, "Run$_parfocal-harness-" + THREADS.incrementAndGet());
		thread.start();
		join(thread);
		final Throwable t = thrown.get();
		if (t instanceof RuntimeException) throw (RuntimeException) t;
		if (t instanceof Error) throw (Error) t;
		if (t != null) throw new ImageJCommandException("unexpected " + t, t);
	}

	private static void join(final Thread thread) {
		try {
			thread.join(TimeUnit.SECONDS.toMillis(TIMEOUT_SECONDS));
		}
		catch (final InterruptedException e) {
			Thread.currentThread().interrupt();
			throw new ImageJCommandException("interrupted while waiting for " + thread.getName(), e);
		}
		if (thread.isAlive()) {
			thread.interrupt();
			throw new ImageJCommandException(thread.getName() + " did not end within " + TIMEOUT_SECONDS
				+ " s (a modal dialog waiting for input?)");
		}
	}

	private static void onEventThread(final Runnable body) {
		try {
			if (EventQueue.isDispatchThread()) body.run();
			else EventQueue.invokeAndWait(body);
		}
		catch (final InterruptedException e) {
			Thread.currentThread().interrupt();
			throw new ImageJCommandException("interrupted on the AWT event thread", e);
		}
		catch (final java.lang.reflect.InvocationTargetException e) {
			final Throwable cause = e.getCause();
			if (cause instanceof RuntimeException) throw (RuntimeException) cause;
			if (cause instanceof Error) throw (Error) cause;
			throw new ImageJCommandException("failed on the AWT event thread", cause);
		}
	}

	/** IDs of the images ImageJ knows (windows and batch-mode images). */
	private static Set<Integer> imageIds() {
		final int[] ids = WindowManager.getIDList();
		final Set<Integer> set = new LinkedHashSet<>();
		if (ids != null) for (final int id : ids) set.add(id);
		return set;
	}

	/** Unregisters (and closes windows of) the images that appeared since {@code before}; returns them. */
	private static List<ImagePlus> takeNewImages(final Set<Integer> before) {
		final List<ImagePlus> created = new ArrayList<>();
		for (final int id : imageIds()) {
			if (before.contains(id)) continue;
			final ImagePlus image = WindowManager.getImage(id);
			if (image == null) continue;
			created.add(image);
			Interpreter.removeBatchModeImage(image);
			if (image.getWindow() != null) {
				image.changes = false;
				onEventThread(() -> image.getWindow().close());
			}
		}
		return created;
	}

	private static void sleep(final long millis) {
		try {
			Thread.sleep(millis);
		}
		catch (final InterruptedException e) {
			Thread.currentThread().interrupt();
			throw new ImageJCommandException("interrupted", e);
		}
	}

	private static void deleteTree(final Path dir) throws IOException {
		try (var paths = Files.walk(dir)) {
			for (final Path p : paths.sorted((x, y) -> y.getNameCount() - x.getNameCount()).toList()) {
				Files.deleteIfExists(p);
			}
		}
	}
}
