package org.parfocal.ij1;

import java.util.concurrent.atomic.AtomicReference;

/**
 * The last one-line failure a Parfocal command reported ({@code Commands.fail}), for front ends that run macros:
 * after a command aborts the macro, ImageJ's interpreter may report a consequence of the abort (inside
 * {@code for { }}: "';' expected") instead of the reason. {@code HeadlessMacro} reports this line instead.
 */
public final class CommandFailure {

	private static final AtomicReference<String> LAST = new AtomicReference<>();

	private CommandFailure() {}

	static void report(final String line) {
		LAST.set(line);
	}

	/** The last failure since the previous call, or null; clears it. */
	public static String take() {
		return LAST.getAndSet(null);
	}
}
