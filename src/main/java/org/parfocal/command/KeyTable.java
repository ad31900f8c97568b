package org.parfocal.command;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Optional;

import org.parfocal.provenance.MacroOptions;

/**
 * The keys of one dialog of a command, in dialog order ({@link Key}): the one description the dialog, its Help
 * page, the Recorder line, the record and the text parsers are made from. {@link #read} turns macro options (as a
 * key → text map, the way every front end has them) into {@link Values} that apply the defaults and say in one
 * line what is wrong with a value. No {@code ij.*}, no AWT.
 *
 * @param title the dialog's title (the command's menu label without "...", or a second dialog's name)
 * @param keys the keys in dialog order
 */
public record KeyTable(String title, List<Key> keys) {

	public KeyTable {
		keys = List.copyOf(keys);
		final Map<String, Key> seen = new LinkedHashMap<>();
		for (final Key k : keys)
			if (seen.put(k.name(), k) != null) throw new IllegalArgumentException(title + ": the key " + k.name() + " is described twice");
	}

	/** The key with this name. @throws IllegalArgumentException when the table has none */
	public Key key(final String name) {
		return find(name).orElseThrow(() -> new IllegalArgumentException(title + " has no key '" + name + "'"));
	}

	/** The key with this name (or an old name of it), if any. */
	public Optional<Key> find(final String name) {
		for (final Key k : keys)
			if (k.name().equals(name) || k.oldNames().contains(name)) return Optional.of(k);
		return Optional.empty();
	}

	/** Key names in dialog order. */
	public List<String> names() {
		return keys.stream().map(Key::name).toList();
	}

	/** The specifications {@code name:K} of {@link CommandKeys}' tables (K = N, F, W or T). */
	List<String> specs() {
		return keys.stream().map(k -> k.name() + ":" + k.kind().name().charAt(0)).toList();
	}

	/** Old names → current names. */
	public Map<String, String> oldNames() {
		final Map<String, String> m = new LinkedHashMap<>();
		for (final Key k : keys)
			for (final String old : k.oldNames()) m.put(old, k.name());
		return m;
	}

	/** The values of {@code options} (keys already checked and renamed by {@link CommandKeys#check}), defaults for the rest. */
	public Values read(final Map<String, String> options) {
		return new Values(this, options);
	}

	/** The values of one run: what was given, or the table's default. */
	public static final class Values {
		private final KeyTable table;
		private final Map<String, String> given;

		Values(final KeyTable table, final Map<String, String> given) {
			this.table = table;
			this.given = given;
		}

		/** True when the options give this key (or an old name of it). */
		public boolean given(final String name) {
			return raw(table.key(name)) != null;
		}

		/** The text given, or the default. */
		public String text(final String name) {
			final Key k = table.key(name);
			final String v = raw(k);
			return v == null ? k.defaultValue() : v.trim();
		}

		/** A number (the default when not given). @throws IllegalArgumentException "'x' is not a number (key=)" */
		public double number(final String name) {
			final String v = text(name);
			try {
				return Double.parseDouble(v);
			} catch (final NumberFormatException e) {
				throw new IllegalArgumentException("'" + v + "' is not a number (" + name + "=)");
			}
		}

		/** A whole number. @throws IllegalArgumentException when it has a fraction */
		public int whole(final String name) {
			final double v = number(name);
			if (v != Math.rint(v) || Math.abs(v) > Integer.MAX_VALUE)
				throw new IllegalArgumentException(table.key(name).helpLabel() + " must be a whole number, got " + v + " (" + name + "=)");
			return (int) v;
		}

		/** A choice's text (or the default) parsed; the parser's one-line error ends with the key. */
		public <T> T parsed(final String name, final java.util.function.Function<String, T> parse) {
			try {
				return parse.apply(text(name));
			} catch (final IllegalArgumentException e) {
				throw new IllegalArgumentException(e.getMessage() + " (" + name + "=)");
			}
		}

		/** A checkbox: given without a value, or as {@code true}; the default otherwise. */
		public boolean flag(final String name) {
			final Key k = table.key(name);
			final String v = raw(k);
			if (v == null) return Boolean.parseBoolean(k.defaultValue());
			return v.isEmpty() || !v.trim().toLowerCase(Locale.ROOT).equals("false");
		}

		private String raw(final Key k) {
			String v = given.get(k.name());
			if (v == null)
				for (final String old : k.oldNames())
					if ((v = given.get(old)) != null) break;
			return v;
		}
	}

	/** Builds a table row by row. */
	public static Builder of(final String title) {
		return new Builder(title);
	}

	/** Rows in dialog order. */
	public static final class Builder {
		private final String title;
		private final List<Key> keys = new ArrayList<>();

		Builder(final String title) {
			this.title = title;
		}

		public Builder number(final String name, final String label, final double def, final double min, final double max, final String unit,
				final String help) {
			keys.add(new Key(name, label, CommandKeys.Kind.NUMBER, MacroOptions.number(def), null, min, max, unit, help, List.of()));
			return this;
		}

		public Builder word(final String name, final String label, final String def, final String help) {
			keys.add(new Key(name, label, CommandKeys.Kind.WORD, def, null, Double.NaN, Double.NaN, "", help, List.of()));
			return this;
		}

		public Builder text(final String name, final String label, final String def, final String unit, final String help, final String... oldNames) {
			keys.add(new Key(name, label, CommandKeys.Kind.TEXT, def, null, Double.NaN, Double.NaN, unit, help, List.of(oldNames)));
			return this;
		}

		/** A checkbox: unticked for a macro that leaves it out; {@code shownTicked} the first time the dialog shows. */
		public Builder flag(final String name, final String label, final boolean shownTicked, final String help) {
			keys.add(new Key(name, label, CommandKeys.Kind.FLAG, "false", Boolean.toString(shownTicked), Double.NaN, Double.NaN, "", help, List.of()));
			return this;
		}

		/** The rows of another table (a shared second dialog). */
		public Builder all(final KeyTable other) {
			keys.addAll(other.keys());
			return this;
		}

		public KeyTable build() {
			return new KeyTable(title, keys);
		}
	}
}
