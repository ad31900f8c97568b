package org.parfocal.blocks;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.cli.BlockRunner;
import org.parfocal.cli.TiffBlockSink;
import org.parfocal.cli.TiffBlockSource;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.provenance.Provenance;

import ij.IJ;
import ij.ImagePlus;

/**
 * The block runner on TIFF files: same result as the whole-stack engine run on the image ImageJ opens, the
 * output readable by ImageJ with its provenance, and the bad-input cases (one line, nothing left under the output
 * name, no temporary file left).
 */
class BlockRunnerFilesTest {

	@TempDir
	Path dir;

	static final Volume PSF = BlockScenes.psf(7, 5, 1.2, 1.0);

	/** Writes {@code v} as a 32-bit TIFF through the block sink (one block). */
	static void write(final Volume v, final Path p) throws Exception {
		final TiffBlockSink s = new TiffBlockSink(p, v.shape(), v.voxelSize(), null);
		s.add(v, new int[3]);
		s.commit();
	}

	private int run(final String... args) {
		final PrintStream err = System.err;
		final ByteArrayOutputStream buf = new ByteArrayOutputStream();
		System.setErr(new PrintStream(buf, true));
		try {
			return (int) callMain(args);
		} finally {
			System.setErr(err);
			lastErr = buf.toString();
		}
	}

	private String lastErr = "";

	private static int callMain(final String[] args) {
		try {
			final var m = BlockRunner.class.getDeclaredMethod("runMain", String[].class);
			m.setAccessible(true);
			return (int) m.invoke(null, (Object) args);
		} catch (final ReflectiveOperationException e) {
			throw new AssertionError(e);
		}
	}

	private List<String> files() throws Exception {
		try (Stream<Path> s = Files.list(dir)) {
			return s.map(p -> p.getFileName().toString()).sorted().toList();
		}
	}

	@Test
	void tiffRunMatchesWholeStackAndCarriesThePlan() throws Exception {
		final Volume rec = BlockScenes.recording(3, 48, 44, 20, PSF);
		write(rec, dir.resolve("in.tif"));
		write(PSF, dir.resolve("psf.tif"));
		final String recipe = "image=in.tif psf=" + dir.resolve("psf.tif") + " method=richardson-lucy iterations=10 regularization=0 stop=fixed threshold=0.001 edges=non-circulant offset=auto background=auto";
		assertEquals(0, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("out.tif").toString(), "--block", "20,20,10"), lastErr);
		final ImagePlus in = IJ.openImage(dir.resolve("in.tif").toString()), out = IJ.openImage(dir.resolve("out.tif").toString());
		assertEquals(20, out.getStackSize());
		assertEquals(BlockScenes.VOXEL.dz(), out.getCalibration().pixelDepth, 1e-9);
		final Volume inV = org.parfocal.ij1.ImageBridge.toVolume(in, "image"), outV = org.parfocal.ij1.ImageBridge.toVolume(out, "out");
		assertEquals(rec, inV.withVoxelSize(rec.voxelSize()), "TIFF round trip through the block sink and ImageJ's reader");
		final Recipe r = Recipe.parse(recipe);
		final Volume whole = Deconvolution.run(inV, PSF, r.options(), null).estimate();
		final BlockPlan plan = BlockPlan.forTileSize(rec.shape(), PSF.shape(), r.options(), new int[] { 20, 20, 10 });
		final double[] d = BlockDeconvolutionTest.differences(whole, outV, plan);
		assertTrue(d[0] <= 0.01 && d[1] <= 1e-4, "differences " + d[0] + ", " + d[1]);
		final Provenance p = Provenance.findIn((String) out.getProperty("Info")).orElseThrow();
		assertEquals("Deconvolve", p.command());
		assertTrue(p.run().get("block_plan").toString().contains("blocks=3x3x2"), p.run().toString());
		assertEquals(List.of("in.tif", "out.tif", "psf.tif"), files());
	}

	@Test
	void badInputsGetOneLineAndLeaveNothing() throws Exception {
		final Volume rec = BlockScenes.recording(5, 40, 40, 16, PSF);
		write(rec, dir.resolve("in.tif"));
		write(PSF, dir.resolve("psf.tif"));
		final String recipe = "psf=" + dir.resolve("psf.tif") + " method=richardson-lucy iterations=3 offset=auto background=0";
		// block smaller than the PSF
		assertEquals(1, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("a.tif").toString(), "--block", "4,40,40"));
		assertTrue(lastErr.startsWith("Error: The block size along x (4) is smaller than the PSF"), lastErr);
		// budget too small
		assertEquals(1, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("a.tif").toString(), "--budget", "0.01"));
		assertTrue(lastErr.startsWith("Error: The memory budget") && lastErr.strip().lines().count() == 1, lastErr);
		// unwritable output (missing folder)
		assertEquals(1, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("no/such/b.tif").toString()));
		assertTrue(lastErr.contains("does not exist"), lastErr);
		// corrupt input
		Files.write(dir.resolve("bad.tif"), new byte[] { 'I', 'I', 42, 0, 8, 0, 0, 0, 1 });
		assertEquals(1, run(recipe, dir.resolve("bad.tif").toString(), dir.resolve("c.tif").toString()));
		assertTrue(lastErr.startsWith("Error: " + dir.resolve("bad.tif") + " is "), lastErr);
		// the PSF is an image title
		assertEquals(1, run("psf=psf-title method=richardson-lucy", dir.resolve("in.tif").toString(), dir.resolve("d.tif").toString()));
		assertTrue(lastErr.contains("--psf FILE"), lastErr);
		assertEquals(List.of("bad.tif", "in.tif", "psf.tif"), files(), "nothing written by failed runs");
	}

	@Test
	void aStackThatChangesMidRunStopsTheRunAndLeavesNothing() throws Exception {
		final Volume rec = BlockScenes.recording(6, 40, 40, 16, PSF);
		final Path in = dir.resolve("in.tif");
		write(rec, in);
		write(PSF, dir.resolve("psf.tif"));
		final Recipe r = Recipe.parse("psf=" + dir.resolve("psf.tif") + " method=richardson-lucy iterations=3 offset=0 background=0");
		final long size = Files.size(in);
		final Monitor grow = new Monitor() {
			@Override
			public void progress(final int done, final int total, final String status) {
				if (status.contains("block 2 of")) try {
					Files.write(in, new byte[4096], java.nio.file.StandardOpenOption.APPEND);
				} catch (final java.io.IOException e) {
					throw new java.io.UncheckedIOException(e);
				}
			}
		};
		final IllegalStateException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalStateException.class,
				() -> BlockRunner.run(r, in, dir.resolve("out.tif"), 0, new int[] { 20, 20, 16 }, grow));
		assertTrue(e.getMessage().startsWith("in.tif changed on disk during the run (" + size + " bytes when opened"), e.getMessage());
		assertEquals(List.of("in.tif", "psf.tif"), files(), "no output and no temporary file");
		try (TiffBlockSource s = TiffBlockSource.open(dir.resolve("psf.tif"))) {
			assertFalse(s.shape()[0] != 7);
		}
	}
}
