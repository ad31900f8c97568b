package org.parfocal.ij1;

import java.util.Locale;

/** Writing values the way ImageJ's macro options expect them. */
final class MacroText {

	private MacroText() {}

	/** A value with spaces goes in square brackets, as the Recorder writes it. */
	static String quote(final String s) {
		return s.indexOf(' ') >= 0 ? "[" + s + "]" : s;
	}

	/** Shortest round-tripping decimal, without a trailing ".0" for integers. */
	static String number(final double v) {
		if (v == Math.rint(v) && Math.abs(v) < 1e15) return String.format(Locale.ROOT, "%d", (long) v);
		return Double.toString(v);
	}
}
