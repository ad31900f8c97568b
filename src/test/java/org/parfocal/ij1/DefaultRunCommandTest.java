package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;

import ij.ImagePlus;

import org.parfocal.blocks.Recipe;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DefaultRun;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.testing.ImageJHarness;

/**
 * Issue 14.6: a Deconvolve line without method, iterations and stop runs the default run (accelerated RL, held-out
 * stop, cap 100), while a fully recorded line of before that change reproduces its old run exactly, and a line
 * that gives its iterations without stop still runs all of them. Reference: the core run with the same options.
 */
class DefaultRunCommandTest {

	private static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static Volume core(final ImagePlus img, final DeconvolutionOptions d) {
		return Deconvolution.run(ImageBridge.toCore(img).first(), DeconvolveCommandTest.gaussianPsf(), d, Monitor.NONE).estimate();
	}

	private static float[] pixels(final ImagePlus out) {
		return ImageBridge.toCore(out).first().data();
	}

	@Test
	void omittedKeysRunTheDefaultAndRecordedLinesReproduceTheirRun() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif"),
				psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		ImageJHarness.open(img, psf);
		// remembered interactive values never reach a macro
		ij.Prefs.set("parfocal.deconvolve.stop", "relative-change");
		ij.Prefs.set("parfocal.deconvolve.method", "wiener");

		final ImagePlus def = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=psf.tif offset=100 background=2").onlyCreated();
		final var p = ImageProvenance.of(def).orElseThrow();
		assertEquals(DeconvolutionMethod.RL_ACCELERATED.key(), p.options().get("method"));
		assertEquals("100", p.options().get("iterations"));
		assertEquals("held-out", p.options().get("stop"));
		final DeconvolutionOptions d = new DeconvolutionOptions(DefaultRun.METHOD, DefaultRun.CAP, 0.002, Stopping.HELD_OUT, 0.001, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.of(2));
		final Volume expected = core(img, d);
		assertArrayEquals(expected.data(), pixels(def), "the default run = the core's accelerated RL with the held-out stop");
		final long done = (Long) p.run().get("iterations");
		assertTrue(done >= 1 && done <= DefaultRun.CAP, "within the cap: " + p.run().get("stop_reason"));
		assertTrue(p.run().get("stop_reason").toString().contains("held-out error within the optics' band"), p.run().get("stop_reason").toString());

		// the recorded line of that run replays it exactly
		final ImagePlus again = ImageJHarness.run(img, "Deconvolve...", org.parfocal.provenance.MacroOptions.format(p.options())).onlyCreated();
		assertArrayEquals(pixels(def), pixels(again));

		// a line recorded before the default changed carries all its keys and reproduces its old run exactly
		final String old = "image=cell.tif psf=psf.tif method=richardson-lucy-tv iterations=12 regularization=0.002 stop=fixed threshold=0.001 "
				+ "edges=non-circulant offset=100 background=auto";
		final ImagePlus o = ImageJHarness.run(img, "Deconvolve...", old).onlyCreated();
		assertArrayEquals(core(img, new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 12, 0.002, Stopping.FIXED, 0.001, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.ESTIMATED)).data(), pixels(o));
		assertEquals(12L, ImageProvenance.of(o).orElseThrow().run().get("iterations"));

		// iterations given, stop left out: all of them, as before
		final ImagePlus n = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=psf.tif method=richardson-lucy iterations=7 offset=100 background=2")
				.onlyCreated();
		assertEquals("fixed", ImageProvenance.of(n).orElseThrow().options().get("stop"));
		assertEquals(7L, ImageProvenance.of(n).orElseThrow().run().get("iterations"));
	}

	/** Recipes (bin/parfocal-blocks, Spark) read omitted keys the same way. */
	@Test
	void recipesTakeTheSameDefaults() {
		final DeconvolutionOptions d = Recipe.parse("offset=100").options();
		assertEquals(DefaultRun.METHOD, d.method());
		assertEquals(DefaultRun.CAP, d.iterations());
		assertEquals(Stopping.HELD_OUT, d.stopping());
		final DeconvolutionOptions g = Recipe.parse("method=richardson-lucy iterations=5").options();
		assertEquals(Stopping.FIXED, g.stopping());
		assertEquals(5, g.iterations());
		assertEquals(Stopping.HELD_OUT, Recipe.parse("method=richardson-lucy iterations=5 stop=held-out").options().stopping());
	}
}
