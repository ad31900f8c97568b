package org.parfocal.cli;

import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.FileSystems;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.PathMatcher;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Optional;
import java.util.stream.Stream;

import ij.ImagePlus;
import ij.Undo;
import ij.WindowManager;
import ij.io.FileInfo;
import ij.io.TiffDecoder;
import ij.macro.Interpreter;

import org.parfocal.core.MemoryBudget;
import org.parfocal.core.OutputFiles;
import org.parfocal.provenance.Provenance;

/**
 * Runs one recipe (an ImageJ macro) on every stack of a folder, headless, for facility batch work.
 *
 * <pre>
 * BatchRunner recipe.ijm input-folder output-folder [psf-map.csv]
 * </pre>
 *
 * For each {@code .tif}/{@code .tiff} file of the input folder, in name order, a fresh macro run opens the PSF the
 * map assigns to it (if any), opens the stack, runs the recipe, and saves the image the recipe leaves current as
 * {@code <output-folder>/<stack name>-<recipe name>.tif}. The recipe sees the variables {@code inputPath},
 * {@code inputTitle}, {@code psfPath}, {@code psfTitle} (empty without a map entry) and {@code outputDir}.
 * <p>
 * Each stack runs alone: every image is closed (and its memory freed) before and after it, and its PSF opens
 * under a title no other image holds ({@code batch-psf-N-<file name>}). The output's provenance record must name
 * the mapped PSF file under that title, or the stack fails. Stacks and PSFs are checked before opening
 * ({@link TiffCheck}: empty, not a TIFF, truncated).
 * <p>
 * A stack that cannot be opened or whose recipe fails is logged and skipped; the batch goes on. Inputs are never
 * written: the output folder must differ from the input folder, and an existing output file is never replaced,
 * also by another batch writing into the same folder at once: outputs and the summary are written under hidden
 * names and published with {@link OutputFiles} (a numbered name when taken). {@code summary.csv} in the output folder lists every stack with its status, message,
 * output and time. Exit code 0 when every stack succeeded, 1 when any failed, 2 for bad usage.
 * <p>
 * The PSF map is a CSV of {@code pattern,psf} lines (a {@code #} starts a comment): the first glob pattern that
 * matches the stack's file name gives its PSF file (relative paths are taken from the map's folder). A PSF file
 * with one channel per image channel gives each channel its own PSF.
 */
public final class BatchRunner {

	/** One line of the summary. */
	public record Row(String file, boolean ok, String message, String output, double seconds) {}

	private BatchRunner() {}

	public static void main(final String[] args) {
		System.exit(runMain(args));
	}

	static int runMain(final String[] args) {
		if (args.length < 3 || args.length > 4) {
			System.err.println("Usage: BatchRunner <recipe.ijm> <input folder> <output folder> [psf-map.csv]");
			return HeadlessMacro.EXIT_USAGE;
		}
		final String setup = HeadlessMacro.setupProblem();
		if (setup != null) {
			System.err.println(setup);
			return HeadlessMacro.EXIT_USAGE;
		}
		try {
			final List<Row> rows = run(Path.of(args[0]), Path.of(args[1]), Path.of(args[2]), args.length > 3 ? Path.of(args[3]) : null);
			final long failed = rows.stream().filter(r -> !r.ok()).count();
			System.out.println("Batch: " + (rows.size() - failed) + " of " + rows.size() + " stacks done, " + failed + " failed; summary in "
					+ Path.of(args[2]).resolve("summary.csv"));
			return failed == 0 ? 0 : HeadlessMacro.EXIT_FAILED;
		} catch (final IllegalArgumentException e) {
			System.err.println("Batch not started: " + e.getMessage());
			return HeadlessMacro.EXIT_USAGE;
		}
	}

	/**
	 * Runs the batch; returns one row per stack (also written to {@code summary.csv}).
	 *
	 * @throws IllegalArgumentException (one line) when the batch cannot start: missing recipe or folders, the
	 *         output folder equal to or inside the input folder, an unwritable output folder, a bad map
	 */
	public static List<Row> run(final Path recipe, final Path inputDir, final Path outputDir, final Path psfMap) {
		final String recipeText;
		try {
			recipeText = Files.readString(recipe, StandardCharsets.UTF_8);
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot read the recipe " + recipe + ": " + e.getMessage());
		}
		if (!Files.isDirectory(inputDir)) throw new IllegalArgumentException("Input folder " + inputDir + " does not exist");
		final Path in = inputDir.toAbsolutePath().normalize(), out = outputDir.toAbsolutePath().normalize();
		if (out.equals(in)) throw new IllegalArgumentException("The output folder must differ from the input folder (inputs are never overwritten)");
		try {
			Files.createDirectories(out);
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot create the output folder " + out + ": " + e.getMessage());
		}
		if (!Files.isWritable(out)) throw new IllegalArgumentException("The output folder " + out + " is not writable");
		final List<String[]> map = psfMap == null ? List.of() : readMap(psfMap);
		final String recipeName = stripExtension(recipe.getFileName().toString());
		final List<Path> stacks;
		try (Stream<Path> s = Files.list(in)) {
			stacks = s.filter(p -> Files.isRegularFile(p) && p.getFileName().toString().toLowerCase(Locale.ROOT).matches(".*\\.tiff?")).sorted().toList();
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot list " + in + ": " + e.getMessage());
		}
		if (stacks.isEmpty()) throw new IllegalArgumentException("No .tif stacks in " + in);
		final List<Row> rows = new ArrayList<>();
		final boolean traceHeap = Boolean.getBoolean("parfocal.batch.heap");
		int index = 0;
		for (final Path stack : stacks) {
			index++;
			final long t0 = System.nanoTime();
			final String name = stack.getFileName().toString();
			final String psf = psfFor(name, map, psfMap);
			final String targetName = stripExtension(name) + "-" + recipeName + ".tif";
			// ImageJ's saveAs adds .tif to any other name: the hidden temporary name keeps it
			final Path tmp = out.resolve(OutputFiles.temporary(out, targetName).getFileName() + ".tif");
			String message = null;
			Path published = null;
			// ImageJ's images are per JVM: batches running on several threads of one JVM take turns per stack
			synchronized (HeadlessMacro.class) {
				closeAllImages(); // each stack starts alone: no window of an earlier stack can be picked by title
				try {
					message = fileProblem(stack, psf);
					if (message == null) {
						final String psfTitle = psf.isEmpty() ? "" : uniqueTitle("batch-psf-" + index + "-" + Path.of(psf).getFileName(), name);
						final String prologue = prologue(stack, psf, psfTitle, out);
						final HeadlessMacro.Outcome o = HeadlessMacro.run(prologue + recipeText + epilogue(tmp), null);
						if (o.failed()) message = recipeLine(o, prologue);
						else if (!Files.isRegularFile(tmp)) message = "the recipe wrote no output";
						else message = psfProvenanceProblem(tmp, psf, psfTitle);
						if (message == null) published = OutputFiles.publish(tmp, out, targetName);
					}
				} catch (final IOException | RuntimeException e) {
					message = "cannot write the output: " + TiffBlockSource.oneLine(e);
				} catch (final OutOfMemoryError e) {
					message = "out of memory (" + MemoryBudget.format(Runtime.getRuntime().maxMemory()) + " heap); give the batch more heap (PARFOCAL_JAVA_OPTS=-Xmx...)";
				} finally {
					closeAllImages();
					try {
						Files.deleteIfExists(tmp);
					} catch (final IOException e) {
						System.err.println("Could not delete the temporary file " + tmp + ": " + TiffBlockSource.oneLine(e));
					}
				}
			}
			final boolean ok = message == null;
			final double sec = (System.nanoTime() - t0) / 1e9;
			rows.add(new Row(name, ok, ok ? "" : message, ok ? published.getFileName().toString() : "", sec));
			System.out.println((ok ? "done   " : "FAILED ") + name + (ok ? " -> " + published.getFileName() : ": " + message));
			if (traceHeap) {
				System.gc();
				final Runtime rt = Runtime.getRuntime();
				System.out.println("heap after stack " + index + ": " + (rt.totalMemory() - rt.freeMemory()) + " bytes");
			}
		}
		writeSummary(out, rows);
		return rows;
	}

	/** Why the stack or its PSF cannot be processed (empty, not a TIFF, truncated, …), or null. */
	private static String fileProblem(final Path stack, final String psf) {
		final String p = TiffCheck.problem(stack);
		if (p != null) return p;
		if (psf.isEmpty()) return null;
		final Path f = Path.of(psf);
		final String q = TiffCheck.hasTiffName(f) ? TiffCheck.problem(f) : Files.isRegularFile(f) ? null : psf + " does not exist";
		return q == null ? null : "the PSF " + q;
	}

	/** {@code title}, with a number added while another open image (or the stack's own title) holds it. */
	private static String uniqueTitle(final String title, final String stackTitle) {
		String t = title;
		for (int i = 2; t.equals(stackTitle) || WindowManager.getImage(t) != null; i++) t = title + "-" + i;
		return t;
	}

	/**
	 * Checks in the output's provenance record that every PSF it used from a file is the mapped file, opened
	 * under this stack's own PSF title; returns the one-line mismatch, or null.
	 */
	static String psfProvenanceProblem(final Path output, final String mapped, final String psfTitle) throws IOException {
		if (mapped.isEmpty()) return null;
		final Path abs = output.toAbsolutePath();
		final FileInfo[] info = new TiffDecoder(abs.getParent() + File.separator, abs.getFileName().toString()).getTiffInfo();
		final String text = info == null || info.length == 0 ? null : info[0].info;
		final Optional<Provenance> record;
		try {
			record = Provenance.findIn(text);
		} catch (final IllegalArgumentException e) {
			return "the output's provenance record cannot be read: " + TiffBlockSource.oneLine(e);
		}
		if (record.isEmpty()) return null; // not made by a Parfocal command: nothing recorded to check
		final Path want = Path.of(mapped).toAbsolutePath().normalize();
		final List<Provenance.Input> psfs = new ArrayList<>();
		collectPsfInputs(record.get(), psfs, 0);
		for (final Provenance.Input in : psfs) {
			if (in.path() == null) continue; // a PSF made inside the recipe: its own record names its inputs
			if (!Path.of(in.path()).toAbsolutePath().normalize().equals(want) || !psfTitle.equals(in.title()))
				return "the output was made with the PSF " + in.path() + " (image '" + in.title() + "'), not the mapped " + want + " ('" + psfTitle + "')";
		}
		return null;
	}

	private static void collectPsfInputs(final Provenance p, final List<Provenance.Input> out, final int depth) {
		if (p == null || depth > 100) return;
		for (final Provenance.Input in : p.inputs()) {
			if (in == null) continue;
			if ("psf".equals(in.role())) out.add(in);
			collectPsfInputs(in.source(), out, depth + 1);
		}
	}

	/**
	 * Closes every image ImageJ holds (the macro's batch-mode images and any others) and frees their pixels, so
	 * the next stack starts alone and memory stays flat over a long batch.
	 */
	static void closeAllImages() {
		final int[] ids = WindowManager.getIDList();
		if (ids != null) for (final int id : ids) {
			final ImagePlus imp = WindowManager.getImage(id);
			if (imp == null) continue;
			imp.changes = false;
			Interpreter.removeBatchModeImage(imp);
			imp.close();
			imp.flush();
		}
		WindowManager.setTempCurrentImage(null);
		Undo.reset();
	}

	private static String prologue(final Path stack, final String psf, final String psfTitle, final Path out) {
		return "setBatchMode(true);\n" //
				+ "inputPath = \"" + esc(stack.toAbsolutePath().toString()) + "\";\n" //
				+ "outputDir = \"" + esc(out.toString()) + "\";\n" //
				+ "psfPath = \"" + esc(psf) + "\"; psfTitle = \"\";\n" //
				+ "if (psfPath != \"\") { n0 = nImages; open(psfPath); if (nImages == n0) exit(\"Error: cannot open the PSF \" + psfPath); rename(\""
				+ esc(psfTitle) + "\"); psfTitle = getTitle(); }\n" //
				+ "n0 = nImages; open(inputPath); if (nImages == n0) exit(\"Error: cannot open \" + inputPath + \" (not a readable TIFF?)\");\n" //
				+ "inputTitle = getTitle();\n";
	}

	private static String epilogue(final Path target) {
		return "\nif (nImages == 0) exit(\"Error: the recipe left no image\");\n" //
				+ "if (getTitle() == inputTitle) exit(\"Error: the recipe left the input as the current image; it must leave its result\");\n" //
				+ "saveAs(\"Tiff\", \"" + esc(target.toString()) + "\");\n";
	}

	/** The failure line with the line number counted in the recipe, not in the generated macro. */
	private static String recipeLine(final HeadlessMacro.Outcome o, final String prologue) {
		final int pl = (int) prologue.chars().filter(c -> c == '\n').count();
		final String msg = o.errorMessage().strip().replaceAll("\\s*\\R\\s*", " ");
		return o.line() > pl ? msg + " (recipe line " + (o.line() - pl) + ")" : msg;
	}

	private static List<String[]> readMap(final Path map) {
		final List<String[]> rows = new ArrayList<>();
		try {
			for (final String line : Files.readAllLines(map, StandardCharsets.UTF_8)) {
				final String l = line.strip();
				if (l.isEmpty() || l.startsWith("#")) continue;
				final int comma = l.indexOf(',');
				if (comma <= 0) throw new IllegalArgumentException("PSF map " + map + ": expected 'pattern,psf' but found '" + l + "'");
				final String pattern = l.substring(0, comma).strip(), file = l.substring(comma + 1).strip();
				if (pattern.equalsIgnoreCase("pattern")) continue; // header
				Path p = Path.of(file);
				if (!p.isAbsolute()) p = map.toAbsolutePath().getParent().resolve(p).normalize();
				if (!Files.isRegularFile(p)) throw new IllegalArgumentException("PSF map " + map + ": PSF file " + p + " does not exist");
				rows.add(new String[] { pattern, p.toString() });
			}
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot read the PSF map " + map + ": " + e.getMessage());
		}
		return rows;
	}

	private static String psfFor(final String name, final List<String[]> map, final Path mapFile) {
		for (final String[] m : map) {
			final PathMatcher pm = FileSystems.getDefault().getPathMatcher("glob:" + m[0]);
			if (pm.matches(Path.of(name))) return m[1];
		}
		return "";
	}

	private static void writeSummary(final Path dir, final List<Row> rows) {
		final StringBuilder sb = new StringBuilder("file,status,message,output,seconds\n");
		for (final Row r : rows)
			sb.append(csvField(r.file())).append(',').append(r.ok() ? "ok" : "failed").append(',').append(csvField(r.message())).append(',')
					.append(csvField(r.output())).append(',').append(String.format(Locale.ROOT, "%.2f", r.seconds())).append('\n');
		try {
			OutputFiles.write(dir, "summary.csv", sb.toString().getBytes(StandardCharsets.UTF_8));
		} catch (final IOException e) {
			System.err.println("Cannot write the summary in " + dir + ": " + e.getMessage());
		}
	}

	private static String csvField(final String s) {
		return s.contains(",") || s.contains("\"") ? "\"" + s.replace("\"", "\"\"") + "\"" : s;
	}

	private static String esc(final String s) {
		return s.replace("\\", "\\\\").replace("\"", "\\\"").replace("\n", "\\n").replace("\r", "\\r");
	}

	static String stripExtension(final String name) {
		final int dot = name.lastIndexOf('.');
		return dot > 0 ? name.substring(0, dot) : name;
	}
}
