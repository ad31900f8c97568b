package org.parfocal.command;

import java.util.ArrayList;

import org.parfocal.provenance.MacroOptions;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;
import java.util.Set;
import java.util.regex.Pattern;

/**
 * The macro keys of every Parfocal command in one place: every key any of its dialogs can read (second dialogs
 * included), the kind of value each takes, the keys a macro must give, and old names still accepted. The
 * commands check macro options against it (an unknown key is an error naming the closest known key), old names
 * are translated through it, and {@link MacroExport} validates a record's options against it before writing
 * them into a macro.
 * <p>
 * Rule (tested over every command): no key ends another key of the same command after an underscore, because
 * ImageJ's {@code Macro.getValue} finds {@code references=} inside {@code open_references=}.
 */
public final class CommandKeys {

	/** What a key's value is. */
	public enum Kind {
		/** a decimal number */
		NUMBER,
		/** a checkbox: present (true) or absent */
		FLAG,
		/** a choice's value: letters, digits, '.', '_', '-', '+' */
		WORD,
		/** free text: an image title, a file or folder, a pattern, "auto" or a number */
		TEXT
	}

	/** One command: its menu label without "...", its keys by kind (dialog order), required keys, old names → new. */
	public record Command(String label, Map<String, Kind> keys, Set<String> required, Map<String, String> oldNames) {

		/** Every key, with old names. */
		public Set<String> accepted() {
			final Set<String> s = new LinkedHashSet<>(keys.keySet());
			s.addAll(oldNames.keySet());
			return s;
		}

		/** The kind of a key's value (old names count as their new key), if known. */
		public Optional<Kind> kind(final String key) {
			return Optional.ofNullable(keys.get(oldNames.getOrDefault(key, key)));
		}
	}

	private static final Map<String, Command> COMMANDS = new LinkedHashMap<>();

	/** Keys of {@code PSF from Optics...} without {@code show_profiles}: also the second dialog of the deconvolution commands ({@link DeconvolveKeys#OPTICS}). */
	public static final List<String> OPTICS = DeconvolveKeys.OPTICS.specs();
	/** The watch-mode dialog of Deconvolve and Blind Deconvolve ({@link DeconvolveKeys#WATCH}). */
	public static final List<String> WATCH = DeconvolveKeys.WATCH.specs();

	/** Convolve with PSF ({@link ConvolveKeys}). */
	public static final Command CONVOLVE = define("Convolve with PSF", List.of("image", "psf"), Map.of(), ConvolveKeys.MAIN.specs());
	public static final Command PSF_FROM_OPTICS = define("PSF from Optics", List.of(), Map.of(), OPTICS, OtherKeys.PROFILES.specs());
	/** PSF from Beads ({@link BeadsKeys}). */
	public static final Command PSF_FROM_BEADS = define("PSF from Beads", List.of("image"), Map.of(), BeadsKeys.MAIN.specs());
	/** Deconvolve: its main dialog, then the optics and the watch ({@link DeconvolveKeys}, where each key is described). */
	public static final Command DECONVOLVE = define("Deconvolve", List.of("image", "psf"), DeconvolveKeys.WATCH.oldNames(), DeconvolveKeys.MAIN.specs(),
			OPTICS, WATCH);
	/** Blind Deconvolve: its main dialog, then the optics (or the band limit's three of them) and the watch ({@link BlindKeys}). */
	public static final Command BLIND_DECONVOLVE = define("Blind Deconvolve", List.of("image", "psf"), DeconvolveKeys.WATCH.oldNames(), BlindKeys.MAIN.specs(),
			OPTICS, BlindKeys.BAND.specs(), WATCH);
	/** Compare with Sharp References ({@link CompareKeys}). */
	public static final Command COMPARE = define("Compare with Sharp References", List.of("result"), CompareKeys.MAIN.oldNames(), CompareKeys.MAIN.specs());
	public static final Command EXPORT_MACRO = define("Export Provenance as Macro", List.of(), Map.of(), OtherKeys.EXPORT.specs());
	public static final Command WRITE_REPORT = define("Write Report", List.of(), Map.of(), OtherKeys.REPORT.specs());
	public static final Command PARFOCAL_OPTIONS = define("Parfocal Options", List.of(), Map.of(), OtherKeys.OPTIONS.specs());

	private CommandKeys() {}

	@SafeVarargs
	private static Command define(final String label, final List<String> required, final Map<String, String> oldNames, final List<String>... groups) {
		final Map<String, Kind> keys = new LinkedHashMap<>();
		for (final List<String> g : groups)
			for (final String spec : g) {
				final int c = spec.indexOf(':');
				final Kind kind = switch (spec.charAt(c + 1)) {
				case 'N' -> Kind.NUMBER;
				case 'F' -> Kind.FLAG;
				case 'W' -> Kind.WORD;
				default -> Kind.TEXT;
				};
				keys.putIfAbsent(spec.substring(0, c), kind);
			}
		final Command cmd = new Command(label, java.util.Collections.unmodifiableMap(keys), Set.copyOf(required), Map.copyOf(oldNames));
		COMMANDS.put(label, cmd);
		return cmd;
	}

	/** Every command with keys. */
	public static List<Command> all() {
		return List.copyOf(COMMANDS.values());
	}

	/** The command with this menu label (with or without "..."), if it is one of ours. */
	public static Optional<Command> of(final String label) {
		if (label == null) return Optional.empty();
		return Optional.ofNullable(COMMANDS.get(label.endsWith("...") ? label.substring(0, label.length() - 3) : label));
	}

	/**
	 * Checks the keys of a macro's options: an unknown key is an error naming the closest known key, a missing
	 * required key an error. Returns the options with old key names replaced by the new ones (an old name counts
	 * only as a whole key, never as the tail of another).
	 *
	 * @throws IllegalArgumentException one line for the user
	 */
	public static String check(final Command cmd, final String options) {
		final List<MacroOptions.Token> tokens = MacroOptions.tokens(options);
		final Set<String> given = new LinkedHashSet<>();
		final Map<String, String> renames = new LinkedHashMap<>();
		for (final MacroOptions.Token t : tokens) {
			final String key = t.key().toLowerCase(Locale.ROOT);
			if (cmd.oldNames().containsKey(key)) {
				final String now = cmd.oldNames().get(key);
				renames.put(t.key(), now);
				given.add(now);
			} else {
				requireKnown(cmd, t.key());
				given.add(key);
			}
		}
		for (final String r : cmd.required())
			if (!given.contains(r)) throw new IllegalArgumentException("A macro must give " + r + "= (the " + r + " is not guessed in a macro)");
		if (renames.isEmpty()) return options;
		for (final String now : renames.values())
			if (tokens.stream().anyMatch(t -> t.key().equalsIgnoreCase(now)))
				throw new IllegalArgumentException("Give " + now + "= only once (an old name of it is given too)");
		return MacroOptions.renameKeys(options, renames);
	}

	/**
	 * @throws IllegalArgumentException "Unknown key 'k' — did you mean 'x'?" (or the known keys) when {@code key}
	 *         is neither a key of {@code cmd} nor an old name of one
	 */
	public static void requireKnown(final Command cmd, final String key) {
		final String k = key.toLowerCase(Locale.ROOT);
		if (cmd.keys().containsKey(k) || cmd.oldNames().containsKey(k)) return;
		final String near = closest(k, cmd.accepted());
		throw new IllegalArgumentException("Unknown key '" + key + "'" + (near == null ? "" : " — did you mean '" + near + "'?")
				+ (near == null ? " (known keys: " + String.join(" ", cmd.keys().keySet()) + ")" : ""));
	}

	/** The accepted key nearest to {@code key} by edit distance (at most a third of its length, at least 2), or null. */
	static String closest(final String key, final Set<String> accepted) {
		String best = null;
		int bestD = Integer.MAX_VALUE;
		for (final String k : accepted) {
			final int d = distance(key, k);
			if (d < bestD) {
				bestD = d;
				best = k;
			}
		}
		return bestD <= Math.max(2, key.length() / 3) ? best : null;
	}

	/** Damerau–Levenshtein (optimal string alignment) distance: insertions, deletions, substitutions, adjacent swaps. */
	static int distance(final String a, final String b) {
		final int[][] d = new int[a.length() + 1][b.length() + 1];
		for (int i = 0; i <= a.length(); i++) d[i][0] = i;
		for (int j = 0; j <= b.length(); j++) d[0][j] = j;
		for (int i = 1; i <= a.length(); i++)
			for (int j = 1; j <= b.length(); j++) {
				final int cost = a.charAt(i - 1) == b.charAt(j - 1) ? 0 : 1;
				d[i][j] = Math.min(Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1), d[i - 1][j - 1] + cost);
				if (i > 1 && j > 1 && a.charAt(i - 1) == b.charAt(j - 2) && a.charAt(i - 2) == b.charAt(j - 1))
					d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
			}
		return d[a.length()][b.length()];
	}

	private static final Pattern WORD = Pattern.compile("[A-Za-z0-9_.+-]+");

	/**
	 * Checks a recorded option against the command's keys and the kind of its value, for writing it into a
	 * macro. @throws IllegalArgumentException naming the key
	 */
	public static void validateValue(final Command cmd, final String key, final String value) {
		final Kind kind = cmd.kind(key).orElseThrow(() -> new IllegalArgumentException("The record of " + cmd.label()
				+ " holds a key it does not have: '" + printable(key) + "'"));
		if (value == null) throw new IllegalArgumentException("The record of " + cmd.label() + " holds no value for " + key + "=");
		final boolean ok = switch (kind) {
		case FLAG -> value.equals("true") || value.equals("false");
		case NUMBER -> isNumber(value);
		case WORD -> WORD.matcher(value).matches();
		case TEXT -> value.chars().noneMatch(ch -> ch < 0x20 || ch == 0x7f || ch == '[' || ch == ']');
		};
		if (!ok) throw new IllegalArgumentException("The record of " + cmd.label() + " holds a value for " + key + "= that is not "
				+ switch (kind) { case FLAG -> "a checkbox"; case NUMBER -> "a number"; case WORD -> "a choice"; case TEXT -> "plain text"; } + ": '"
				+ printable(value) + "'");
	}

	private static boolean isNumber(final String v) {
		if (!v.matches("[-+0-9.eE]+")) return false;
		try {
			Double.parseDouble(v);
			return true;
		} catch (final NumberFormatException e) {
			return false;
		}
	}

	/** Text safe to show in one line: control characters as '?', at most 80 characters. */
	public static String printable(final String s) {
		final String t = s.replaceAll("\\p{Cntrl}", "?");
		return t.length() > 80 ? t.substring(0, 77) + "..." : t;
	}

	/** All keys of a command, for tests. */
	public static List<String> keysOf(final Command cmd) {
		return new ArrayList<>(cmd.keys().keySet());
	}
}
