package org.parfocal.provenance;

import java.util.LinkedHashMap;
import java.util.Map;

/**
 * Turns a provenance record into an ImageJ macro that rebuilds the output from its inputs: every input made by
 * Parfocal is rebuilt first by its own recorded command (recursively), every other input is opened from its
 * file (checked to exist) and given the title the command saw, then the command's recorded line runs. The
 * macro's argument, when given, is the path to save the result to.
 * <p>
 * Replaying with the same Parfocal version gives the same pixels: the commands are deterministic (seeded noise,
 * thread-count invariant numerics).
 */
public final class MacroExport {

	private MacroExport() {}

	/**
	 * The macro text.
	 *
	 * @param p the record of the output
	 * @param outputTitle title the rebuilt output is given at the end
	 * @throws IllegalArgumentException if an input was neither opened from a file nor made by Parfocal
	 */
	public static String toMacro(final Provenance p, final String outputTitle) {
		final StringBuilder sb = new StringBuilder();
		sb.append("// Rebuilds '").append(outputTitle).append("' from its inputs, as recorded by Parfocal ").append(p.parfocalVersion())
				.append(" on ").append(p.date()).append(".\n");
		sb.append("// Run in ImageJ, or headless: bin/parfocal-headless this-macro.ijm [output.tif]\n");
		sb.append("// ").append(Provenance.CAUTION).append('\n');
		sb.append("setBatchMode(true);\n");
		emit(p, sb, new LinkedHashMap<>(), 0);
		sb.append("rename(\"").append(escape(outputTitle)).append("\");\n");
		sb.append("out = getArgument();\n");
		sb.append("if (out != \"\") { saveAs(\"Tiff\", out); print(\"wrote \" + out); }\n");
		sb.append("setBatchMode(\"exit and display\");\n");
		return sb.toString();
	}

	/** Writes the steps that make {@code p}'s output the current image. {@code made}: input hash → title already made. */
	private static void emit(final Provenance p, final StringBuilder sb, final Map<String, String> made, final int depth) {
		if (depth > 20) throw new IllegalArgumentException("The provenance chain is deeper than 20 steps");
		for (final Provenance.Input in : p.inputs()) {
			final String key = in.sha256() == null ? in.title() : in.sha256();
			if (made.containsKey(key)) {
				if (!made.get(key).equals(in.title())) sb.append("selectImage(\"").append(escape(made.get(key))).append("\"); run(\"Duplicate...\", \"title=[")
						.append(in.title()).append("] duplicate\");\n");
				continue;
			}
			if (in.source() != null) {
				sb.append("// ").append(in.role()).append(" '").append(in.title()).append("': made by ").append(in.source().command()).append("...\n");
				emit(in.source(), sb, made, depth + 1);
				sb.append("rename(\"").append(escape(in.title())).append("\");\n");
			} else if (in.path() != null) {
				sb.append("// ").append(in.role()).append(" '").append(in.title()).append("' (sha256 ").append(in.sha256()).append(")\n");
				sb.append("if (!File.exists(\"").append(escape(in.path())).append("\")) exit(\"Error: input file not found: ").append(escape(in.path()))
						.append("\");\n");
				sb.append("open(\"").append(escape(in.path())).append("\");\n");
				sb.append("rename(\"").append(escape(in.title())).append("\");\n");
			} else {
				throw new IllegalArgumentException("The " + in.role() + " '" + in.title()
						+ "' was not opened from a file and not made by Parfocal, so the macro cannot rebuild it: save it, rerun the command, then export");
			}
			made.put(key, in.title());
		}
		sb.append(p.macro()).append('\n');
	}

	private static String escape(final String s) {
		return s.replace("\\", "\\\\").replace("\"", "\\\"");
	}
}
