package org.parfocal.command;

import java.util.LinkedHashMap;

import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import java.util.Map;
import java.util.regex.Pattern;

/**
 * Turns a provenance record into an ImageJ macro that rebuilds the output from its inputs: every input made by
 * Parfocal is rebuilt first by its own recorded command (recursively), every other input is opened from its
 * file (checked to exist, and its pixels checked against the recorded SHA-256 before anything runs on them) and
 * given the title the command saw, then the command runs with its recorded options. The macro's argument, when
 * given, is the path to save the result to.
 * <p>
 * A record is text anyone can edit, and titles come from file names, so nothing of it is copied into the macro
 * as code: the {@code run} lines are rebuilt from the command name and options, each checked against the
 * command's known keys and the kind of its value ({@link CommandKeys}); the record's own {@code macro} line is
 * never used; every string is written as an escaped macro string literal; comments hold no line breaks.
 * <p>
 * Replaying with the same Parfocal version gives the same pixels: the commands are deterministic (seeded noise,
 * thread-count invariant numerics).
 */
public final class MacroExport {

	/** The command that makes the sample stacks (no options); its outputs are rebuilt by running it again. */
	public static final String SAMPLE_COMMAND = "Make Sample Stacks";
	/** Run fact of a sample stack's record: the title the command gives it. */
	public static final String SAMPLE_TITLE = "title";
	/** Static method the rebuild macro calls (through {@code call}) for the SHA-256 of the current image's pixels. */
	public static final String HASH_FUNCTION = "org.parfocal.ij1.MacroFunctions.currentPixelSha256";
	/** Deepest chain of records a macro is written for. */
	public static final int MAX_DEPTH = 20;

	private static final Pattern SHA256 = Pattern.compile("[0-9a-f]{64}");

	private MacroExport() {}

	/**
	 * The macro text.
	 *
	 * @param p the record of the output
	 * @param outputTitle title the rebuilt output is given at the end
	 * @throws IllegalArgumentException (one line) if an input was neither opened from a file nor made by Parfocal,
	 *           or the record holds something that is not a Parfocal command, key or value
	 */
	public static String toMacro(final Provenance p, final String outputTitle) {
		checkText("The output's title", outputTitle);
		final StringBuilder sb = new StringBuilder();
		sb.append("// Rebuilds '").append(comment(outputTitle)).append("' from its inputs, as recorded by Parfocal ").append(comment(p.parfocalVersion()))
				.append(" on ").append(comment(p.date())).append(".\n");
		sb.append("// Each input file is checked against the SHA-256 of its pixels in the record before it is used.\n");
		sb.append("// Run in ImageJ, or headless: bin/parfocal-headless this-macro.ijm [output.tif]\n");
		sb.append("// ").append(Provenance.CAUTION).append('\n');
		sb.append("setBatchMode(true);\n");
		final StringBuilder steps = new StringBuilder();
		emit(p, steps, new LinkedHashMap<>(), 0);
		sb.append(steps);
		sb.append("rename(").append(literal(outputTitle)).append(");\n");
		sb.append("out = getArgument();\n");
		sb.append("if (out != \"\") { saveAs(\"Tiff\", out); print(\"wrote \" + out); }\n");
		sb.append("setBatchMode(\"exit and display\");\n");
		return sb.toString();
	}

	/** Writes the steps that make {@code p}'s output the current image. {@code made}: input hash → title already made. */
	private static void emit(final Provenance p, final StringBuilder sb, final Map<String, String> made, final int depth) {
		if (depth > MAX_DEPTH) throw new IllegalArgumentException("The provenance chain is deeper than " + MAX_DEPTH + " steps");
		if (p == null || p.command() == null) throw new IllegalArgumentException("The record holds an empty step");
		if (SAMPLE_COMMAND.equals(p.command())) {
			final Object t = p.run().get(SAMPLE_TITLE);
			if (!(t instanceof String title)) throw new IllegalArgumentException("The record of a sample stack names no title");
			checkText("A sample stack's title", title);
			if (!p.options().isEmpty()) throw new IllegalArgumentException("The record of " + SAMPLE_COMMAND + " holds options it does not have");
			sb.append("run(").append(literal(SAMPLE_COMMAND)).append(");\n");
			sb.append("selectImage(").append(literal(title)).append(");\n");
			return;
		}
		final CommandKeys.Command cmd = CommandKeys.of(p.command()).orElseThrow(
				() -> new IllegalArgumentException("The record names a command that is not Parfocal's: '" + CommandKeys.printable(p.command()) + "'"));
		for (final Map.Entry<String, String> e : p.options().entrySet()) CommandKeys.validateValue(cmd, e.getKey(), e.getValue());
		for (final Provenance.Input in : p.inputs()) {
			if (in == null) throw new IllegalArgumentException("The record of " + cmd.label() + " holds an empty input");
			final String role = in.role() == null ? "input" : in.role();
			checkText("The " + comment(role) + "'s title", in.title());
			if (in.sha256() != null && !SHA256.matcher(in.sha256()).matches())
				throw new IllegalArgumentException("The record of " + cmd.label() + " holds a SHA-256 that is not one: '" + CommandKeys.printable(in.sha256()) + "'");
			final String key = in.sha256() == null ? in.title() : in.sha256();
			if (made.containsKey(key)) {
				if (!made.get(key).equals(in.title())) {
					sb.append("selectImage(").append(literal(made.get(key))).append(");\n");
					sb.append("run(\"Duplicate...\", ").append(literal("title=[" + in.title() + "] duplicate")).append(");\n");
				}
				continue;
			}
			if (in.source() != null) {
				sb.append("// ").append(comment(role)).append(" '").append(comment(in.title())).append("': made by ").append(comment(in.source().command()))
						.append("...\n");
				emit(in.source(), sb, made, depth + 1);
				sb.append("rename(").append(literal(in.title())).append(");\n");
			} else if (in.path() != null) {
				checkText("The path of the " + comment(role), in.path());
				if (in.sha256() == null) throw new IllegalArgumentException("The record of " + cmd.label() + " holds no SHA-256 for '" + comment(in.path()) + "'");
				sb.append("// ").append(comment(role)).append(" '").append(comment(in.title())).append("' (sha256 ").append(in.sha256()).append(")\n");
				sb.append("if (!File.exists(").append(literal(in.path())).append(")) exit(").append(literal("Error: input file not found: " + in.path()))
						.append(");\n");
				sb.append("open(").append(literal(in.path())).append(");\n");
				sb.append("if (call(").append(literal(HASH_FUNCTION)).append(") != ").append(literal(in.sha256())).append(") exit(")
						.append(literal("Error: input file differs from the recorded one (SHA-256 of its pixels): " + in.path())).append(");\n");
				sb.append("rename(").append(literal(in.title())).append(");\n");
			} else {
				throw new IllegalArgumentException("The " + comment(role) + " '" + comment(in.title())
						+ "' was not opened from a file and not made by Parfocal, so the macro cannot rebuild it: save it, rerun the command, then export");
			}
			made.put(key, in.title());
		}
		sb.append("run(").append(literal(cmd.label() + "...")).append(", ").append(literal(MacroOptions.format(new LinkedHashMap<>(p.options()))))
				.append(");\n");
	}

	/** A macro string literal: quotes and backslashes escaped (the text holds no control characters, see {@link #checkText}). */
	static String literal(final String s) {
		final StringBuilder sb = new StringBuilder(s.length() + 2).append('"');
		for (int i = 0; i < s.length(); i++) {
			final char c = s.charAt(i);
			switch (c) {
			case '\\' -> sb.append("\\\\");
			case '"' -> sb.append("\\\"");
			case '\n' -> sb.append("\\n");
			case '\t' -> sb.append("\\t");
			case '\r' -> sb.append("\\r");
			default -> sb.append(c < 0x20 || c == 0x7f ? '?' : c);
			}
		}
		return sb.append('"').toString();
	}

	/** Text for a {@code //} comment: no line breaks or other control characters. */
	static String comment(final String s) {
		return s == null ? "" : CommandKeys.printable(s).replace('\u2028', '?').replace('\u2029', '?').replace('\u0085', '?');
	}

	/** Titles and paths go into options strings too: no control characters, no brackets. */
	private static void checkText(final String what, final String s) {
		if (s == null || s.isEmpty()) throw new IllegalArgumentException(what + " is missing in the record");
		if (s.chars().anyMatch(c -> c < 0x20 || c == 0x7f || c == '[' || c == ']' || c == 0x85 || c == 0x2028 || c == 0x2029))
			throw new IllegalArgumentException(what + " holds a line break, a control character or a bracket, which a macro cannot pass on: '"
					+ CommandKeys.printable(s) + "'; rename it and rerun");
	}
}
