package org.parfocal.command;

import java.util.List;

import org.parfocal.provenance.MacroOptions;

/**
 * One macro key of a command, described once: every front end takes its label, default, range, unit and help
 * from here (the ImageJ 1.x dialog and its Help page, the Recorder line it makes, the record, the command-line
 * and cluster parsers, the SciJava inputs).
 *
 * @param name the macro key: lower case, words joined by '_'
 * @param label the dialog label. ImageJ records a field under its label's first word, lower-cased, without ':'
 *        ({@code ij.Macro.trimKey}), so the label starts with the key (a test checks it for every key)
 * @param kind the kind of value
 * @param defaultValue what a macro that leaves the key out gets, as macro text ({@code "true"}/{@code "false"} for a
 *        checkbox; {@code ""} for none, e.g. a required image)
 * @param shownValue what the dialog shows the first time (outside macros): the default, except for checkboxes
 *        that start ticked (a macro that leaves a checkbox out always gets it unticked)
 * @param min smallest accepted number (inclusive), NaN when unbounded
 * @param max largest accepted number (inclusive), NaN when unbounded
 * @param unit unit of a number ({@code ""} for none; may hold HTML entities)
 * @param help what it means, one HTML fragment
 * @param oldNames earlier names still accepted in macros (public API)
 */
public record Key(String name, String label, CommandKeys.Kind kind, String defaultValue, String shownValue, double min, double max, String unit,
		String help, List<String> oldNames) {

	public Key {
		if (!name.matches("[a-z][a-z0-9]*(_[a-z0-9]+)*")) throw new IllegalArgumentException("A key is lower case with '_' between words: '" + name + "'");
		oldNames = List.copyOf(oldNames);
		if (shownValue == null) shownValue = defaultValue;
	}

	/** The label as Help shows it: without the trailing ':'. */
	public String helpLabel() {
		return label.endsWith(":") ? label.substring(0, label.length() - 1) : label;
	}

	/** The default as a number. @throws IllegalStateException when the key is not a number */
	public double defaultNumber() {
		if (kind != CommandKeys.Kind.NUMBER) throw new IllegalStateException(name + " is not a number");
		return Double.parseDouble(defaultValue);
	}

	/** The first-shown state of a checkbox. */
	public boolean shownChecked() {
		return Boolean.parseBoolean(shownValue);
	}

	/** The first-shown number of a numeric field. */
	public double shownNumber() {
		return Double.parseDouble(shownValue);
	}

	/** Whether {@code v} lies in the range (NaN bounds are open). */
	public boolean inRange(final double v) {
		return !(v < min) && !(v > max);
	}

	/** The range in words, e.g. "1 to 10000", "0 or more", or "" when unbounded. */
	public String rangeText() {
		final boolean lo = !Double.isNaN(min), hi = !Double.isNaN(max);
		if (lo && hi) return text(min) + " to " + text(max);
		if (lo) return text(min) + " or more";
		if (hi) return text(max) + " or less";
		return "";
	}

	/** The help line as plain text (tags and entities of the HTML fragment replaced), for plain-text front ends. */
	public String plainHelp() {
		return help.replaceAll("<[^>]+>", "").replace("&micro;", "µ").replace("&amp;", "&").replace("&ndash;", "–").replace("&sigma;", "σ")
				.replace("&lambda;", "λ").replace("&middot;", "·").replace("&times;", "×").replace("&divide;", "÷").replace("&gt;", ">")
				.replace("&lt;", "<").replace("&nbsp;", " ");
	}

	private static String text(final double v) {
		return MacroOptions.number(v);
	}
}
