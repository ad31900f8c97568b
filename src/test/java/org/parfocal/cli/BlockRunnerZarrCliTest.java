package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.testing.TestVolumes;
import org.parfocal.zarr.OmeZarr;

/** The command line of {@code bin/parfocal-blocks} with Zarr: {@code --psf} per channel, exit codes, one-line errors. */
class BlockRunnerZarrCliTest {

	@TempDir
	Path dir;

	String err = "";

	int run(final String... args) {
		final PrintStream old = System.err, oldOut = System.out;
		final ByteArrayOutputStream buf = new ByteArrayOutputStream();
		System.setErr(new PrintStream(buf, true));
		System.setOut(new PrintStream(buf, true));
		try {
			return BlockRunner.runMain(args);
		} finally {
			System.setErr(old);
			System.setOut(oldOut);
			err = buf.toString();
		}
	}

	static Path tif(final Volume v, final Path p) throws Exception {
		final TiffBlockSink s = new TiffBlockSink(p, v.shape(), v.voxelSize(), null);
		s.add(v, new int[3]);
		s.commit();
		return p;
	}

	@Test
	void twoChannelsWithTheirPsfsAndAWrongPsfCount() throws Exception {
		final VoxelSize vs = VoxelSize.microns(0.1, 0.1, 0.25);
		final Volume a = TestVolumes.gaussianPsf(7, 7, 5, 1.2, 1.2, 1.0).withVoxelSize(vs), b = TestVolumes.gaussianPsf(7, 7, 5, 1.6, 1.6, 1.2).withVoxelSize(vs);
		final Volume c0 = TestVolumes.random(3, 36, 32, 12).withVoxelSize(vs), c1 = TestVolumes.random(4, 36, 32, 12).withVoxelSize(vs);
		for (final Volume v : List.of(c0, c1))
			for (int i = 0; i < v.data().length; i++) v.data()[i] = 100 + 50 * v.data()[i];
		final Path in = dir.resolve("two.zarr"), pa = tif(a, dir.resolve("a.tif")), pb = tif(b, dir.resolve("b.tif"));
		OmeZarr.write(in, 1, 2, List.of(c0, c1), new int[] { 16, 16, 8 }, null);
		final String recipe = "method=richardson-lucy iterations=3 offset=100 background=0 psf=" + pa;
		assertEquals(0, run(recipe, in.toString(), dir.resolve("out.zarr").toString(), "--block", "18,16,12", "--psf", pa + "," + pb), err);
		assertEquals(2, OmeZarr.open(dir.resolve("out.zarr")).channels());
		assertEquals(1, run(recipe, in.toString(), dir.resolve("bad.zarr").toString(), "--psf", pa + "," + pb + "," + pa));
		assertTrue(err.startsWith("Error: Give one PSF for all channels or one per channel"), err);
		assertEquals(1, err.strip().lines().count(), err);
		// two channels into a TIFF: refused in one line
		assertEquals(1, run(recipe, in.toString(), dir.resolve("out.tif").toString()));
		assertTrue(err.contains("write them to a .zarr output"), err);
		assertFalse(Files.exists(dir.resolve("bad.zarr")) || Files.exists(dir.resolve("out.tif")));
	}
}
