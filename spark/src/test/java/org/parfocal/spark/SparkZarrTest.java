package org.parfocal.spark;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaSparkContext;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.blocks.Recipe;
import org.parfocal.cli.BlockRunner;
import org.parfocal.cli.ZarrBlockRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.provenance.Provenance;
import org.parfocal.zarr.OmeZarr;

/**
 * The Spark runner with OME-Zarr in and out, in local mode with two workers and task retries ({@code local[2,2]}:
 * a failed task attempt is run again). The reference is the single-machine Zarr run ({@link ZarrBlockRunner}, checked
 * in the main project against the whole-stack engine and the in-memory block-wise run): the Spark output must
 * equal it float for float, also when one task attempt is stopped half-way through writing its chunks.
 */
class SparkZarrTest {

	static JavaSparkContext sc;

	@TempDir
	Path dir;

	@BeforeAll
	static void startSpark() {
		sc = new JavaSparkContext(new SparkConf().setMaster("local[2,2]").setAppName("SparkZarrTest").set("spark.ui.enabled", "false")
				.set("spark.driver.host", "127.0.0.1").set("spark.driver.bindAddress", "127.0.0.1"));
	}

	@AfterAll
	static void stopSpark() {
		if (sc != null) sc.close();
	}

	List<String> names(final Path d) throws Exception {
		try (Stream<Path> s = Files.list(d)) {
			return s.map(p -> p.getFileName().toString()).sorted().toList();
		}
	}

	static void assertSame(final Path want, final Path got) throws Exception {
		final OmeZarr a = OmeZarr.open(want), b = OmeZarr.open(got);
		assertEquals(a.frames(), b.frames());
		assertEquals(a.channels(), b.channels());
		assertArrayEquals(a.shape(), b.shape());
		for (int t = 0; t < a.frames(); t++)
			for (int c = 0; c < a.channels(); c++)
				assertArrayEquals(a.read(t, c, new int[3], a.shape()).data(), b.read(t, c, new int[3], b.shape()).data(), "frame " + t + ", channel " + c);
	}

	@Test
	void zarrBlocksWithAKilledTaskAttemptEqualACleanRun() throws Exception {
		final Volume psfA = SparkRunnerTest.psf(7, 5, 1.2, 1.0), psfB = SparkRunnerTest.psf(9, 5, 1.6, 1.1);
		final Path fa = dir.resolve("psf-a.tif"), fb = dir.resolve("psf-b.tif");
		SparkRunnerTest.write(psfA, fa);
		SparkRunnerTest.write(psfB, fb);
		final Path in = dir.resolve("cell.zarr");
		OmeZarr.write(in, 1, 2, List.of(SparkRunnerTest.recording(7, 56, 48, 20, psfA), SparkRunnerTest.recording(8, 56, 48, 20, psfB)),
				new int[] { 16, 16, 8 }, null);
		final Recipe recipe = BlockRunner.readRecipe(new SparkRunnerTest().recipe(fa, 10));
		final List<String> psfs = List.of(fa.toString(), fb.toString());
		final SparkRunner.Settings settings = new SparkRunner.Settings(0, new int[] { 20, 20, 10 }, 1);
		// the single-machine reference
		final Path ref = dir.resolve("ref.zarr");
		ZarrBlockRunner.run(recipe, psfs, in, ref, 0, new int[] { 20, 20, 10 }, Monitor.NONE);
		// a clean Spark run
		final Path clean = dir.resolve("clean.zarr");
		final SparkRunner.BlocksOutcome o = SparkRunner.runZarrBlocks(sc, recipe, psfs, in, clean, settings, null);
		assertTrue(o.plan().count() >= 8, o.plan().toString());
		assertSame(ref, clean);
		// one attempt stopped after writing two of its files; Spark runs it again
		final Path marker = dir.resolve("hook-fired"), killed = dir.resolve("killed.zarr");
		SparkRunner.runZarrBlocks(sc, recipe, psfs, in, killed, settings, marker.toString());
		assertTrue(Files.exists(marker), "the test hook stopped a task attempt");
		assertSame(ref, killed);
		assertSame(clean, killed);
		final Provenance p = Provenance.fromJson(OmeZarr.open(killed).provenanceJson());
		assertEquals("SparkRunner blocks", p.run().get("runner"));
		assertEquals(List.of("cell.zarr", "clean.zarr", "hook-fired", "killed.zarr", "psf-a.tif", "psf-b.tif", "ref.zarr"), names(dir),
				"no hidden output or fragment folder left");
	}

	/**
	 * {@code output=16-bit} into OME-Zarr (issue 17, item 9): Spark's uint16 output equals the single-machine 16-bit
	 * run, with the same recorded scale, one for both channels.
	 */
	@Test
	void sixteenBitZarrBlocksEqualTheSingleMachineRun() throws Exception {
		final Volume h = SparkRunnerTest.psf(7, 5, 1.2, 1.0);
		final Path psf = dir.resolve("psf.tif");
		SparkRunnerTest.write(h, psf);
		final Path in = dir.resolve("cell.zarr");
		OmeZarr.write(in, 1, 2, List.of(SparkRunnerTest.recording(3, 40, 36, 12, h), SparkRunnerTest.recording(4, 40, 36, 12, h)),
				new int[] { 16, 16, 8 }, null);
		final Recipe recipe = BlockRunner.readRecipe(new SparkRunnerTest().recipe(psf, 4) + " output=16-bit");
		final int[] tile = { 20, 20, 0 };
		final Path ref = dir.resolve("ref.zarr"), got = dir.resolve("spark.zarr");
		ZarrBlockRunner.run(recipe, null, in, ref, 0, tile, Monitor.NONE);
		SparkRunner.runZarrBlocks(sc, recipe, List.of(), in, got, new SparkRunner.Settings(0, tile, 1), null);
		assertEquals(org.parfocal.zarr.ZarrArray.UINT16, OmeZarr.open(got).array().dtype());
		assertSame(ref, got);
		final Provenance a = Provenance.fromJson(OmeZarr.open(ref).provenanceJson()), b = Provenance.fromJson(OmeZarr.open(got).provenanceJson());
		assertEquals(a.run().get("output_scale"), b.run().get("output_scale"));
		assertEquals(a.run().get("output_offset"), b.run().get("output_offset"));
	}

	@Test
	void stacksModeTakesZarrImages() throws Exception {
		final Path in = Files.createDirectory(dir.resolve("in")), out = dir.resolve("out");
		final Volume h = SparkRunnerTest.psf(7, 5, 1.2, 1.0);
		final Path psf = dir.resolve("psf.tif");
		SparkRunnerTest.write(h, psf);
		OmeZarr.write(in.resolve("cell-a.zarr"), 1, 1, List.of(SparkRunnerTest.recording(1, 40, 36, 14, h)), new int[] { 32, 32, 8 }, null);
		SparkRunnerTest.write(SparkRunnerTest.recording(2, 36, 36, 12, h), in.resolve("cell-b.tif"));
		final Recipe recipe = BlockRunner.readRecipe(new SparkRunnerTest().recipe(psf, 8));
		final List<SparkRunner.StackStatus> rows = SparkRunner.runStacks(sc, recipe, SparkRunner.stacksIn(in), out, SparkRunner.Settings.DEFAULT);
		assertEquals(2, rows.size());
		assertTrue(rows.stream().allMatch(SparkRunner.StackStatus::ok), rows.toString());
		assertTrue(names(out).contains("cell-a-deconvolved.zarr") && names(out).contains("cell-b-deconvolved.tif"), names(out).toString());
		final Path ref = dir.resolve("ref.zarr");
		ZarrBlockRunner.run(recipe, null, in.resolve("cell-a.zarr"), ref, 0, null, Monitor.NONE);
		assertSame(ref, out.resolve("cell-a-deconvolved.zarr"));
	}
}
