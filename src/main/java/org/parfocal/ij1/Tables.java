package org.parfocal.ij1;

import ij.ImagePlus;
import ij.measure.ResultsTable;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The result tables of the commands, readable by macros with or without a display. ImageJ 1.x finds a named table
 * only through its window ({@code Table.get(column, row, title)} looks for a {@code TextWindow}), so without a
 * display a command's table would be lost. Every table a command makes is therefore also kept here under its
 * title (the most recent {@value #KEPT} titles), and a table that belongs to an image (the blind PSF history's) is
 * stored in that image's properties, so it is saved in the image's TIFF and travels with it.
 * {@code call("org.parfocal.ij1.MacroFunctions.selectTable", title)} makes one of them ImageJ's Results table,
 * where {@code nResults}, {@code getResult}, {@code Table.get} and {@code Table.getColumn} read it.
 */
public final class Tables {

	/** Property holding an image's own table (tab-separated, a heading line, numbers with full precision). */
	public static final String PROPERTY = "parfocal.table";
	static final int KEPT = 32;

	private static final Map<String, ResultsTable> TABLES = new LinkedHashMap<>();

	private Tables() {}

	/** Shows a table under its title (a window when there is a display) and keeps it for macros. */
	static void show(final ResultsTable rt, final String title) {
		keep(rt, title);
		rt.show(title);
	}

	/** Keeps a table for macros without showing it. */
	static void keep(final ResultsTable rt, final String title) {
		synchronized (TABLES) {
			TABLES.remove(title);
			TABLES.put(title, (ResultsTable) rt.clone());
			while (TABLES.size() > KEPT) TABLES.remove(TABLES.keySet().iterator().next());
		}
	}

	/** Stores a table in an image's properties (saved with the image as TIFF). */
	static void attach(final ImagePlus imp, final ResultsTable rt) {
		imp.setProp(PROPERTY, toText(rt));
	}

	/** The table shown or kept under this title, else the table stored in the open image of this title, or null. */
	static ResultsTable find(final String title) {
		final ResultsTable window = ResultsTable.getResultsTable(title);
		if (window != null && !"Results".equals(title)) return window;
		synchronized (TABLES) {
			final ResultsTable kept = TABLES.get(title);
			if (kept != null) return (ResultsTable) kept.clone();
		}
		final ImagePlus imp = ij.WindowManager.getImage(title);
		return imp == null ? null : of(imp);
	}

	/** Titles of the tables kept for macros, the most recent last. */
	static java.util.List<String> keptTitles() {
		synchronized (TABLES) {
			return java.util.List.copyOf(TABLES.keySet());
		}
	}

	/** The table stored in an image's properties, or null. */
	public static ResultsTable of(final ImagePlus imp) {
		final String text = imp.getProp(PROPERTY);
		return text == null ? null : fromText(text);
	}

	/** Tab-separated text: headings, then one line per row; numbers as Java writes doubles (exact round trip). */
	static String toText(final ResultsTable rt) {
		final String[] headings = rt.getHeadings();
		final List<String> cols = new ArrayList<>();
		for (final String h : headings)
			if (!h.equals("Label") || rt.getColumnIndex("Label") != ResultsTable.COLUMN_NOT_FOUND) cols.add(h);
		final StringBuilder sb = new StringBuilder(String.join("\t", cols.stream().map(Tables::clean).toList())).append('\n');
		for (int r = 0; r < rt.size(); r++) {
			for (int c = 0; c < cols.size(); c++) {
				if (c > 0) sb.append('\t');
				final String h = cols.get(c);
				final double v = h.equals("Label") ? Double.NaN : rt.getValue(h, r);
				sb.append(Double.isNaN(v) ? "s:" + clean(String.valueOf(rt.getStringValue(h, r))) : Double.toString(v));
			}
			sb.append('\n');
		}
		return sb.toString();
	}

	static ResultsTable fromText(final String text) {
		final String[] lines = text.split("\n");
		final String[] headings = lines[0].split("\t", -1);
		final ResultsTable rt = new ResultsTable();
		for (int r = 1; r < lines.length; r++) {
			if (lines[r].isEmpty()) continue;
			final String[] cells = lines[r].split("\t", -1);
			rt.incrementCounter();
			for (int c = 0; c < headings.length && c < cells.length; c++) {
				if (headings[c].equals("Label")) rt.addLabel(cells[c].startsWith("s:") ? cells[c].substring(2) : cells[c]);
				else if (cells[c].startsWith("s:")) {
					final String s = cells[c].substring(2);
					if (s.equals("NaN")) rt.addValue(headings[c], Double.NaN);
					else rt.addValue(headings[c], s);
				} else rt.addValue(headings[c], Double.parseDouble(cells[c]));
			}
		}
		return rt;
	}

	/** Replaces {@code to}'s rows and columns by {@code from}'s (numbers, text, labels). */
	static void copyInto(final ResultsTable from, final ResultsTable to) {
		final ResultsTable t = fromText(toText(from));
		to.reset();
		final String[] headings = t.getHeadings();
		for (int r = 0; r < t.size(); r++) {
			to.incrementCounter();
			for (final String h : headings) {
				if (h.equals("Label")) to.addLabel(t.getLabel(r));
				else {
					final double v = t.getValue(h, r);
					final String text = t.getStringValue(h, r);
					if (Double.isNaN(v) && text != null && !text.equals("NaN")) to.addValue(h, text);
					else to.addValue(h, v);
				}
			}
		}
	}

	private static String clean(final String s) {
		return s.replace('\t', ' ').replace('\n', ' ').replace('\r', ' ');
	}
}
