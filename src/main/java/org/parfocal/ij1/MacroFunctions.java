package org.parfocal.ij1;

import ij.ImagePlus;
import ij.WindowManager;
import ij.measure.ResultsTable;
import ij.plugin.filter.Analyzer;

/**
 * Static functions for ImageJ macros, called with {@code call("org.parfocal.ij1.MacroFunctions.name")} (the
 * macro language has no SHA-256 of its own). Used by the macros that Export Provenance as Macro writes, and by
 * macros that read a command's table without a display ({@link #selectTable}).
 */
public final class MacroFunctions {

	private MacroFunctions() {}

	/** SHA-256 of the current image's pixels, as the provenance records it (see {@link ImageProvenance#sha256}); "" without an image. */
	public static String currentPixelSha256() {
		final ImagePlus imp = WindowManager.getCurrentImage();
		return imp == null ? "" : ImageProvenance.sha256(imp);
	}

	/**
	 * Makes a Parfocal table ImageJ's Results table, so that {@code nResults}, {@code getResult(column, row)},
	 * {@code Table.get(column, row, "Results")} and {@code Table.getColumn(column, "Results")} read it, with or without
	 * a display (with one, Table functions without a title read the front table window, which may be another). The
	 * title is a table's (e.g. "Bead PSF FWHM") or an image's that carries its own table (the blind PSF history).
	 * Returns the number of rows; an unknown title is a macro error.
	 */
	public static String selectTable(final String title) {
		final ResultsTable rt = Tables.find(title);
		if (rt == null) {
			final java.util.List<String> kept = Tables.keptTitles();
			final String msg = "No Parfocal table called '" + title + "' (a command's table title, or an image that carries one)"
					+ (kept.isEmpty() ? "; no command has made a table yet" : "; the tables now: '" + String.join("', '", kept) + "'");
			Commands.fail("selectTable", msg); // one line, and the macro stops
			return "";
		}
		// into the system Results table itself (the object the Results window, if any, shows)
		final ResultsTable results = Analyzer.getResultsTable();
		Tables.copyInto(rt, results);
		if (!java.awt.GraphicsEnvironment.isHeadless()) results.show("Results");
		return Integer.toString(results.size());
	}
}
