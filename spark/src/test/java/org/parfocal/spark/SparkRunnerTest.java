package org.parfocal.spark;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.List;
import java.util.Random;
import java.util.stream.Stream;

import org.apache.spark.SparkConf;
import org.apache.spark.api.java.JavaSparkContext;
import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.blocks.Recipe;
import org.parfocal.cli.BlockRunner;
import org.parfocal.cli.TiffBlockSink;
import org.parfocal.cli.TiffBlockSource;
import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Noise;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.Provenance;

import ij.IJ;
import ij.ImagePlus;

/**
 * The Spark runner in local mode with two workers ({@code local[2]}), checked against the single-machine runs
 * of the same recipe on the same files ({@link BlockRunner#run}, which is {@code BlockDeconvolution.run} on the
 * TIFF block source and sink): the results must agree within 1e-5 of the reference's largest value. The
 * single-machine run is the reference because it is the engine already checked against scikit-image and the
 * whole-stack run in the main project's tests.
 */
class SparkRunnerTest {

	static final VoxelSize VOXEL = VoxelSize.microns(0.1, 0.1, 0.25);
	static final double TOLERANCE = 1e-5;
	static JavaSparkContext sc;

	@TempDir
	Path dir;

	@BeforeAll
	static void startSpark() {
		sc = new JavaSparkContext(new SparkConf().setMaster("local[2]").setAppName("SparkRunnerTest").set("spark.ui.enabled", "false")
				.set("spark.driver.host", "127.0.0.1").set("spark.driver.bindAddress", "127.0.0.1"));
	}

	@AfterAll
	static void stopSpark() {
		if (sc != null) sc.close();
	}

	// ---------------------------------------------------------------------------------------------------------

	/** Gaussian PSF sampled on a kxy × kxy × kz grid (sigmas in voxels), unit sum, origin at the centre voxel. */
	static Volume psf(final int kxy, final int kz, final double sxy, final double sz) {
		final Volume h = Volume.zeros(kxy, kxy, kz, VOXEL);
		double s = 0;
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < kxy; y++)
				for (int x = 0; x < kxy; x++) {
					final double dx = (x - (kxy - 1) / 2) / sxy, dy = (y - (kxy - 1) / 2) / sxy, dz = (z - (kz - 1) / 2) / sz;
					final double v = Math.exp(-0.5 * (dx * dx + dy * dy + dz * dz));
					h.set(x, y, z, (float) v);
					s += v;
				}
		final float[] d = h.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) (d[i] / s);
		return h;
	}

	/**
	 * A seeded recording of an invented cell: dim cytoplasm (level 4) with bright vesicles, blurred by
	 * {@code psf}, Poisson noise, camera offset 100.
	 */
	static Volume recording(final long seed, final int nx, final int ny, final int nz, final Volume psf) {
		final Random r = new Random(seed);
		final Volume o = Volume.zeros(nx, ny, nz, VOXEL);
		Arrays.fill(o.data(), 4f);
		for (int i = 0; i < Math.max(6, nx * ny * nz / 1500); i++) {
			final int x = r.nextInt(nx), y = r.nextInt(ny), z = r.nextInt(nz);
			o.set(x, y, z, 60 + 120 * r.nextFloat());
		}
		final Volume b = ConvolutionOperator.create(psf, o, Boundary.MIRROR).apply(o);
		final Volume n = Noise.poisson(b, 1, seed + 1);
		final float[] d = n.data();
		for (int i = 0; i < d.length; i++) d[i] += 100;
		return n.withVoxelSize(VOXEL);
	}

	static void write(final Volume v, final Path p) throws Exception {
		final TiffBlockSink s = new TiffBlockSink(p, v.shape(), v.voxelSize(), null);
		s.add(v, new int[3]);
		s.commit();
	}

	static Volume read(final Path p) throws Exception {
		try (TiffBlockSource s = TiffBlockSource.open(p)) {
			return s.read(new int[3], s.shape());
		}
	}

	/** max |a − b| / max |b|. */
	static double relativeDifference(final Volume a, final Volume b) {
		assertArrayEquals(b.shape(), a.shape());
		double d = 0, m = 0;
		for (int i = 0; i < a.data().length; i++) {
			d = Math.max(d, Math.abs(a.data()[i] - b.data()[i]));
			m = Math.max(m, Math.abs(b.data()[i]));
		}
		assertTrue(m > 0, "the reference is all zero");
		return d / m;
	}

	List<String> files(final Path d) throws Exception {
		try (Stream<Path> s = Files.list(d)) {
			return s.map(p -> p.getFileName().toString()).sorted().toList();
		}
	}

	String recipe(final Path psf, final int iterations) {
		return "psf=" + psf + " method=richardson-lucy iterations=" + iterations + " regularization=0 stop=fixed edges=non-circulant offset=auto background=auto";
	}

	// ---------------------------------------------------------------------------------------------------------

	@Test
	void folderOfStacksMatchesSingleMachineAndACorruptStackIsReportedAndSkipped() throws Exception {
		final Path in = Files.createDirectory(dir.resolve("in")), out = Files.createDirectory(dir.resolve("out")),
				ref = Files.createDirectory(dir.resolve("ref"));
		final Volume h = psf(7, 5, 1.2, 1.0);
		write(h, dir.resolve("psf.tif"));
		write(recording(1, 48, 40, 14, h), in.resolve("cell-a.tif"));
		write(recording(2, 40, 44, 12, h), in.resolve("cell-b.tif"));
		write(recording(3, 36, 36, 16, h), in.resolve("cell-c.tif"));
		// a file that is no TIFF, and a TIFF cut short (a copy that stopped half-way)
		final byte[] noise = new byte[5000];
		new Random(9).nextBytes(noise);
		Files.write(in.resolve("cell-d.tif"), noise);
		final byte[] c = Files.readAllBytes(in.resolve("cell-c.tif"));
		Files.write(in.resolve("cell-e.tif"), Arrays.copyOf(c, c.length / 2));
		// an output name already taken: kept as it is, the new output gets another name
		Files.writeString(out.resolve("cell-b-deconvolved.tif"), "an earlier result");
		final List<String> before = files(in);
		final byte[] inputA = Files.readAllBytes(in.resolve("cell-a.tif"));

		final Recipe recipe = Recipe.parse(recipe(dir.resolve("psf.tif"), 8));
		final List<SparkRunner.StackStatus> rows = SparkRunner.runStacks(sc, recipe, SparkRunner.stacksIn(in), out, SparkRunner.Settings.DEFAULT);

		assertEquals(5, rows.size());
		assertEquals(List.of(true, true, true, false, false), rows.stream().map(SparkRunner.StackStatus::ok).toList(), rows.toString());
		assertTrue(rows.get(3).message().contains("cell-d.tif"), rows.get(3).message());
		assertTrue(rows.get(4).message().contains("cell-e.tif") && rows.get(4).message().contains("truncated"), rows.get(4).message());
		assertEquals(List.of("cell-a-deconvolved.tif", "cell-b-deconvolved-2.tif", "cell-b-deconvolved.tif", "cell-c-deconvolved.tif", "spark-summary.csv"),
				files(out), "outputs of the good stacks only, no temporary file left");
		assertEquals("an earlier result", Files.readString(out.resolve("cell-b-deconvolved.tif")));
		assertEquals(before, files(in));
		assertArrayEquals(inputA, Files.readAllBytes(in.resolve("cell-a.tif")), "inputs are never written");
		final List<String> summary = Files.readAllLines(out.resolve("spark-summary.csv"));
		assertEquals(6, summary.size());
		assertTrue(summary.get(4).startsWith("cell-d.tif,failed,"), summary.get(4));

		// the single-machine run of the same recipe on the same files
		for (final String name : List.of("cell-a", "cell-b", "cell-c")) {
			BlockRunner.run(recipe, in.resolve(name + ".tif"), ref.resolve(name + ".tif"), 0, null, Monitor.NONE);
			final Path spark = Path.of(rows.get(name.charAt(5) - 'a').output());
			final double rel = relativeDifference(read(spark), read(ref.resolve(name + ".tif")));
			System.out.printf("stacks: %s Spark vs single machine: max |difference| / max = %.2e%n", name, rel);
			assertTrue(rel <= TOLERANCE, name + ": " + rel);
		}
		final ImagePlus a = IJ.openImage(out.resolve("cell-a-deconvolved.tif").toString());
		final Provenance p = Provenance.findIn((String) a.getProperty("Info")).orElseThrow();
		assertEquals("SparkRunner stacks", p.run().get("runner"));
	}

	@Test
	void blocksOfOneStackMatchSingleMachineBlockRun() throws Exception {
		final Volume h = psf(7, 5, 1.3, 1.0);
		write(h, dir.resolve("psf.tif"));
		write(recording(4, 64, 56, 18, h), dir.resolve("big.tif"));
		final Recipe recipe = Recipe.parse(recipe(dir.resolve("psf.tif"), 10));
		final int[] tile = { 32, 28, 0 };

		final SparkRunner.BlocksOutcome o = SparkRunner.runBlocks(sc, recipe, dir.resolve("big.tif"), dir.resolve("spark.tif"),
				new SparkRunner.Settings(0, tile, 0));
		assertEquals(4, o.plan().count(), o.plan().toString());
		assertEquals(List.of("big.tif", "psf.tif", "spark.tif"), files(dir), "no part file or temporary file left");

		BlockRunner.run(recipe, dir.resolve("big.tif"), dir.resolve("single.tif"), 0, tile, Monitor.NONE);
		final double rel = relativeDifference(read(dir.resolve("spark.tif")), read(dir.resolve("single.tif")));
		System.out.printf("blocks: %d blocks on Spark vs BlockDeconvolution.run: max |difference| / max = %.2e%n", o.plan().count(), rel);
		assertTrue(rel <= TOLERANCE, "relative difference " + rel);
		final ImagePlus out = IJ.openImage(dir.resolve("spark.tif").toString());
		final Provenance p = Provenance.findIn((String) out.getProperty("Info")).orElseThrow();
		assertEquals("SparkRunner blocks", p.run().get("runner"));
		assertTrue(p.run().get("block_plan").toString().contains("blocks=2x2x1"), p.run().toString());
	}

	/**
	 * {@code output=16-bit} (issue 17, item 9): Spark's assembled TIFF is 16-bit with the scale and offset the
	 * single-machine block run records, the same stored values, and the record maps them back to the 32-bit
	 * Spark result within half a step.
	 */
	@Test
	void sixteenBitBlocksMatchTheSingleMachineSixteenBitRun() throws Exception {
		final Volume h = psf(7, 5, 1.3, 1.0);
		write(h, dir.resolve("psf.tif"));
		write(recording(4, 64, 56, 18, h), dir.resolve("big.tif"));
		final String text = recipe(dir.resolve("psf.tif"), 6);
		final int[] tile = { 32, 28, 0 };
		final SparkRunner.Settings settings = new SparkRunner.Settings(0, tile, 0);
		SparkRunner.runBlocks(sc, Recipe.parse(text), dir.resolve("big.tif"), dir.resolve("f.tif"), settings);
		SparkRunner.runBlocks(sc, Recipe.parse(text + " output=16-bit"), dir.resolve("big.tif"), dir.resolve("s.tif"), settings);
		BlockRunner.run(Recipe.parse(text + " output=16-bit"), dir.resolve("big.tif"), dir.resolve("single.tif"), 0, tile, Monitor.NONE);
		final ImagePlus f = IJ.openImage(dir.resolve("f.tif").toString()), s = IJ.openImage(dir.resolve("s.tif").toString()),
				one = IJ.openImage(dir.resolve("single.tif").toString());
		assertEquals(ImagePlus.GRAY16, s.getType());
		final Provenance p = Provenance.findIn((String) s.getProperty("Info")).orElseThrow(),
				q = Provenance.findIn((String) one.getProperty("Info")).orElseThrow();
		final double offset = ((Number) p.run().get("output_offset")).doubleValue(), scale = ((Number) p.run().get("output_scale")).doubleValue();
		assertEquals(((Number) q.run().get("output_scale")).doubleValue(), scale, 1e-6 * scale);
		double worst = 0;
		for (int z = 1; z <= f.getStackSize(); z++) {
			final float[] v = (float[]) f.getStack().getPixels(z);
			final short[] a = (short[]) s.getStack().getPixels(z), b = (short[]) one.getStack().getPixels(z);
			for (int i = 0; i < v.length; i++) {
				assertTrue(Math.abs((a[i] & 0xffff) - (b[i] & 0xffff)) <= 1, "stored values of Spark and the single machine");
				worst = Math.max(worst, Math.abs(offset + scale * (a[i] & 0xffff) - v[i]) / scale);
			}
		}
		System.out.printf("Spark blocks 16-bit: scale %.6g, largest error %.6f step(s)%n", scale, worst);
		assertTrue(worst <= 0.5 + 1e-6, "within half a step: " + worst);
	}

	@Test
	void aStackChangedDuringABlockRunLeavesNothing() throws Exception {
		final Volume h = psf(5, 3, 1.0, 0.8);
		write(h, dir.resolve("psf.tif"));
		write(recording(6, 40, 40, 10, h), dir.resolve("big.tif"));
		final Recipe recipe = Recipe.parse(recipe(dir.resolve("psf.tif"), 3));
		final SparkRunner.BlockJob job = SparkRunner.prepareBlocks(sc, recipe, dir.resolve("big.tif"), dir.resolve("out.tif"),
				new SparkRunner.Settings(0, new int[] { 20, 20, 0 }, 0));
		// the acquisition software rewrites the stack (now longer) after the driver planned the blocks
		Files.delete(dir.resolve("big.tif"));
		write(recording(6, 40, 40, 12, h), dir.resolve("big.tif"));
		final IllegalStateException e = assertThrows(IllegalStateException.class, () -> SparkRunner.runBlocks(sc, job));
		assertTrue(e.getMessage().contains("big.tif changed"), e.getMessage());
		assertFalse(e.getMessage().contains("\n"));
		assertEquals(List.of("big.tif", "psf.tif"), files(dir), "no output, no part file, no temporary file");
	}

	@Test
	void existingOutputIsRefusedAndKept() throws Exception {
		final Volume h = psf(5, 3, 1.0, 0.8);
		write(h, dir.resolve("psf.tif"));
		write(recording(7, 32, 32, 8, h), dir.resolve("big.tif"));
		Files.writeString(dir.resolve("out.tif"), "keep me");
		final Recipe recipe = Recipe.parse(recipe(dir.resolve("psf.tif"), 2));
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
				() -> SparkRunner.runBlocks(sc, recipe, dir.resolve("big.tif"), dir.resolve("out.tif"), SparkRunner.Settings.DEFAULT));
		assertTrue(e.getMessage().contains("exists"), e.getMessage());
		assertEquals("keep me", Files.readString(dir.resolve("out.tif")));
		assertEquals(List.of("big.tif", "out.tif", "psf.tif"), files(dir));
	}

	@Test
	void badCommandLinesGetOneLine() throws Exception {
		final PrintStream err = System.err;
		final ByteArrayOutputStream buf = new ByteArrayOutputStream();
		System.setErr(new PrintStream(buf, true));
		try {
			assertEquals(2, SparkRunner.runMain(new String[] { "stacks", "psf=from_optics" }));
			assertEquals(2, SparkRunner.runMain(new String[] { "sideways", "a", "b", "c" }));
			buf.reset();
			// the one parser of the block runners (org.parfocal.cli.RunArgs): BlockRunner prints this same line (RunArgsTest)
			assertEquals(2, SparkRunner.runMain(new String[] { "blocks", "r", "a.tif", "b.tif", "--blok", "8" }));
			assertEquals("Error: unknown option --blok (the options are --budget MB, --block X,Y,Z, --psf FILE[,FILE per channel], --threads N)",
					buf.toString().strip());
			buf.reset();
			// a recipe key Deconvolve... does not have: the line BlockRunner prints (BlockRunnerMessagesTest)
			assertEquals(1, SparkRunner.runMain(new String[] { "blocks", "psf=/a/p.tif iteration=2", "a.tif", "b.tif" }));
			assertEquals("Error: Unknown key 'iteration' — did you mean 'iterations'?", buf.toString().strip());
			buf.reset();
			write(psf(5, 3, 1, 1), dir.resolve("psf.tif"));
			assertEquals(1, SparkRunner.runMain(new String[] { "stacks", recipe(dir.resolve("psf.tif"), 2), dir.resolve("missing").toString(),
					dir.resolve("out").toString() }));
			assertEquals("Error: The input folder " + dir.resolve("missing") + " does not exist", buf.toString().strip());
			buf.reset();
			assertEquals(1, SparkRunner.runMain(new String[] { "blocks", "method=richardson-lucy psf=PSF-window", dir.resolve("psf.tif").toString(),
					dir.resolve("o.tif").toString() }));
			assertTrue(buf.toString().strip().startsWith("Error: The recipe's PSF is an image title"), buf.toString());
			assertEquals(1, buf.toString().strip().lines().count());
		} finally {
			System.setErr(err);
		}
		assertFalse(Files.exists(dir.resolve("out")));
	}
}
