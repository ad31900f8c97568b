package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.cli.HeadlessMacro;
import org.parfocal.testing.ImageJHarness;

/**
 * The commands' result tables read by macros through {@link HeadlessMacro}: ImageJ 1.x finds named tables only
 * through windows, so {@code MacroFunctions.selectTable} copies the asked table into the Results table, where
 * {@code nResults}, {@code getResult} and {@code getResultString} read it with or without a display, and
 * {@code Table.get}/{@code Table.getColumn} with the title "Results" without one.
 */
class ResultTablesMacroTest {

	private static final String SELECT = "call(\"org.parfocal.ij1.MacroFunctions.selectTable\", ";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** Lines "key=value" the macro printed. */
	private static Map<String, String> printed(final String macro) {
		final HeadlessMacro.Outcome out = ImageJHarness.runMacro(macro, null);
		assertEquals(null, out.errorMessage(), "macro error; log: " + out.log());
		final Map<String, String> m = new LinkedHashMap<>();
		for (final String line : out.log()) {
			final int eq = line.indexOf('=');
			if (line.startsWith("T ") && eq > 0) m.put(line.substring(2, eq), line.substring(eq + 1));
		}
		return m;
	}

	@Test
	void psfFromOpticsFwhmTableWithoutTheProfiles() {
		final Map<String, String> p = printed("""
				setBatchMode(true);
				function column(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResult(c, i); return a; }
				function strings(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResultString(c, i); return a; }
								run("PSF from Optics...", "model=gaussian modality=widefield na=1.2 immersion_index=1.33 sample_index=1.33 emission=0.52 voxel_xy=0.08 voxel_z=0.2 size_xy=11 size_z=7");
				n = %s"PSF FWHM");
				print("T rows=" + n); print("T nResults=" + nResults);
				print("T axis=" + getResultString("Axis", 2));
				nyq = column("Nyquist step (µm)");
				print("T nyquist_xy=" + d2s(nyq[0], 9)); print("T nyquist_z=" + d2s(nyq[2], 9));
				print("T step_z=" + d2s(getResult("Voxel step (µm)", 2), 9));
				""".formatted(SELECT));
		assertEquals("3", p.get("rows"));
		assertEquals("3", p.get("nResults"));
		assertEquals("axial z", p.get("axis"));
		// Nyquist sampling of a widefield microscope (e.g. Pawley, Handbook of Biological Confocal Microscopy; from
		// memory): λ/(4 NA) laterally, λ/(2 n (1 − cos α)) axially with sin α = NA/n
		assertEquals(0.52 / (4 * 1.2), Double.parseDouble(p.get("nyquist_xy")), 1e-9);
		assertEquals(0.52 / (2 * 1.33 * (1 - Math.cos(Math.asin(1.2 / 1.33)))), Double.parseDouble(p.get("nyquist_z")), 1e-9);
		assertEquals(0.2, Double.parseDouble(p.get("step_z")), 1e-12);
	}

	@Test
	void psfFromBeadsPerBeadAndFwhmTablesEachInTurn() {
		ImageJHarness.open(PsfFromBeadsCommandTest.beads("beads.tif"));
		final Map<String, String> p = printed("""
				setBatchMode(true);
				function column(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResult(c, i); return a; }
				function strings(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResultString(c, i); return a; }
								run("PSF from Beads...", "%s");
				print("T beads=" + %s"Beads")); print("T beads_nResults=" + nResults);
				status = strings("Status"); accepted = 0;
				for (i = 0; i < status.length; i++) if (status[i] == "accepted") accepted++;
				print("T accepted=" + accepted);
				print("T fwhm=" + %s"Bead PSF FWHM")); print("T fwhm_nResults=" + nResults);
				print("T axis=" + getResultString("Axis", 0));
				""".formatted(PsfFromBeadsCommandTest.OPTIONS, SELECT, SELECT));
		// the generator's scene: four beads plus one at the edge (BeadsForCommandTests)
		assertEquals("5", p.get("beads"));
		assertEquals("5", p.get("beads_nResults"));
		assertEquals("4", p.get("accepted"));
		assertEquals(p.get("fwhm"), p.get("fwhm_nResults"), "nResults is the selected table's");
		assertTrue(Integer.parseInt(p.get("fwhm")) >= 2 && !p.get("fwhm").equals("5"), p.toString());
		assertTrue(p.get("axis").startsWith("lateral") || p.get("axis").startsWith("x"), p.get("axis"));
	}

	@Test
	void blindPsfHistoryTableTravelsWithTheHistoryIntoItsTiff(@TempDir final Path dir) {
		ImageJHarness.open(org.parfocal.scijava.SciJavaTestImages.recorded("cell.tif"));
		final Map<String, String> p = printed("""
				setBatchMode(true);
				function column(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResult(c, i); return a; }
				function strings(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResultString(c, i); return a; }
								run("Blind Deconvolve...", "image=cell.tif psf=gaussian fwhm_xy=0.3 fwhm_z=0.8 iterations=4 snapshot_interval=2 offset=100");
				print("T table=" + %s"cell-blind-psf-history (table)"));
				print("T history=" + %s"cell-blind-psf-history.tif"));
				it = column("Iteration"); sum = column("Sum"); fw = column("FWHM lateral (µm)");
				s = ""; for (i = 0; i < it.length; i++) s = s + it[i] + "/" + d2s(sum[i], 6) + "/" + d2s(fw[i], 9) + " ";
				print("T rows=" + s);
				selectImage("cell-blind-psf-history.tif");
				saveAs("Tiff", "%s");
				close();
				open("%s");
				print("T reopened=" + %s getTitle()));
				it = column("Iteration"); sum = column("Sum"); fw = column("FWHM lateral (µm)");
				s = ""; for (i = 0; i < it.length; i++) s = s + it[i] + "/" + d2s(sum[i], 6) + "/" + d2s(fw[i], 9) + " ";
				print("T rows_reopened=" + s);
				""".formatted(SELECT, SELECT, dir.resolve("history.tif"), dir.resolve("history.tif"), SELECT));
		assertEquals("3", p.get("table"), "snapshots at iterations 0, 2, 4");
		assertEquals("3", p.get("history"));
		final List<String> rows = new ArrayList<>(List.of(p.get("rows").strip().split(" ")));
		assertEquals(3, rows.size());
		for (int i = 0; i < 3; i++) {
			final String[] f = rows.get(i).split("/");
			assertEquals(2 * i, Integer.parseInt(f[0]), "iteration");
			assertEquals(1.0, Double.parseDouble(f[1]), 1e-5, "a PSF has unit sum");
		}
		assertEquals("3", p.get("reopened"));
		assertNotNull(p.get("rows_reopened"));
		assertEquals(p.get("rows"), p.get("rows_reopened"), "the table saved in the history's TIFF");
	}

	@Test
	void comparisonTable(@TempDir final Path dir) throws Exception {
		CompareWithReferencesCommandTest.writeReferences(dir, 2);
		ImageJHarness.open(CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.deconvolved(), "result.tif"),
				CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.recording(), "recording.tif"),
				CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.psf(), "psf.tif"));
		final Map<String, String> p = printed("""
				setBatchMode(true);
				function column(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResult(c, i); return a; }
				function strings(c) { a = newArray(nResults); for (i = 0; i < nResults; i++) a[i] = getResultString(c, i); return a; }
								run("Compare with Sharp References...", "result=result.tif reference_folder=[%s] input=recording.tif psf=psf.tif offset=100 background=5 patches=2048 bootstrap=10 seed=3");
				print("T rows=" + %s"Reference comparison of result")); print("T nResults=" + nResults);
				prop = strings("property"); v = column("value");
				print("T last=" + prop[prop.length - 1]); print("T before_last=" + prop[prop.length - 2]);
				print("T chi=" + d2s(v[v.length - 2], 9)); print("T first=" + prop[0] + ":" + d2s(getResult("value", 0), 9));
				""".formatted(dir, SELECT));
		assertEquals(p.get("rows"), p.get("nResults"));
		assertTrue(Integer.parseInt(p.get("rows")) >= 3, p.toString());
		assertEquals("re-blur whiteness", p.get("last"));
		assertEquals("re-blur chi-square", p.get("before_last"));
		final double chi = Double.parseDouble(p.get("chi"));
		assertTrue(chi > 0 && Double.isFinite(chi), "a chi-square is positive: " + chi);
	}

	@Test
	void tableFunctionsReadTheSelectedTableWithoutADisplay() {
		org.junit.jupiter.api.Assumptions.assumeFalse(ImageJHarness.hasDisplay(), "with a display, Table functions read windows");
		final Map<String, String> p = printed("""
				setBatchMode(true);
				run("PSF from Optics...", "model=gaussian modality=widefield na=1.2 immersion_index=1.33 sample_index=1.33 emission=0.52 voxel_xy=0.08 voxel_z=0.2 size_xy=11 size_z=7");
				n = %s"PSF FWHM");
				nyq = Table.getColumn("Nyquist step (µm)", "Results");
				print("T nyquist_xy=" + d2s(nyq[0], 9)); print("T axis=" + Table.getString("Axis", 2, "Results"));
				print("T step_z=" + d2s(Table.get("Voxel step (µm)", 2, "Results"), 9)); print("T size=" + Table.size("Results"));
				""".formatted(SELECT));
		assertEquals(0.52 / (4 * 1.2), Double.parseDouble(p.get("nyquist_xy")), 1e-9, "λ/(4 NA)");
		assertEquals("axial z", p.get("axis"));
		assertEquals(0.2, Double.parseDouble(p.get("step_z")), 1e-12);
		assertEquals("3", p.get("size"));
	}

	@Test
	void anUnknownTableIsOneLineAndStopsTheMacro() {
		final org.parfocal.testing.ImageJCommandException e = org.junit.jupiter.api.Assertions.assertThrows(
				org.parfocal.testing.ImageJCommandException.class, () -> ImageJHarness.runMacro(SELECT + "\"no such table\");\nprint(\"went on\");", null));
		assertTrue(e.getMessage().contains("selectTable: No Parfocal table called 'no such table'"), e.getMessage());
		assertTrue(!e.getMessage().contains("\n"), "one line");
	}

	@Test
	void anUnknownTableNamesTheTablesThereAre() {
		// a title with the ".tif" the comparison table's title leaves out, say: the line lists the tables there are
		final String macro = "run(\"PSF from Optics...\", \"model=gaussian modality=widefield na=1.2 immersion_index=1.33 sample_index=1.33 emission=0.52 "
				+ "voxel_xy=0.08 voxel_z=0.2 size_xy=11 size_z=7\");\n" + SELECT + "\"PSF FWHM.tif\");";
		final org.parfocal.testing.ImageJCommandException e = org.junit.jupiter.api.Assertions.assertThrows(org.parfocal.testing.ImageJCommandException.class,
				() -> ImageJHarness.runMacro(macro, null));
		assertTrue(e.getMessage().contains("No Parfocal table called 'PSF FWHM.tif'") && e.getMessage().contains("the tables now: ")
				&& e.getMessage().contains("'PSF FWHM'"), e.getMessage());
		assertTrue(!e.getMessage().contains("\n"), "one line");
	}

}
