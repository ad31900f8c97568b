package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.testing.ImageJHarness;

/**
 * The record of a two-channel run keeps what each channel used (#17 item 7): the offset and background of every
 * channel, not only the first one's, and a note when one PSF served both channels. The two channels are the same
 * simulated recording on two camera offsets (100 and 160), so the estimated offsets must differ by 60 (the
 * simulation's own offset difference; the estimate is the recording's low-quantile floor, within one count).
 */
class ChannelRecordTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void everyChannelsLevelsAreRecordedAndASharedPsfIsNoted() {
		final ImagePlus one = DeconvolveCommandTest.recorded("one.tif");
		final Volume c1 = ImageBridge.toVolume(one, "image");
		final Volume c2 = c1.copy();
		final float[] d = c2.data();
		for (int i = 0; i < d.length; i++) d[i] += 60;
		final ImagePlus two = ImageBridge.toImagePlus(new Hyperstack(2, 1, List.of(c1, c2)), "cells2.tif", one.getCalibration());
		final ImagePlus psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(c1.voxelSize()), "psf.tif");
		ImageJHarness.open(two, psf);
		final ImageJHarness.Result r = ImageJHarness.run(two, "Deconvolve...",
				"image=cells2.tif psf=psf.tif method=richardson-lucy iterations=3 stop=fixed edges=non-circulant offset=auto background=dark");
		final Map<String, Object> run = ImageProvenance.of(r.onlyCreated()).orElseThrow().run();
		final List<?> offsets = (List<?>) run.get("offset_per_volume"), backgrounds = (List<?>) run.get("background_per_volume");
		assertEquals(2, offsets.size(), () -> "one offset per channel: " + run);
		assertEquals(2, backgrounds.size(), () -> "one background per channel: " + run);
		final double o1 = ((Number) offsets.get(0)).doubleValue(), o2 = ((Number) offsets.get(1)).doubleValue();
		assertEquals(60, o2 - o1, 1.0, "channel 2 sits 60 counts higher: " + offsets);
		assertEquals(((Number) backgrounds.get(0)).doubleValue(), ((Number) backgrounds.get(1)).doubleValue(), 1.0,
				"the same recording above its offset has the same background: " + backgrounds);
		assertTrue(run.get("notes").toString().contains("used for all 2 channels"), () -> "a shared PSF is noted: " + run.get("notes"));
	}
}
