package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;

import org.junit.jupiter.api.Test;

import ij.IJ;
import ij.ImagePlus;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Noise;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.ij1.ImageBridge;
import org.parfocal.testing.TestVolumes;

/**
 * Saturated voxels: detection on a real 8-bit recording (CellProfiler example nuclei, CC0, see
 * src/test/resources/real/SOURCES.md; its pixels at 255 counted independently here), and masked RL on a
 * seeded simulation clipped like a camera, judged against the simulation's truth.
 */
class SaturationTest {

	@Test
	void realEightBitNucleiImage() {
		final ImagePlus imp = IJ.openImage(getClass().getResource("/real/nuclei-8bit-cc0.tif").getPath());
		final Volume v = ImageBridge.toVolume(imp, "image");
		int at255 = 0;
		for (final float f : v.data()) if (f == 255) at255++;
		final Saturation s = Saturation.detect(v);
		assertNotNull(s);
		assertEquals(255, s.value());
		assertEquals(at255, s.count());
		assertTrue(at255 > 1000, "the file is known to hold thousands of saturated pixels: " + at255);
	}

	@Test
	void unsaturatedRecordingsAreNotFlagged() {
		assertNull(Saturation.detect(TestVolumes.random(3, 32, 32, 8))); // float values
		final float[] a = new float[4096];
		for (int i = 0; i < a.length; i++) a[i] = i % 200; // integers, max 199 reached 20 times, no spike over its neighbours
		assertNull(Saturation.detect(Volume.wrap(a, 64, 64, 1, VoxelSize.UNCALIBRATED)));
	}

	/** A bright blob clipped at 4095 (12-bit): masked RL recovers the blob closer to the truth than RL on clipped data. */
	@Test
	void maskedRichardsonLucyIsCloserToTheTruthOnClippedData() {
		final int n = 48, nz = 16;
		final Volume truth = Volume.zeros(n, n, nz, VoxelSize.UNCALIBRATED);
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < n; y++)
				for (int x = 0; x < n; x++) {
					final double r2 = (x - 24) * (x - 24) + (y - 24) * (y - 24) + 4 * (z - 8) * (z - 8);
					truth.data()[x + n * (y + n * z)] = (float) (r2 < 36 ? 3000 : 0) + ((x * 7 + y * 3) % 11 == 0 && z == 8 ? 800 : 0);
				}
		final Volume psf = TestVolumes.gaussianPsf(9, 9, 7, 1.5, 1.5, 1.2);
		final Volume blurred = ConvolutionOperator.create(psf, truth, Boundary.ZERO).apply(truth);
		final Volume rec = Noise.poisson(blurred, 1, 7);
		final float[] r = rec.data();
		int clipped = 0;
		for (int i = 0; i < r.length; i++) {
			r[i] = Math.min(4095, Math.round(r[i] + 10));
			if (r[i] == 4095) clipped++;
		}
		assertTrue(clipped > 50, "the simulation must saturate: " + clipped);
		final String count = clipped + " voxels";
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 60).withOffset(Level.of(10)).withEdges(EdgeMode.ZERO);
		final DeconvolutionResult masked = Deconvolution.run(rec, psf, o, null);
		assertTrue(masked.notes().stream().anyMatch(s -> s.startsWith(count) && s.contains("saturated")), masked.notes().toString());
		// the same data without detection: shift the clipped voxels 1 below so they are no longer a spike at 4095
		final float[] unmarked = r.clone();
		for (int i = 0; i < unmarked.length; i++) if (unmarked[i] == 4095) unmarked[i] = 4094.5f;
		final DeconvolutionResult plain = Deconvolution.run(Volume.wrap(unmarked, n, n, nz, VoxelSize.UNCALIBRATED), psf, o, null);
		assertTrue(plain.notes().stream().noneMatch(s -> s.contains("saturated")));
		final double em = rmse(masked.estimate(), truth), ep = rmse(plain.estimate(), truth);
		assertTrue(em < 0.9 * ep, "masked " + em + " vs plain " + ep);
	}

	private static double rmse(final Volume a, final Volume b) {
		double s = 0;
		for (int i = 0; i < a.data().length; i++) s += Math.pow(a.data()[i] - b.data()[i], 2);
		return Math.sqrt(s / a.data().length);
	}
}
