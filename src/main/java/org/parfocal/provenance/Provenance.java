package org.parfocal.provenance;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Optional;

import com.google.gson.Gson;
import com.google.gson.GsonBuilder;
import com.google.gson.JsonParseException;
import com.google.gson.ToNumberPolicy;

/**
 * How an output was made: the command and every option, the inputs (title, file, SHA-256 of the pixels, and
 * their own provenance when Parfocal made them), what the run did (iterations, why it stopped, time,
 * threads), and the versions of Parfocal, ImageJ and Java, and the FFT library that computed the transforms.
 * <p>
 * It is stored in an image's "Info" text, which ImageJ's TIFF writer keeps, as a human-readable block
 * followed by the same record as one line of JSON between {@link #JSON_BEGIN} and {@link #END}. The JSON
 * form is the one programs read back ({@link #findIn}); the text form is for people.
 */
public final class Provenance {

	public static final String TEXT_BEGIN = "# Parfocal provenance";
	public static final String JSON_BEGIN = "# Parfocal provenance JSON";
	public static final String END = "# end of Parfocal provenance";
	public static final String CAUTION = "Deconvolved and simulated intensities are estimates and can show artefacts that look like "
			+ "structure; validate before quantitative use and follow your institution's practice.";

	private static final Gson GSON = new GsonBuilder().disableHtmlEscaping().serializeSpecialFloatingPointValues()
			.setObjectToNumberStrategy(ToNumberPolicy.LONG_OR_DOUBLE).create();

	/**
	 * One input image. {@code source} is its own provenance when it has one; {@code calibration} its voxel size as
	 * text ("0.1 x 0.1 x 0.3 µm", or "uncalibrated"), null when not known.
	 */
	public record Input(String role, String title, String path, String sha256, String shape, Provenance source, String calibration) {

		/** Without calibration (records written before it was kept). */
		public Input(final String role, final String title, final String path, final String sha256, final String shape, final Provenance source) {
			this(role, title, path, sha256, shape, source, null);
		}
	}

	// Fields are plain so that Gson writes them in this order; treat instances as immutable.
	private String command;
	private LinkedHashMap<String, String> options;
	private String macro;
	private List<Input> inputs;
	private LinkedHashMap<String, Object> run;
	private String parfocalVersion, imagejVersion, javaVersion, fft, date;
	private int threads;
	private double seconds;
	private String caution;

	private Provenance() {}

	/** Starts a record for {@code command} (menu label without "...") run with {@code macroOptions}. */
	public static Builder of(final String command, final String macroOptions) {
		return new Builder(command, macroOptions);
	}

	public String command() { return command; }

	/** Every option of the run, by macro key, in dialog order. */
	public Map<String, String> options() { return options == null ? Map.of() : options; }

	/** The command's menu label (plugins.config): with "..." when it opens a dialog, as every command but Make Sample Stacks does. */
	public static String menuLabel(final String command) {
		return command.equals("Make Sample Stacks") || command.endsWith("...") ? command : command + "...";
	}

	/** The macro line that reruns the command: {@code run("Command...", "options");}. */
	public String macro() { return macro; }

	public List<Input> inputs() { return inputs == null ? List.of() : inputs; }

	/** Facts of the run (iterations, stop reason, …) by name. */
	public Map<String, Object> run() { return run == null ? Map.of() : run; }

	/** Run key of the list of warnings (one sentence each) that every command adds with {@link Builder#warning}. */
	public static final String WARNINGS = "warnings";

	/**
	 * The warnings of the run, in the order they were added: the {@value #WARNINGS} list, then the older single
	 * keys {@code warning} and {@code warning1}, {@code warning2}, … that records written before the list kept.
	 */
	public List<String> warnings() {
		final List<String> w = new ArrayList<>();
		final Object list = run().get(WARNINGS);
		if (list instanceof List<?> l) for (final Object o : l) w.add(String.valueOf(o));
		else if (list != null) w.add(String.valueOf(list));
		for (final Map.Entry<String, Object> e : run().entrySet())
			if (e.getKey().matches("warning[0-9]*") && e.getValue() != null) w.add(String.valueOf(e.getValue()));
		return w;
	}

	public String parfocalVersion() { return parfocalVersion; }

	public String imagejVersion() { return imagejVersion; }

	public String javaVersion() { return javaVersion; }

	/** The FFT library of the run (e.g. "FFTW 3.3.10 (JavaCPP presets 1.5.10), …" or "JTransforms 3.1 (pure Java)"); null in older records. */
	public String fft() { return fft; }

	public String date() { return date; }

	public int threads() { return threads; }

	public double seconds() { return seconds; }

	public String toJson() { return GSON.toJson(this); }

	/** @throws IllegalArgumentException if the text is not a provenance record */
	public static Provenance fromJson(final String json) {
		// Gson reads nested objects recursively: a record nested thousands deep would overflow the stack.
		final int depth = nesting(json);
		if (depth > MAX_NESTING) throw new IllegalArgumentException("Provenance record is nested too deeply to read (" + depth + " levels)");
		try {
			final Provenance p = GSON.fromJson(json, Provenance.class);
			if (p == null || p.command == null) throw new IllegalArgumentException("Not a Parfocal provenance record");
			p.check(0);
			return p;
		} catch (final JsonParseException e) {
			throw new IllegalArgumentException("Provenance record cannot be read: " + oneLine(e.getMessage()));
		}
	}

	/** Deepest JSON nesting ({@code {}} and {@code []}) a record may have; a real chain of 20 steps has about 80. */
	public static final int MAX_NESTING = 200;

	/** Every step has a command and no empty input. */
	private void check(final int depth) {
		if (command == null || command.isBlank()) throw new IllegalArgumentException("Provenance record has a step without a command");
		for (final Input in : inputs()) {
			if (in == null) throw new IllegalArgumentException("Provenance record of " + command + " has an empty input");
			if (in.title() == null) throw new IllegalArgumentException("Provenance record of " + command + " has an input without a title");
			if (in.source() != null) in.source().check(depth + 1);
		}
	}

	/** Deepest nesting of objects and arrays outside strings. */
	private static int nesting(final String json) {
		int depth = 0, max = 0;
		boolean inString = false;
		for (int i = 0; i < json.length(); i++) {
			final char c = json.charAt(i);
			if (inString) {
				if (c == '\\') i++;
				else if (c == '"') inString = false;
			} else if (c == '"') inString = true;
			else if (c == '{' || c == '[') max = Math.max(max, ++depth);
			else if (c == '}' || c == ']') depth--;
		}
		return max;
	}

	private static String oneLine(final String s) {
		final String t = String.valueOf(s).replaceAll("\\s+", " ");
		return t.length() > 160 ? t.substring(0, 157) + "..." : t;
	}

	/** The human-readable block followed by the JSON line, ready to append to an image's Info. */
	public String toInfoText() {
		final StringBuilder sb = new StringBuilder();
		sb.append(TEXT_BEGIN).append('\n');
		sb.append("command: ").append(command).append("...\n");
		for (final Map.Entry<String, String> e : options().entrySet()) sb.append("  ").append(e.getKey()).append(" = ").append(e.getValue()).append('\n');
		for (final Input in : inputs()) {
			sb.append("input ").append(in.role()).append(": ").append(in.title());
			if (in.path() != null) sb.append(" (").append(in.path()).append(')');
			sb.append(", ").append(in.shape()).append(", sha256 ").append(in.sha256());
			if (in.source() != null) sb.append(", made by Parfocal: ").append(menuLabel(in.source().command()));
			sb.append('\n');
		}
		for (final Map.Entry<String, Object> e : run().entrySet()) sb.append("run ").append(e.getKey()).append(" = ").append(e.getValue()).append('\n');
		sb.append("time: ").append(String.format(java.util.Locale.ROOT, "%.2f", seconds)).append(" s on ").append(threads).append(" thread(s), ").append(date).append('\n');
		sb.append("versions: Parfocal ").append(parfocalVersion).append(", ImageJ ").append(imagejVersion).append(", Java ").append(javaVersion);
		if (fft != null) sb.append(", FFT ").append(fft);
		sb.append('\n');
		sb.append("rerun: ").append(macro).append('\n');
		sb.append("caution: ").append(CAUTION).append('\n');
		sb.append(JSON_BEGIN).append('\n').append(toJson()).append('\n').append(END).append('\n');
		return sb.toString();
	}

	/** The last provenance record in an image's Info text, if any. */
	public static Optional<Provenance> findIn(final String info) {
		if (info == null) return Optional.empty();
		final int b = info.lastIndexOf(JSON_BEGIN);
		if (b < 0) return Optional.empty();
		final int start = info.indexOf('\n', b) + 1;
		final int end = info.indexOf(END, start);
		if (start <= 0 || end < 0) return Optional.empty();
		return Optional.of(fromJson(info.substring(start, end).trim()));
	}

	/** Collects the fields of a record. */
	public static final class Builder {
		private final Provenance p = new Provenance();

		private Builder(final String command, final String macroOptions) {
			p.command = command;
			p.options = MacroOptions.parse(macroOptions);
			p.macro = "run(\"" + menuLabel(command) + "\", \"" + macroOptions + "\");";
			p.inputs = new ArrayList<>();
			p.run = new LinkedHashMap<>();
			p.caution = CAUTION;
		}

		public Builder input(final Input in) {
			p.inputs.add(in);
			return this;
		}

		/** A fact of the run: iterations, stop reason, warnings, … */
		public Builder run(final String key, final Object value) {
			p.run.put(key, value);
			return this;
		}

		/**
		 * Adds one warning (a sentence a user can act on) to the run's {@value Provenance#WARNINGS} list, which
		 * reports show at the top. Blank or repeated warnings are ignored.
		 */
		@SuppressWarnings("unchecked")
		public Builder warning(final String text) {
			if (text == null || text.isBlank()) return this;
			final Object existing = p.run.get(WARNINGS);
			final List<Object> list = existing instanceof List<?> l ? (List<Object>) l : new ArrayList<>();
			if (!list.contains(text)) list.add(text);
			p.run.put(WARNINGS, list);
			return this;
		}

		public Builder versions(final String parfocal, final String imagej, final String java) {
			p.parfocalVersion = parfocal;
			p.imagejVersion = imagej;
			p.javaVersion = java;
			p.fft = fftLibrary();
			return this;
		}

		/** The FFT backend that transforms made now use, described (its selection error if the selection is wrong). */
		private static String fftLibrary() {
			try {
				return org.parfocal.fft.FftBackend.selected().description();
			} catch (final IllegalArgumentException e) {
				return e.getMessage();
			}
		}

		public Builder timing(final double seconds, final int threads, final String isoDate) {
			p.seconds = seconds;
			p.threads = threads;
			p.date = isoDate;
			return this;
		}

		public Provenance build() {
			return p;
		}
	}
}
