package org.parfocal.ij1;

import ij.ImagePlus;
import ij.WindowManager;
import ij.macro.Interpreter;
import ij.measure.ResultsTable;
import ij.plugin.filter.Analyzer;

/**
 * Static functions for ImageJ macros, called with {@code call("org.parfocal.ij1.MacroFunctions.name")} (the
 * macro language has no SHA-256 of its own). Used by the macros that Export Provenance as Macro writes, and by
 * macros that read a command's table without a display ({@link #selectTable}).
 */
public final class MacroFunctions {

	private MacroFunctions() {}

	/** SHA-256 of the current image's pixels, as the provenance records it (see {@link Provenance#sha256}); "" without an image. */
	public static String currentPixelSha256() {
		final ImagePlus imp = WindowManager.getCurrentImage();
		return imp == null ? "" : Provenance.sha256(imp);
	}

	/**
	 * Makes a Parfocal table ImageJ's Results table, so that {@code nResults}, {@code getResult(column, row)},
	 * {@code Table.get(column, row)} and {@code Table.getColumn(column)} read it, with or without a display. The
	 * title is a table's (e.g. "Bead PSF FWHM") or an image's that carries its own table (the blind PSF history).
	 * Returns the number of rows; an unknown title is a macro error.
	 */
	public static String selectTable(final String title) {
		final ResultsTable rt = Tables.find(title);
		if (rt == null) {
			final String msg = "No Parfocal table called '" + title + "' (a command's table title, or an image that carries one)";
			Commands.fail("selectTable", msg); // one line, and the macro stops
			return "";
		}
		final ResultsTable copy = (ResultsTable) rt.clone();
		Analyzer.setResultsTable(copy);
		if (!java.awt.GraphicsEnvironment.isHeadless() && !Interpreter.isBatchMode()) copy.show("Results");
		return Integer.toString(copy.size());
	}
}
