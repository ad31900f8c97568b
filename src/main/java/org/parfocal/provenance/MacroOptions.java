package org.parfocal.provenance;

import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

/**
 * ImageJ macro options strings ({@code "key=value key=[value with spaces] flag"}) as ordered maps and back.
 * A flag (a checked checkbox) maps to "true". This follows ImageJ 1.x's own reading of options (keys are
 * the first word of a dialog label, lower case; brackets quote values with spaces), written here so the
 * core, the batch tools and the provenance can read options without ImageJ.
 */
public final class MacroOptions {

	private MacroOptions() {}

	/** Parses an options string; later duplicates win. */
	public static LinkedHashMap<String, String> parse(final String options) {
		final LinkedHashMap<String, String> map = new LinkedHashMap<>();
		if (options == null) return map;
		final String s = options.trim();
		int i = 0;
		while (i < s.length()) {
			while (i < s.length() && Character.isWhitespace(s.charAt(i))) i++;
			if (i >= s.length()) break;
			int j = i;
			while (j < s.length() && s.charAt(j) != '=' && !Character.isWhitespace(s.charAt(j))) j++;
			final String key = s.substring(i, j).toLowerCase(Locale.ROOT);
			if (j < s.length() && s.charAt(j) == '=') {
				j++;
				if (j < s.length() && s.charAt(j) == '[') {
					final int close = s.indexOf(']', j);
					if (close < 0) throw new IllegalArgumentException("Unclosed '[' in macro options after " + key + "=");
					map.put(key, s.substring(j + 1, close));
					i = close + 1;
				} else {
					int k = j;
					while (k < s.length() && !Character.isWhitespace(s.charAt(k))) k++;
					map.put(key, s.substring(j, k));
					i = k;
				}
			} else {
				map.put(key, "true");
				i = j;
			}
		}
		return map;
	}

	/** Writes a map back as an options string ("true" values become flags, spaces are bracketed). */
	public static String format(final Map<String, String> options) {
		final StringBuilder sb = new StringBuilder();
		for (final Map.Entry<String, String> e : options.entrySet()) {
			if ("false".equals(e.getValue())) continue;
			if (sb.length() > 0) sb.append(' ');
			if ("true".equals(e.getValue())) sb.append(e.getKey());
			else sb.append(e.getKey()).append('=').append(quote(e.getValue()));
		}
		return sb.toString();
	}

	/** A value with spaces goes in square brackets, as ImageJ's Recorder writes it. */
	public static String quote(final String v) {
		return v.indexOf(' ') >= 0 || v.isEmpty() ? "[" + v + "]" : v;
	}

	/** Shortest text for a number: integers without ".0". */
	public static String number(final double v) {
		if (v == Math.rint(v) && Math.abs(v) < 1e15) return Long.toString((long) v);
		return Double.toString(v);
	}
}
