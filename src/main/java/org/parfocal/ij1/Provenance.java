package org.parfocal.ij1;

import java.time.OffsetDateTime;
import java.time.format.DateTimeFormatter;

import ij.IJ;
import ij.ImagePlus;

/**
 * The record of how an output was made, kept in the image's "Info" property so ImageJ's TIFF writer saves
 * it. This first form is a human-readable block holding the command and its exact macro options, so that
 * {@code run("<command>...", "<options>")} rebuilds the output from the same inputs.
 */
final class Provenance {

	private Provenance() {}

	static final String HEADER = "# Parfocal provenance";

	/** Adds the block to {@code out}'s Info, after what the info already holds. */
	static void attach(final ImagePlus out, final String command, final String macroOptions, final ImagePlus... inputs) {
		final StringBuilder sb = new StringBuilder();
		sb.append(HEADER).append('\n');
		sb.append("command = ").append(command).append("...\n");
		sb.append("options = ").append(macroOptions).append('\n');
		sb.append("macro = run(\"").append(command).append("...\", \"").append(macroOptions).append("\");\n");
		for (final ImagePlus in : inputs)
			if (in != null) sb.append("input = ").append(in.getTitle()).append(" (").append(describe(in)).append(")\n");
		sb.append("parfocal = ").append(version()).append('\n');
		sb.append("imagej = ").append(IJ.getVersion()).append(", java = ").append(System.getProperty("java.version")).append('\n');
		sb.append("date = ").append(OffsetDateTime.now().format(DateTimeFormatter.ISO_OFFSET_DATE_TIME)).append('\n');
		sb.append("caution = Deconvolved or simulated intensities are estimates and can show artefacts that look like structure.\n");
		final Object old = out.getProperty("Info");
		out.setProperty("Info", (old == null ? "" : old + "\n") + sb);
	}

	private static String describe(final ImagePlus imp) {
		final String path = imp.getOriginalFileInfo() == null ? null : imp.getOriginalFileInfo().getFilePath();
		return imp.getWidth() + "x" + imp.getHeight() + "x" + imp.getNSlices() + ", " + imp.getBitDepth() + "-bit"
				+ (path == null ? "" : ", " + path);
	}

	/** Version from the jar manifest, or "development" when run from classes. */
	static String version() {
		final String v = Provenance.class.getPackage().getImplementationVersion();
		return v == null ? "development" : v;
	}
}
