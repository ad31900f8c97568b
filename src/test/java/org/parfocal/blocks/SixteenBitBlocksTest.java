package org.parfocal.blocks;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;

import ij.IJ;
import ij.ImagePlus;
import ij.measure.Calibration;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.cli.BlockRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.SixteenBit;
import org.parfocal.core.Volume;
import org.parfocal.provenance.Provenance;
import org.parfocal.zarr.OmeZarr;
import org.parfocal.zarr.ZarrArray;

/**
 * {@code output=16-bit} in the block-wise runs (issue 17, item 9): the TIFF output is 16-bit, with one scale and
 * offset for the whole volume (decided when every block is in), recorded in the provenance, the Info and ImageJ's
 * calibration function, and mapping back to the 32-bit result of the same run within half a step (uniform
 * quantisation: |value − (offset + scale · round((value − offset) / scale))| ≤ scale / 2). An OME-Zarr output is
 * uint16 with the scaling in the record and in the array's CF attributes.
 */
class SixteenBitBlocksTest {

	@TempDir
	Path dir;

	static final Volume PSF = BlockScenes.psf(7, 5, 1.2, 1.0);

	/** Writes in.tif (a recording of the given seed and size) and psf.tif; returns an RL recipe with {@code rest}. */
	private String recipe(final long seed, final int[] size, final String rest) throws Exception {
		BlockRunnerFilesTest.write(BlockScenes.recording(seed, size[0], size[1], size[2], PSF), dir.resolve("in.tif"));
		BlockRunnerFilesTest.write(PSF, dir.resolve("psf.tif"));
		return "psf=" + dir.resolve("psf.tif") + " method=richardson-lucy " + rest;
	}

	@Test
	void blockRunnerWrites16BitWithOneRecordedScaleThatMapsBackWithinHalfAStep() throws Exception {
		final String recipe = recipe(7, new int[] { 48, 44, 20 }, "iterations=6 stop=fixed offset=auto background=auto");
		final int[] tile = { 20, 20, 10 };
		final BlockRunner.Outcome f = BlockRunner.run(Recipe.parse(recipe), dir.resolve("in.tif"), dir.resolve("f.tif"), 0, tile, Monitor.NONE);
		final BlockRunner.Outcome s = BlockRunner.run(Recipe.parse(recipe + " output=16-bit"), dir.resolve("in.tif"), dir.resolve("s.tif"), 0, tile,
				Monitor.NONE);
		assertTrue(s.plan().count() > 1, "several blocks: " + s.plan());
		final ImagePlus a = IJ.openImage(f.output().toString()), b = IJ.openImage(s.output().toString());
		assertEquals(ImagePlus.GRAY32, a.getType());
		assertEquals(ImagePlus.GRAY16, b.getType());
		final Provenance p = Provenance.findIn((String) b.getProperty("Info")).orElseThrow();
		assertEquals("16-bit", p.options().get("output"));
		assertEquals("16-bit", p.run().get("output_depth"));
		final double offset = ((Number) p.run().get("output_offset")).doubleValue(), scale = ((Number) p.run().get("output_scale")).doubleValue();
		assertTrue(((String) b.getProperty("Info")).contains(new SixteenBit.Scaling(offset, scale).infoLine()));
		final Calibration cal = b.getCalibration();
		assertEquals(Calibration.STRAIGHT_LINE, cal.getFunction(), "ImageJ reads the calibration function back from the TIFF");
		double worst = 0, min = Double.MAX_VALUE, max = -Double.MAX_VALUE;
		int lo = Integer.MAX_VALUE, hi = 0;
		for (int z = 1; z <= a.getStackSize(); z++) {
			final float[] v = (float[]) a.getStack().getPixels(z);
			final short[] q = (short[]) b.getStack().getPixels(z);
			for (int i = 0; i < v.length; i++) {
				final int stored = q[i] & 0xffff;
				final double back = offset + scale * stored;
				worst = Math.max(worst, Math.abs(back - v[i]) / scale);
				assertEquals(back, cal.getCValue(stored), 1e-9 * Math.abs(back) + 1e-12, "ImageJ shows the real value");
				lo = Math.min(lo, stored);
				hi = Math.max(hi, stored);
				min = Math.min(min, v[i]);
				max = Math.max(max, v[i]);
			}
		}
		System.out.printf("blocks 16-bit: %d blocks, scale %.6g, offset %.6g, largest error %.6f step(s)%n", s.plan().count(), scale, offset, worst);
		assertTrue(worst <= 0.5 + 1e-6, "within half a step: " + worst);
		// one scaling for the whole volume, from its own extremes (not per block): the range fills 0 … 65535
		assertEquals(0, lo);
		assertEquals(SixteenBit.MAX_STORED, hi);
		assertEquals(min, offset, 1e-6 * Math.abs(max));
		assertEquals((max - min) / SixteenBit.MAX_STORED, scale, 1e-6 * scale);
	}

	@Test
	void anOmeZarrOutputIsUint16WithOneRecordedScaleThatMapsBackWithinHalfAStep() throws Exception {
		final String recipe = recipe(8, new int[] { 40, 36, 12 }, "iterations=3 stop=fixed offset=auto background=auto");
		final int[] tile = { 20, 20, 0 };
		BlockRunner.run(Recipe.parse(recipe), dir.resolve("in.tif"), dir.resolve("f.zarr"), 0, tile, Monitor.NONE);
		final BlockRunner.Outcome o = BlockRunner.run(Recipe.parse(recipe + " output=16-bit"), dir.resolve("in.tif"), dir.resolve("s.zarr"), 0, tile,
				Monitor.NONE);
		assertTrue(o.plan().count() > 1, o.plan().toString());
		final OmeZarr f = OmeZarr.open(dir.resolve("f.zarr")), s = OmeZarr.open(dir.resolve("s.zarr"));
		assertEquals(ZarrArray.UINT16, s.array().dtype());
		final Provenance p = Provenance.fromJson(s.provenanceJson());
		assertEquals("16-bit", p.run().get("output_depth"));
		final double offset = ((Number) p.run().get("output_offset")).doubleValue(), scale = ((Number) p.run().get("output_scale")).doubleValue();
		// the CF attributes (value = add_offset + scale_factor · stored) that xarray applies when it reads the array
		final var attrs = com.google.gson.JsonParser.parseString(Files.readString(dir.resolve("s.zarr/0/.zattrs"))).getAsJsonObject();
		assertEquals(scale, attrs.get("scale_factor").getAsDouble());
		assertEquals(offset, attrs.get("add_offset").getAsDouble());
		final int[] n = f.shape();
		final Volume a = f.read(0, 0, new int[3], n), q = s.read(0, 0, new int[3], n);
		double worst = 0, lo = Double.MAX_VALUE, hi = 0;
		for (int i = 0; i < a.data().length; i++) {
			final float stored = q.data()[i];
			worst = Math.max(worst, Math.abs(offset + scale * stored - a.data()[i]) / scale);
			lo = Math.min(lo, stored);
			hi = Math.max(hi, stored);
		}
		System.out.printf("Zarr 16-bit: %d blocks, scale %.6g, offset %.6g, largest error %.6f step(s)%n", o.plan().count(), scale, offset, worst);
		assertTrue(worst <= 0.5 + 1e-6, "within half a step: " + worst);
		assertEquals(0, lo, "one scaling for the whole image, from its own extremes (edge chunks' padding left out)");
		assertEquals(SixteenBit.MAX_STORED, hi);
	}

	@Test
	void theRecipeReadsOutputAsTheMenuCommandDoes() {
		assertFalse(Recipe.parse("psf=from_optics voxel_xy=0.1 voxel_z=0.2").sixteenBit(), "no key: 32-bit, as lines recorded before the key");
		assertFalse(Recipe.parse("psf=a/b.tif output=32-bit").sixteenBit());
		assertTrue(Recipe.parse("psf=a/b.tif output=16-bit").sixteenBit());
		assertTrue(Recipe.parse("psf=a/b.tif output=16-bit").withPsfFile("c.tif").sixteenBit());
		assertEquals("Unknown output depth '8-bit': use 32-bit or 16-bit (output=)",
				assertThrows(IllegalArgumentException.class, () -> Recipe.parse("psf=a/b.tif output=8-bit")).getMessage());
	}
}
