package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.ij1.ImageBridge;

/**
 * The blocks runner's messages for bad input (issue 13, items 4 and 12) and its output under concurrency (item 5):
 * one line each, nothing of another run ever deleted, two writers of one name get two files.
 */
class BlockRunnerMessagesTest {

	@TempDir
	Path dir;

	private String err = "", out = "";

	private int run(final String... args) {
		final PrintStream e = System.err, o = System.out;
		final ByteArrayOutputStream eb = new ByteArrayOutputStream(), ob = new ByteArrayOutputStream();
		System.setErr(new PrintStream(eb, true));
		System.setOut(new PrintStream(ob, true));
		try {
			return BlockRunner.runMain(args);
		} finally {
			System.setErr(e);
			System.setOut(o);
			err = eb.toString();
			out = ob.toString();
		}
	}

	private String recipe() throws Exception {
		final Path in = dir.resolve("in.tif"), psf = dir.resolve("psf.tif");
		if (!Files.exists(in)) {
			assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(24, 20, 6, 3).withVoxelSize(VoxelSize.microns(0.1, 0.1, 0.2)), "in"))
					.saveAsTiffStack(in.toString()));
			assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.gaussianPsf(5, 5, 3), "psf")).saveAsTiffStack(psf.toString()));
		}
		return "psf=" + psf + " method=richardson-lucy iterations=2 stop=fixed offset=0 background=0";
	}

	private static void assertOneLine(final String s) {
		assertEquals(1, s.strip().lines().count(), s);
		assertFalse(s.contains("\tat "), s);
	}

	@Test
	void truncatedInputOrPsfIsRefusedNamingTheFile() throws Exception {
		final String recipe = recipe();
		final Path cut = dir.resolve("cut.tif"), cutPsf = dir.resolve("cut-psf.tif");
		Files.copy(dir.resolve("in.tif"), cut);
		TiffCheckTest.cut(cut, Files.size(cut) / 2);
		assertEquals(1, run(recipe, cut.toString(), dir.resolve("o1.tif").toString()));
		assertTrue(err.startsWith("Error: " + cut + " is truncated: its header declares 6 planes"), err);
		assertOneLine(err);
		Files.copy(dir.resolve("psf.tif"), cutPsf);
		TiffCheckTest.cut(cutPsf, Files.size(cutPsf) / 2);
		assertEquals(1, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("o2.tif").toString(), "--psf", cutPsf.toString()));
		assertTrue(err.startsWith("Error: " + cutPsf + " is truncated"), err);
		assertOneLine(err);
		assertFalse(Files.exists(dir.resolve("o1.tif")) || Files.exists(dir.resolve("o2.tif")));
	}

	@Test
	void absurdThreadCountsAndMissingPsfFilesGetAClearLine() throws Exception {
		final String recipe = recipe();
		assertEquals(1, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("o.tif").toString(), "--threads", "100000"));
		assertTrue(err.startsWith("Error: --threads takes a whole number from 1 to 1024"), err);
		assertOneLine(err);
		assertEquals(1, run("psf=/nope.tif method=richardson-lucy iterations=2", dir.resolve("in.tif").toString(), dir.resolve("o.tif").toString()));
		assertEquals("Error: PSF file /nope.tif does not exist", err.strip());
	}

	/** A recipe key Deconvolve... does not have is refused (not run with the default), naming the closest key. */
	@Test
	void aMistypedRecipeKeyIsOneLineNamingTheClosestKey() throws Exception {
		final String recipe = recipe().replace("iterations=2", "iteration=2");
		assertEquals(1, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("o.tif").toString()));
		assertEquals("Error: Unknown key 'iteration' — did you mean 'iterations'?", err.strip());
		assertFalse(Files.exists(dir.resolve("o.tif")));
	}

	@Test
	void aKilledRunsLeftoverIsNamedAndNoOtherRunsPartFileIsDeleted() throws Exception {
		final String recipe = recipe();
		// what a run killed with -9 leaves (the name today's and earlier runs used) and a live run's scratch file
		final Path killed = Files.write(dir.resolve(".o.tif.accumulating"), new byte[64]);
		final Path live = Files.write(dir.resolve(".o.tif." + ProcessHandle.current().pid() + "-1a2b3c4d.accumulating"), new byte[64]);
		assertEquals(0, run(recipe, dir.resolve("in.tif").toString(), dir.resolve("o.tif").toString()), err);
		assertTrue(err.contains("Note: " + killed + " is left over from a run that was stopped"), err);
		assertTrue(err.contains("Note: " + live + " belongs to a run that is still going (process " + ProcessHandle.current().pid() + ")"), err);
		assertTrue(Files.exists(killed) && Files.exists(live), "another run's files are never deleted");
		assertTrue(Files.isRegularFile(dir.resolve("o.tif")));
	}

	@Test
	void twoSinksWritingOneNameAtOnceGetTwoFilesNeitherReplaced() throws Exception {
		final Path o = dir.resolve("same.tif");
		final Volume a = Volume.zeros(8, 6, 3, VoxelSize.UNCALIBRATED), b = Volume.zeros(8, 6, 3, VoxelSize.UNCALIBRATED);
		java.util.Arrays.fill(a.data(), 1f);
		java.util.Arrays.fill(b.data(), 2f);
		// both start before either finishes, as two concurrent runs do
		final TiffBlockSink sa = new TiffBlockSink(o, a.shape(), a.voxelSize(), null), sb = new TiffBlockSink(o, b.shape(), b.voxelSize(), null);
		sa.add(a, new int[3]);
		sb.add(b, new int[3]);
		sa.commit();
		sb.commit();
		assertEquals(o, sa.output());
		assertEquals(dir.resolve("same-2.tif"), sb.output());
		final ImagePlus ia = IJ.openImage(o.toString()), ib = IJ.openImage(sb.output().toString());
		assertArrayEquals(java.util.Arrays.copyOfRange(a.data(), 48, 96), (float[]) ia.getStack().getPixels(2));
		assertArrayEquals(java.util.Arrays.copyOfRange(b.data(), 48, 96), (float[]) ib.getStack().getPixels(2));
		try (var s = Files.list(dir)) {
			assertEquals(2, s.count(), "no temporary file left");
		}
	}
}
