package org.parfocal.provenance;

import static org.junit.jupiter.api.Assertions.assertDoesNotThrow;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.google.gson.JsonObject;
import com.google.gson.JsonParser;

import org.junit.jupiter.api.Test;

class ProvenanceTest {

	private static Provenance sample() {
		final Provenance psf = Provenance.of("PSF from Optics", "na=1.2 wavelength=0.52").versions("0.1", "1.54p", "17").timing(0.5, 2, "2026-12-01T10:00:00Z").build();
		return Provenance.of("Convolve with PSF", "image=cell.tif psf=[the psf.tif] normalize seed=3")
				.input(new Provenance.Input("image", "cell.tif", "/data/cell.tif", "ab12", "8x8 c1 z3 t1 16-bit", null))
				.input(new Provenance.Input("psf", "the psf.tif", null, "cd34", "5x5 c1 z3 t1 32-bit", psf))
				.run("iterations", 20).run("stop", "relative change below 1e-4")
				.versions("0.1.0", "1.54p", "17.0.15").timing(1.25, 2, "2026-12-01T10:00:01Z").build();
	}

	@Test
	void warningsAreOneJsonListAndOlderSingleKeysAreStillRead() {
		final Provenance p = Provenance.of("Deconvolve", "image=a psf=b").warning("PSF touches its border").warning("").warning("PSF touches its border")
				.warning("Undersampled").build();
		// read back with a general JSON parser (Gson's JsonParser), not through our own reader
		final var list = JsonParser.parseString(p.toJson()).getAsJsonObject().getAsJsonObject("run").getAsJsonArray(Provenance.WARNINGS);
		assertEquals(2, list.size());
		assertEquals("Undersampled", list.get(1).getAsString());
		assertEquals(java.util.List.of("PSF touches its border", "Undersampled"), Provenance.fromJson(p.toJson()).warnings());
		final Provenance old = Provenance.of("PSF from Beads", "image=a").run("warning1", "few beads").run("warning2", "saturated").run("warning", "x").build();
		assertEquals(java.util.List.of("few beads", "saturated", "x"), old.warnings());
	}

	@Test
	void jsonParsesWithAGeneralJsonParserAndHoldsEveryOption() {
		final Provenance p = sample();
		final JsonObject o = JsonParser.parseString(p.toJson()).getAsJsonObject();
		assertEquals("Convolve with PSF", o.get("command").getAsString());
		final JsonObject options = o.getAsJsonObject("options");
		for (final String key : new String[] { "image", "psf", "normalize", "seed" }) assertTrue(options.has(key), key);
		assertEquals("the psf.tif", options.get("psf").getAsString());
		assertEquals("PSF from Optics", o.getAsJsonArray("inputs").get(1).getAsJsonObject().getAsJsonObject("source").get("command").getAsString());
	}

	@Test
	void infoTextRoundTripsAndTheLastRecordWins() {
		final Provenance p = sample();
		final String info = "Some microscope metadata\n" + Provenance.of("Other", "a=1").build().toInfoText() + p.toInfoText();
		final Provenance back = Provenance.findIn(info).orElseThrow();
		assertEquals(p.toJson(), back.toJson());
		assertEquals("run(\"Convolve with PSF...\", \"image=cell.tif psf=[the psf.tif] normalize seed=3\");", back.macro());
		assertEquals(20.0, ((Number) back.run().get("iterations")).doubleValue());
		assertTrue(Provenance.findIn("no record here").isEmpty());
		assertThrows(IllegalArgumentException.class, () -> Provenance.fromJson("{\"x\":1}"));
	}

	/** The report names commands by their menu labels (plugins.config): "..." only on commands with a dialog. */
	@Test
	void theReportNamesCommandsAsTheMenuDoes() {
		final Provenance sampleStack = Provenance.of("Make Sample Stacks", "").build();
		final Provenance run = Provenance.of("Deconvolve", "image=a.tif psf=b.tif")
				.input(new Provenance.Input("image", "a.tif", null, null, "8x8x4", sampleStack, null)).build();
		final String html = new HtmlReport(run, "a-deconvolved.tif").toHtml();
		assertTrue(html.contains("<b>Deconvolve...</b>"), "a command with a dialog");
		// the rerun line names the menu entry ImageJ knows (plugins.config), or the macro fails with "Unrecognized command"
		assertEquals("run(\"Make Sample Stacks\", \"\");", sampleStack.macro());
		assertTrue(assertDoesNotThrow(() -> java.nio.file.Files.readString(java.nio.file.Path.of("src/main/resources/plugins.config")))
				.contains("\"Make Sample Stacks\", org.parfocal.demo.MakeSampleStacks"));
		final int at = html.indexOf("Make Sample Stacks...");
		assertTrue(html.contains("Make Sample Stacks") && at < 0, () -> "the sample command has no dialog and no dots: " + html.substring(Math.max(0, at - 200), at + 40));
	}
}
