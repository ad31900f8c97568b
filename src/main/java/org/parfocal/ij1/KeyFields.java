package org.parfocal.ij1;

import java.util.LinkedHashMap;
import java.util.Map;

import ij.Prefs;
import ij.gui.GenericDialog;

import org.parfocal.command.Key;
import org.parfocal.command.KeyTable;
import org.parfocal.provenance.MacroOptions;

/**
 * A GenericDialog's fields made from a {@link KeyTable}: each field's label and default come from its
 * {@link Key} (the default is the remembered value outside macros, never in one), and the values read back go
 * into a key → text map in the form a macro line has them, for the command's one reader (e.g.
 * {@link org.parfocal.command.DeconvolveRequest#from}). The dialog adds only what is about the screen: the items
 * of a choice, the digits and hint of a number.
 */
final class KeyFields {

	private final GenericDialog gd;
	private final KeyTable table;
	private final String prefs;
	private final Map<String, String> values = new LinkedHashMap<>();

	/** @param prefs prefix of the remembered values ({@code Prefs} keys: prefix + key) */
	KeyFields(final GenericDialog gd, final KeyTable table, final String prefs) {
		this.gd = gd;
		this.table = table;
		this.prefs = prefs;
	}

	/** A choice with these items, starting at {@code first} (or the remembered/default value when null). */
	KeyFields choice(final String name, final String[] items, final String first) {
		final Key k = table.key(name);
		gd.addChoice(k.label(), items, first != null ? first : Commands.remembered(prefs + name, k.shownValue()));
		return this;
	}

	KeyFields number(final String name, final int digits, final int columns, final String hint) {
		final Key k = table.key(name);
		gd.addNumericField(k.label(), Commands.remembered(prefs + name, k.shownNumber()), digits, columns, hint);
		return this;
	}

	KeyFields text(final String name, final int columns) {
		final Key k = table.key(name);
		gd.addStringField(k.label(), Commands.remembered(prefs + name, k.shownValue()), columns);
		return this;
	}

	/** A checkbox, ticked or not as its key's first-shown value (not remembered). */
	KeyFields checkbox(final String name) {
		final Key k = table.key(name);
		gd.addCheckbox(k.label(), k.shownChecked());
		return this;
	}

	/** A checkbox whose state is remembered outside macros (its first-shown value the first time; unticked in a macro that leaves it out). */
	KeyFields rememberedCheckbox(final String name) {
		final Key k = table.key(name);
		gd.addCheckbox(k.label(), !Commands.isMacro() && Commands.remembered(prefs + name, k.shownChecked()));
		return this;
	}

	/** Reads the next choice (words mapped back to the macro value). */
	String readChoice(final String name, final String what) {
		return put(name, Commands.checkChoice(name, gd.getNextChoice(), what));
	}

	/** Reads the next number, as macro text. */
	String readNumber(final String name) {
		return put(name, MacroOptions.number(Commands.number(gd, name)));
	}

	/** Reads the next number cut to its whole part (a size the dialog has always truncated), as macro text. */
	String readWhole(final String name) {
		return put(name, Integer.toString((int) Commands.number(gd, name)));
	}

	String readText(final String name) {
		return put(name, gd.getNextString().trim());
	}

	boolean readCheckbox(final String name) {
		final boolean b = gd.getNextBoolean();
		put(name, Boolean.toString(b));
		return b;
	}

	/** What was read, key → macro text, in reading order. @throws IllegalArgumentException when a number was not valid */
	Map<String, String> values() {
		if (gd.invalidNumber()) throw new IllegalArgumentException("A number in the dialog is not valid");
		return values;
	}

	/** Remembers the values read (outside macros only) for the keys named. */
	void remember(final String... names) {
		if (Commands.isMacro()) return;
		for (final String n : names) Prefs.set(prefs + n, values.get(n));
	}

	private String put(final String name, final String text) {
		values.put(table.key(name).name(), text);
		return text;
	}
}
