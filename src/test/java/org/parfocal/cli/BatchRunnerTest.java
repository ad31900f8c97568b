package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Random;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.ij1.ImageBridge;

/** A batch over a folder with good stacks, a corrupt file and an RGB file (issue: batch must not stop). */
class BatchRunnerTest {

	@Test
	void badFilesAreReportedAndSkippedTheRestIsProcessedInputsUntouched(@TempDir final Path dir) throws Exception {
		final Path in = Files.createDirectories(dir.resolve("in")), out = dir.resolve("out");
		for (final String name : new String[] { "cell-1.tif", "cell-2.tif" })
			assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(24, 24, 6, name.hashCode()).withVoxelSize(VoxelSize.microns(0.08, 0.08, 0.2)), name))
					.saveAsTiff(in.resolve(name).toString()));
		final byte[] junk = new byte[4096];
		new Random(1).nextBytes(junk);
		Files.write(in.resolve("cell-3-corrupt.tif"), junk);
		final ImagePlus rgb = IJ.createImage("rgb", "RGB ramp", 24, 24, 1);
		assertTrue(new FileSaver(rgb).saveAsTiff(in.resolve("cell-4-rgb.tif").toString()));
		final Path psf = dir.resolve("psf.tif");
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.gaussianPsf(5, 5, 3), "psf.tif")).saveAsTiff(psf.toString()));
		final Path map = dir.resolve("map.csv");
		Files.writeString(map, "pattern,psf\ncell-*.tif,psf.tif\n");
		final Path recipe = dir.resolve("blur.ijm");
		Files.writeString(recipe, "run(\"Convolve with PSF...\", \"image=[\" + inputTitle + \"] psf=[\" + psfTitle + \"] boundary=zero normalize "
				+ "background=0 photons=0 seed=1 offset=0\");\n");
		final byte[][] before = new byte[4][];
		final List<Path> inputs = Files.list(in).sorted().toList();
		for (int i = 0; i < 4; i++) before[i] = Files.readAllBytes(inputs.get(i));

		final List<BatchRunner.Row> rows = BatchRunner.run(recipe, in, out, map);

		assertEquals(4, rows.size());
		assertTrue(rows.get(0).ok() && rows.get(1).ok(), rows.toString());
		assertTrue(!rows.get(2).ok() && rows.get(2).message().contains("cell-3-corrupt.tif is not a TIFF file"), rows.get(2).toString());
		assertTrue(!rows.get(3).ok() && rows.get(3).message().contains("RGB"), rows.get(3).toString());
		assertTrue(Files.isRegularFile(out.resolve("cell-1-blur.tif")) && Files.isRegularFile(out.resolve("cell-2-blur.tif")));
		final List<String> summary = Files.readAllLines(out.resolve("summary.csv"));
		assertEquals("file,status,message,output,seconds", summary.get(0));
		assertEquals(2, summary.stream().filter(l -> l.contains(",failed,")).count());
		for (int i = 0; i < 4; i++) assertArrayEquals(before[i], Files.readAllBytes(inputs.get(i)), "input " + inputs.get(i) + " untouched");

		// A second run never replaces the first one's outputs or summary.
		BatchRunner.run(recipe, in, out, map);
		assertTrue(Files.isRegularFile(out.resolve("cell-1-blur-2.tif")) && Files.isRegularFile(out.resolve("summary-2.csv")));
	}

	/**
	 * Issue 17, item 9: a batch recipe with {@code output=16-bit} saves a 16-bit stack whose recorded scale and
	 * offset (provenance, and ImageJ's calibration function in the saved TIFF) map back to the 32-bit result of
	 * the same recipe without the key within half a step (uniform quantisation).
	 */
	@Test
	void aSixteenBitRecipeSaves16BitWhoseRecordedScaleMapsBackToThe32BitResult(@TempDir final Path dir) throws Exception {
		final Path in = Files.createDirectories(dir.resolve("in"));
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(24, 20, 6, 3).withVoxelSize(VoxelSize.microns(0.1, 0.1, 0.2)), "cell"))
				.saveAsTiff(in.resolve("cell.tif").toString()));
		final Path psf = dir.resolve("psf.tif");
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.gaussianPsf(5, 5, 3), "psf.tif")).saveAsTiff(psf.toString()));
		final Path map = Files.writeString(dir.resolve("map.csv"), "*.tif,psf.tif\n");
		final String line = "run(\"Deconvolve...\", \"image=[\" + inputTitle + \"] psf=[\" + psfTitle + \"] method=richardson-lucy iterations=4 "
				+ "regularization=0 stop=fixed threshold=0.001 edges=extended offset=0 background=0";
		final Path r32 = Files.writeString(dir.resolve("f.ijm"), line + "\");\n"), r16 = Files.writeString(dir.resolve("s.ijm"), line + " output=16-bit\");\n");
		assertTrue(BatchRunner.run(r32, in, dir.resolve("out"), map).get(0).ok());
		assertTrue(BatchRunner.run(r16, in, dir.resolve("out"), map).get(0).ok());
		final ImagePlus f = IJ.openImage(dir.resolve("out/cell-f.tif").toString()), s = IJ.openImage(dir.resolve("out/cell-s.tif").toString());
		assertEquals(ImagePlus.GRAY32, f.getType());
		assertEquals(ImagePlus.GRAY16, s.getType());
		final var rec = org.parfocal.provenance.Provenance.findIn((String) s.getProperty("Info")).orElseThrow();
		final double offset = ((Number) rec.run().get("output_offset")).doubleValue(), scale = ((Number) rec.run().get("output_scale")).doubleValue();
		assertEquals(ij.measure.Calibration.STRAIGHT_LINE, s.getCalibration().getFunction(), "the saved TIFF keeps the calibration function");
		double worst = 0;
		for (int z = 1; z <= f.getStackSize(); z++) {
			final float[] v = (float[]) f.getStack().getPixels(z);
			final short[] q = (short[]) s.getStack().getPixels(z);
			for (int i = 0; i < v.length; i++) {
				final double back = offset + scale * (q[i] & 0xffff);
				worst = Math.max(worst, Math.abs(back - v[i]) / scale);
				assertEquals(back, s.getCalibration().getCValue(q[i] & 0xffff), 1e-9 * Math.abs(back) + 1e-12);
			}
		}
		System.out.printf("batch 16-bit: scale %.6g, offset %.6g, largest error %.6f step(s)%n", scale, offset, worst);
		assertTrue(worst <= 0.5 + 1e-6, "within half a step: " + worst);
	}

	/** Issue 13, item 5: two batches into one output folder at once kept 3 files of 6; each must keep its own. */
	@Test
	void twoBatchesIntoOneFolderAtOnceKeepEveryFile(@TempDir final Path dir) throws Exception {
		final Path in = Files.createDirectories(dir.resolve("in")), out = dir.resolve("out");
		for (int k = 1; k <= 3; k++)
			assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(16, 16, 4, k).withVoxelSize(VoxelSize.microns(0.08, 0.08, 0.2)), "c" + k))
					.saveAsTiff(in.resolve("c" + k + ".tif").toString()));
		final Path psf = dir.resolve("psf.tif");
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.gaussianPsf(3, 3, 3), "psf.tif")).saveAsTiff(psf.toString()));
		final Path map = Files.writeString(dir.resolve("map.csv"), "*.tif,psf.tif\n");
		final Path recipe = Files.writeString(dir.resolve("blur.ijm"), "run(\"Convolve with PSF...\", \"image=[\" + inputTitle + \"] psf=[\" + psfTitle"
				+ " + \"] boundary=zero normalize background=0 photons=0 seed=1 offset=0\");\n");
		final java.util.concurrent.CyclicBarrier start = new java.util.concurrent.CyclicBarrier(2);
		final java.util.concurrent.ExecutorService pool = java.util.concurrent.Executors.newFixedThreadPool(2);
		try {
			final java.util.concurrent.Callable<List<BatchRunner.Row>> batch = () -> {
				start.await();
				return BatchRunner.run(recipe, in, out, map);
			};
			final var a = pool.submit(batch);
			final var b = pool.submit(batch);
			assertTrue(a.get().stream().allMatch(BatchRunner.Row::ok) && b.get().stream().allMatch(BatchRunner.Row::ok));
			final java.util.Set<String> names = new java.util.TreeSet<>();
			for (final var r : a.get()) names.add(r.output());
			for (final var r : b.get()) names.add(r.output());
			assertEquals(6, names.size(), "six distinct outputs: " + names);
		} finally {
			pool.shutdown();
		}
		try (var s = Files.list(out)) {
			final List<String> files = s.map(p -> p.getFileName().toString()).sorted().toList();
			assertEquals(8, files.size(), "six outputs and two summaries, nothing hidden left: " + files);
			assertTrue(files.contains("summary.csv") && files.contains("summary-2.csv"), files.toString());
		}
	}

	@Test
	void theBatchRefusesToWriteIntoItsInputFolder(@TempDir final Path dir) throws Exception {
		Files.writeString(dir.resolve("r.ijm"), "");
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> BatchRunner.run(dir.resolve("r.ijm"), dir, dir, null));
		assertTrue(e.getMessage().contains("must differ"), e.getMessage());
	}
}
