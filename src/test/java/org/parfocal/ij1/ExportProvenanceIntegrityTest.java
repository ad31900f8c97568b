package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.function.Consumer;

import com.google.gson.JsonArray;
import com.google.gson.JsonNull;
import com.google.gson.JsonObject;
import com.google.gson.JsonParser;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.Provenance;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/**
 * Export Provenance as Macro against hostile titles and records (issue 13.3, 13.8) and on the sample workflow
 * (issue 17.2). The macro language's string rules (quotes and backslashes escaped inside "...") are ImageJ's;
 * the checks replay the written macro in ImageJ's own interpreter.
 */
class ExportProvenanceIntegrityTest {

	@TempDir
	Path dir;

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** Saves a small cell as {@code name} in {@code dir}, reopens it from the file (so it is file-backed) and returns it. */
	private ImagePlus fileBacked(final String name, final long seed) {
		final Path f = dir.resolve(name);
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(24, 24, 6, seed).withVoxelSize(VoxelSize.microns(0.08, 0.08, 0.2)), name))
				.saveAsTiff(f.toString()));
		final ImagePlus imp = IJ.openImage(f.toString());
		Interpreter.batchMode = true;
		Interpreter.addBatchModeImage(imp);
		return imp;
	}

	private ImagePlus psf() {
		final ImagePlus psf = ImageBridge.toImagePlus(SampleScene.gaussianPsf(5, 5, 3), "psf.tif");
		final Path f = dir.resolve("psf.tif");
		new FileSaver(psf).saveAsTiff(f.toString());
		final ImagePlus opened = IJ.openImage(f.toString());
		Interpreter.addBatchModeImage(opened);
		return opened;
	}

	private ImagePlus convolve(final ImagePlus object, final ImagePlus psf) {
		final ImagePlus out = ImageJHarness.run(object, "Convolve with PSF...", "image=[" + object.getTitle() + "] psf=" + psf.getTitle()
				+ " boundary=zero normalize background=0 photons=0 seed=1 offset=0").onlyCreated();
		Interpreter.addBatchModeImage(out);
		return out;
	}

	private String export(final ImagePlus imp, final String name) throws Exception {
		final Path macro = dir.resolve(name);
		ImageJHarness.run(imp, "Export Provenance as Macro...", "macro=[" + macro + "]");
		return Files.readString(macro);
	}

	/** A title from a file name that closes the string and calls File.saveString: the macro replays it as text, no code runs. */
	@Test
	void injectedTitleStaysText() throws Exception {
		final Path sentinel = Path.of(System.getProperty("java.io.tmpdir"), "parfocal-h13b-pwned.txt");
		Files.deleteIfExists(sentinel);
		final String name = "x\"+File.saveString(\"owned\",getDirectory(\"temp\")+\"parfocal-h13b-pwned.txt\")+\".tif";
		final ImagePlus object = fileBacked(name, 3);
		assertEquals(name, object.getTitle());
		final ImagePlus out = convolve(object, psf());
		final String text = export(out, "rebuild.ijm");
		ImageJHarness.runMacro(text, null);
		assertFalse(Files.exists(sentinel), "the title ran as code:\n" + text);
		// and the rebuild is the same image, its input opened under the hostile title
		final String rebuilt = dir.resolve("rebuilt.tif").toString();
		ImageJHarness.runMacro(text, rebuilt);
		ImageJHarness.assertSamePixels(out, IJ.openImage(rebuilt), 0);
		assertFalse(Files.exists(sentinel));
	}

	/** Edits the JSON of {@code imp}'s record. */
	private static void tamper(final ImagePlus imp, final Consumer<JsonObject> edit) {
		final String info = (String) imp.getProperty("Info");
		final int b = info.lastIndexOf(Provenance.JSON_BEGIN) + Provenance.JSON_BEGIN.length();
		final JsonObject json = JsonParser.parseString(info.substring(b, info.indexOf(Provenance.END, b)).trim()).getAsJsonObject();
		edit.accept(json);
		imp.setProperty("Info", Provenance.JSON_BEGIN + "\n" + json + "\n" + Provenance.END + "\n");
	}

	private static String exportFails(final ImagePlus imp, final Path macro) {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(imp, "Export Provenance as Macro...", "macro=[" + macro + "]"));
		assertFalse(Files.exists(macro), "nothing written");
		assertFalse(e.getMessage().contains("\n") || e.getMessage().contains("Exception"), e.getMessage());
		return e.getMessage();
	}

	/** A tampered record is refused before a file is written: code in the macro field, in a value, in a key, a newline in a title. */
	@Test
	void tamperedRecordsAreRefused() throws Exception {
		final ImagePlus out = convolve(fileBacked("cell.tif", 3), psf());
		final Path m = dir.resolve("m.ijm");
		final String good = (String) out.getProperty("Info");
		// the macro field is never copied: code there does not reach the macro
		tamper(out, j -> j.addProperty("macro", "File.saveString(\"x\", \"/tmp/x\");"));
		final String text = export(out, "from-macro-field.ijm");
		assertFalse(text.contains("saveString"), text);
		out.setProperty("Info", good);
		tamper(out, j -> j.getAsJsonObject("options").addProperty("seed", "1\"); File.saveString(\"x\", \"/tmp/x\"); //"));
		assertTrue(exportFails(out, m).contains("holds a value for seed= that is not a number"));
		out.setProperty("Info", good);
		tamper(out, j -> j.getAsJsonObject("options").addProperty("seed\"); exec(\"sh\"); //", "1"));
		assertTrue(exportFails(out, m).contains("holds a key it does not have"));
		out.setProperty("Info", good);
		tamper(out, j -> j.addProperty("command", "Run Anything"));
		assertTrue(exportFails(out, m).contains("not Parfocal's"));
		out.setProperty("Info", good);
		tamper(out, j -> j.getAsJsonArray("inputs").get(0).getAsJsonObject().addProperty("title", "a\nexec(\"sh\");"));
		assertTrue(exportFails(out, m).contains("holds a line break"));
		out.setProperty("Info", good);
		tamper(out, j -> j.getAsJsonArray("inputs").get(0).getAsJsonObject().addProperty("sha256", "\"); exec(\"sh\"); //"));
		assertTrue(exportFails(out, m).contains("SHA-256 that is not one"));
	}

	/** Issue 13.8: a record with a null input and one nested 3000 deep are one line each, for Export and Write Report. */
	@Test
	void brokenRecordsAreOneLine() throws Exception {
		final ImagePlus out = convolve(fileBacked("cell.tif", 3), psf());
		final String good = (String) out.getProperty("Info");
		tamper(out, j -> j.getAsJsonArray("inputs").set(0, JsonNull.INSTANCE));
		assertTrue(exportFails(out, dir.resolve("a.ijm")).contains("has an empty input"));
		final ImageJCommandException r = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(out, "Write Report...", "file=[" + dir.resolve("r.html") + "]"));
		assertFalse(r.getMessage().contains("Exception"), r.getMessage());
		out.setProperty("Info", good);
		// 3000 nested records, written as text (Gson's own writer would overflow the stack too)
		final String info = good.substring(good.lastIndexOf(Provenance.JSON_BEGIN) + Provenance.JSON_BEGIN.length(), good.lastIndexOf(Provenance.END)).trim();
		final StringBuilder deep = new StringBuilder(info.substring(0, info.length() - 1)).append(",\"inputs\":[");
		for (int i = 0; i < 3000; i++) deep.append("{\"role\":\"image\",\"title\":\"t").append(i).append("\",\"source\":{\"command\":\"Convolve with PSF\",\"inputs\":[");
		for (int i = 0; i < 3000; i++) deep.append("]}}");
		deep.append("]}");
		out.setProperty("Info", Provenance.JSON_BEGIN + "\n" + deep + "\n" + Provenance.END + "\n");
		assertTrue(exportFails(out, dir.resolve("b.ijm")).contains("nested too deeply"));
		// as an input of another command the damaged record is not Parfocal's: the run goes on, without a trace
		final ImagePlus again = ImageJHarness.run(out, "Convolve with PSF...", "image=[" + out.getTitle() + "] psf=psf.tif boundary=zero normalize "
				+ "background=0 photons=0 seed=1 offset=0").onlyCreated();
		assertTrue(org.parfocal.ij1.ImageProvenance.of(again).isPresent());
	}

	/** Issue 13.3: a swapped input file stops the rebuild with one line before anything runs on it. */
	@Test
	void swappedInputFileStopsTheRebuild() throws Exception {
		final ImagePlus object = fileBacked("cell.tif", 3);
		final ImagePlus out = convolve(object, psf());
		final String text = export(out, "rebuild.ijm");
		ImageJHarness.closeAll();
		// another cell under the same name
		Files.delete(dir.resolve("cell.tif"));
		fileBacked("cell.tif", 4);
		ImageJHarness.closeAll();
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.runMacro(text, null));
		assertTrue(e.getMessage().contains("Macro failed: input file differs from the recorded one (SHA-256 of its pixels): " + dir.resolve("cell.tif")),
				e.getMessage());
	}

	/** Issue 17.2: the sample workflow (Make Sample Stacks → Deconvolve) exports and rebuilds bit for bit, in a fresh JVM. */
	@Test
	void sampleWorkflowExportsAndRebuilds() throws Exception {
		Interpreter.batchMode = true;
		final java.util.List<ImagePlus> samples = ImageJHarness.run(null, "Make Sample Stacks", "").created();
		for (final ImagePlus s : samples) Interpreter.addBatchModeImage(s);
		final ImagePlus rec = samples.stream().filter(s -> s.getTitle().equals("quillwort-widefield.tif")).findFirst().orElseThrow();
		final ImagePlus out = ImageJHarness.run(rec, "Deconvolve...", "image=quillwort-widefield.tif psf=quillwort-psf.tif method=richardson-lucy "
				+ "iterations=3 offset=100 background=auto").onlyCreated();
		Interpreter.addBatchModeImage(out);
		final Path macro = dir.resolve("sample-rebuild.ijm");
		ImageJHarness.run(out, "Export Provenance as Macro...", "macro=[" + macro + "]");
		final String text = Files.readString(macro);
		assertTrue(text.contains("run(\"Make Sample Stacks\");"), text);
		final Path rebuilt = dir.resolve("rebuilt.tif");
		final ImageJHarness.HeadlessRun run = ImageJHarness.runHeadlessJvm(macro, rebuilt.toString());
		assertEquals(0, run.exitCode(), run.stderr() + run.stdout());
		ImageJHarness.assertSamePixels(out, IJ.openImage(rebuilt.toString()), 0);
	}
}
