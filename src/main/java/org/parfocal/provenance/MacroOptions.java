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

	/** Parses an options string; later duplicates win. Keys are lower-cased, a flag's value is {@code "true"}. */
	public static LinkedHashMap<String, String> parse(final String options) {
		final LinkedHashMap<String, String> map = new LinkedHashMap<>();
		for (final Token t : tokens(options)) map.put(t.key().toLowerCase(Locale.ROOT), t.value() == null ? "true" : t.value());
		return map;
	}

	/**
	 * One {@code key=value}, {@code key=[value]} or flag of an options string: the key as written, the value (null
	 * for a flag), and where the key starts and the token ends in the string.
	 */
	public record Token(String key, String value, int start, int end) {}

	/** The tokens of an options string, in order (see {@link #parse}). */
	public static java.util.List<Token> tokens(final String options) {
		final java.util.List<Token> out = new java.util.ArrayList<>();
		if (options == null) return out;
		final String s = options;
		int i = 0;
		while (i < s.length()) {
			while (i < s.length() && Character.isWhitespace(s.charAt(i))) i++;
			if (i >= s.length()) break;
			int j = i;
			while (j < s.length() && s.charAt(j) != '=' && !Character.isWhitespace(s.charAt(j))) j++;
			final String key = s.substring(i, j);
			if (j < s.length() && s.charAt(j) == '=') {
				j++;
				if (j < s.length() && s.charAt(j) == '[') {
					final int close = s.indexOf(']', j);
					if (close < 0) throw new IllegalArgumentException("Unclosed '[' in macro options after " + key + "=");
					out.add(new Token(key, s.substring(j + 1, close), i, close + 1));
					i = close + 1;
				} else {
					int k = j;
					while (k < s.length() && !Character.isWhitespace(s.charAt(k))) k++;
					out.add(new Token(key, s.substring(j, k), i, k));
					i = k;
				}
			} else {
				out.add(new Token(key, null, i, j));
				i = j;
			}
		}
		return out;
	}

	/**
	 * The options with whole keys renamed ({@code old → new}): a key matches only as a whole token's key, never as
	 * the tail of another key ({@code references} does not match {@code open_references=}) nor inside a value.
	 */
	public static String renameKeys(final String options, final Map<String, String> renames) {
		final StringBuilder sb = new StringBuilder(options);
		final java.util.List<Token> ts = tokens(options);
		for (int n = ts.size() - 1; n >= 0; n--) {
			final Token t = ts.get(n);
			final String now = renames.get(t.key());
			if (now != null) sb.replace(t.start(), t.start() + t.key().length(), now);
		}
		return sb.toString();
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
