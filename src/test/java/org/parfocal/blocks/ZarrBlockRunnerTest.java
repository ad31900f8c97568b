package org.parfocal.blocks;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.cli.BlockRunner;
import org.parfocal.cli.TiffBlockSink;
import org.parfocal.cli.ZarrBlockRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.provenance.Provenance;
import org.parfocal.zarr.OmeZarr;

/**
 * Block-wise runs from and into OME-Zarr. The references: the whole-stack engine run (within the tolerances of
 * {@link BlockDeconvolutionTest}: 1 % of the range at the seams, 1e-4 away from them), and the in-memory
 * block-wise run of the same plan ({@link BlockDeconvolution#run(Volume, Volume, org.parfocal.deconv.DeconvolutionOptions, BlockPlan, Monitor)}),
 * which the Zarr output must equal float for float: chunks written by exactly one writer, seams added in block
 * order from their fragments.
 */
class ZarrBlockRunnerTest {

	@TempDir
	Path dir;

	static Path tif(final Volume v, final Path p) throws Exception {
		final TiffBlockSink s = new TiffBlockSink(p, v.shape(), v.voxelSize(), null);
		s.add(v, new int[3]);
		s.commit();
		return p;
	}

	static Recipe recipe(final Path psf, final int iterations) {
		return Recipe.parse("psf=" + psf + " method=richardson-lucy iterations=" + iterations
				+ " regularization=0 stop=fixed edges=non-circulant offset=auto background=auto");
	}

	List<String> names() throws Exception {
		try (Stream<Path> s = Files.list(dir)) {
			return s.map(p -> p.getFileName().toString()).sorted().toList();
		}
	}

	@Test
	void zarrBlockwiseEqualsWholeStackAndTheInMemoryBlocksAndCarriesProvenance() throws Exception {
		final Volume psf = BlockScenes.psf(9, 7, 1.3, 1.2), rec = BlockScenes.recording(11, 64, 56, 30, psf);
		final Path in = dir.resolve("cell.zarr"), out = dir.resolve("cell-deconvolved.zarr"), psfFile = tif(psf, dir.resolve("psf.tif"));
		OmeZarr.write(in, 1, 1, List.of(rec), new int[] { 16, 16, 8 }, null);
		final Recipe r = recipe(psfFile, 20);
		final BlockRunner.Outcome o = BlockRunner.run(r, in, out, 0, new int[] { 24, 24, 12 }, Monitor.NONE);
		final BlockPlan plan = o.plan();
		assertEquals(27, plan.count(), plan.toString());
		for (final Block b : plan.blocks())
			for (int d = 0; d < 3; d++)
				assertEquals(0, b.coreOrigin()[d] % new int[] { 16, 16, 8 }[d], "block cores start on the chunk grid: " + b);
		final OmeZarr img = OmeZarr.open(out);
		final Volume got = img.read(0, 0, new int[3], img.shape());
		assertEquals(rec.voxelSize().dx(), img.voxelSize().dx(), 1e-12);
		assertEquals(rec.voxelSize().dz(), img.voxelSize().dz(), 1e-12);
		// the same plan in memory: equal float for float
		final Volume mem = BlockDeconvolution.run(rec, BlockRunner.loadPsf(r, rec.voxelSize(), rec.shape()), r.options(), plan, null);
		assertArrayEquals(mem.data(), got.data(), "Zarr chunks = in-memory block-wise result");
		// the whole-stack run
		final Volume whole = Deconvolution.run(rec, BlockRunner.loadPsf(r, rec.voxelSize(), rec.shape()), r.options(), null).estimate();
		final double[] d = BlockDeconvolutionTest.differences(whole, got, plan);
		System.out.printf(Locale.ROOT, "Zarr block-wise vs whole stack: %.2e of the range, away from seams %.2e%n", d[0], d[1]);
		assertTrue(d[0] <= 0.01, "largest difference " + d[0]);
		assertTrue(d[1] <= 1e-4, "away from seams " + d[1]);
		// provenance: the TIFF Info's record, in .zattrs
		final Provenance p = Provenance.fromJson(img.provenanceJson());
		assertEquals("Deconvolve", p.command());
		assertEquals("20", p.options().get("iterations"));
		assertTrue(p.run().containsKey("block_plan"), p.run().toString());
		assertEquals(List.of("cell-deconvolved.zarr", "cell.zarr", "psf.tif"), names(), "no hidden folder or fragment left");
		// outputs are never replaced
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
				() -> BlockRunner.run(r, in, out, 0, new int[] { 24, 24, 12 }, Monitor.NONE));
		assertTrue(e.getMessage().contains("exists"), e.getMessage());
	}

	@Test
	void framesAndChannelsEachWithTheirChannelsPsf() throws Exception {
		final Volume psfA = BlockScenes.psf(7, 5, 1.2, 1.0), psfB = BlockScenes.psf(9, 7, 1.7, 1.4);
		final List<Volume> vols = new ArrayList<>();
		for (int t = 0; t < 2; t++)
			for (int c = 0; c < 2; c++) vols.add(BlockScenes.recording(30 + 2 * t + c, 40, 36, 16, c == 0 ? psfA : psfB));
		final Path in = dir.resolve("timelapse.zarr"), out = dir.resolve("out.zarr");
		OmeZarr.write(in, 2, 2, vols, new int[] { 16, 16, 8 }, null);
		final Path fa = tif(psfA, dir.resolve("psf-a.tif")), fb = tif(psfB, dir.resolve("psf-b.tif"));
		final Recipe r = recipe(fa, 8);
		ZarrBlockRunner.run(r, List.of(fa.toString(), fb.toString()), in, out, 0, new int[] { 20, 20, 0 }, Monitor.NONE);
		final OmeZarr img = OmeZarr.open(out);
		assertEquals(2, img.frames());
		assertEquals(2, img.channels());
		final ZarrBlockRunner.Layout l = ZarrBlockRunner.layout(in);
		for (int t = 0; t < 2; t++)
			for (int c = 0; c < 2; c++) {
				final Volume h = BlockRunner.loadPsf(r.withPsfFile((c == 0 ? fa : fb).toString()), l.voxelSize(), l.shape());
				final Volume other = BlockRunner.loadPsf(r.withPsfFile((c == 0 ? fb : fa).toString()), l.voxelSize(), l.shape());
				final BlockPlan plan = ZarrBlockRunner.plans(l, c == 0 ? List.of(h, other) : List.of(other, h), r, 0, new int[] { 20, 20, 0 }).plans().get(c);
				final Volume want = BlockDeconvolution.run(vols.get(2 * t + c), h, r.options(), plan, null);
				assertArrayEquals(want.data(), img.read(t, c, new int[3], img.shape()).data(), "frame " + t + ", channel " + c);
			}
		// with the other channel's PSF the result differs: the PSF really is per channel
		final Volume h = BlockRunner.loadPsf(r, l.voxelSize(), l.shape());
		final Volume wrong = BlockDeconvolution.run(vols.get(1), h, r.options(), ZarrBlockRunner.plan(l, h, r, 0, new int[] { 20, 20, 0 }), null);
		assertFalse(java.util.Arrays.equals(wrong.data(), img.read(0, 1, new int[3], img.shape()).data()));
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ZarrBlockRunner.run(r,
				List.of(fa.toString(), fb.toString(), fa.toString()), in, dir.resolve("x.zarr"), 0, null, Monitor.NONE));
		assertTrue(e.getMessage().contains("one per channel"), e.getMessage());
	}

	/**
	 * The levels read chunk by chunk (a chunked stack whose chunk layer does not fit in memory) are those read plane
	 * by plane: the same sample (offset, background exactly), the start within float rounding of the sum's order.
	 */
	@Test
	void levelsReadByChunksEqualLevelsReadByPlanes() throws Exception {
		final Volume psf = BlockScenes.psf(7, 5, 1.2, 1.0), rec = BlockScenes.recording(21, 40, 36, 16, psf);
		final Path in = dir.resolve("cell.zarr");
		OmeZarr.write(in, 1, 1, List.of(rec), new int[] { 16, 16, 8 }, null);
		final var o = recipe(tif(psf, dir.resolve("psf.tif")), 5).options();
		final BlockDeconvolution.Levels planes = BlockDeconvolution.levels(BlockSource.of(rec), o, null);
		final BlockDeconvolution.Levels chunks;
		final int[] reads = new int[1];
		BlockDeconvolution.streamLimit = 0;
		try (var z = org.parfocal.zarr.ZarrBlockSource.open(in, 0, 0)) {
			final BlockSource counted = new BlockSource() {
				public int[] shape() { return z.shape(); }
				public org.parfocal.core.VoxelSize voxelSize() { return z.voxelSize(); }
				public int[] chunkShape() { return z.chunkShape(); }
				public Volume read(final int[] a, final int[] b) throws java.io.IOException {
					assertArrayEquals(new int[] { 16, 16, 8 }, new int[] { Math.max(b[0], 16), Math.max(b[1], 16), Math.max(b[2], 8) }, "chunk-sized reads");
					reads[0]++;
					return z.read(a, b);
				}
			};
			chunks = BlockDeconvolution.levels(counted, o, null);
		} finally {
			BlockDeconvolution.streamLimit = -1;
		}
		assertEquals(2 * 3 * 3 * 2, reads[0], "each chunk read once per pass (offset estimated: two passes)");
		assertEquals(planes.offset(), chunks.offset());
		assertEquals(planes.background(), chunks.background());
		assertEquals(planes.start(), chunks.start(), 1e-6 * planes.start());
	}

	/** Chunks larger than the blocks would make every chunk a seam chunk: the output's are halved down to the cores. */
	@Test
	void outputChunksShrinkToTheBlocksAndTheBlocksAlignToThem() {
		final Volume psf = BlockScenes.psf(9, 7, 1.3, 1.2);
		final ZarrBlockRunner.Layout l = new ZarrBlockRunner.Layout(1, 1, new int[] { 200, 160, 64 }, BlockScenes.VOXEL, new int[] { 128, 128, 32 });
		final var r = Recipe.parse("method=richardson-lucy iterations=5");
		final ZarrBlockRunner.Plans p = ZarrBlockRunner.plans(l, List.of(psf), r, 0, new int[] { 64, 80, 0 });
		assertArrayEquals(new int[] { 16, 32, 32 }, p.output().chunk(), "x: 4 cores of 50 -> 16; y: 2 cores of 80 -> 32; z uncut -> kept");
		for (final Block b : p.plans().get(0).blocks()) {
			assertEquals(0, b.coreOrigin()[0] % 16, b.toString());
			assertEquals(0, b.coreOrigin()[1] % 32, b.toString());
		}
	}

	@Test
	void aFailedRunLeavesNothing() throws Exception {
		final Volume psf = BlockScenes.psf(7, 5, 1.2, 1.0), rec = BlockScenes.recording(5, 40, 36, 16, psf);
		rec.set(30, 30, 12, Float.NaN);
		final Path in = dir.resolve("bad.zarr"), psfFile = tif(psf, dir.resolve("psf.tif"));
		OmeZarr.write(in, 1, 1, List.of(rec), new int[] { 16, 16, 8 }, null);
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
				() -> BlockRunner.run(recipe(psfFile, 5), in, dir.resolve("out.zarr"), 0, new int[] { 20, 20, 0 }, Monitor.NONE));
		assertTrue(e.getMessage().contains("non-finite"), e.getMessage());
		assertEquals(List.of("bad.zarr", "psf.tif"), names());
	}
}
