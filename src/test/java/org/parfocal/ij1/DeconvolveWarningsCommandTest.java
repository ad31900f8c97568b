package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.testing.ImageJHarness;

/**
 * Deconvolve's warnings reach the provenance (and the Log): a PSF cut off by its box, and a watched run whose
 * χ² curve gives no answer inside the evaluated range. Scene: {@link DeconvolveCommandTest}'s cell. The cut-off
 * PSF is a flat 5 × 5 × 5 block (its edge is at 100 % of a plane's mean: the definition of
 * {@code PsfExtent.edgeLevel}); with a 2-iteration watch the re-blur χ² is still far above 1 (a blurred estimate
 * under-fits, see {@code ReblurConsistency}).
 */
class DeconvolveWarningsCommandTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static ImagePlus output(final ImageJHarness.Result r) {
		return r.created().stream().filter(i -> i.getTitle().equals("cell-deconvolved.tif")).findFirst().orElseThrow();
	}

	@Test
	void cutOffPsfAndEdgeSuggestionAreRecorded() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final Volume block = Volume.zeros(5, 5, 5, null);
		java.util.Arrays.fill(block.data(), 1f / 125);
		final ImagePlus flat = ImageBridge.toImagePlus(block.withVoxelSize(ImageBridge.toCore(img).voxelSize()), "flat.tif");
		final ImagePlus gauss = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(ImageBridge.toCore(img).voxelSize()), "psf.tif");
		DeconvolveCommandTest.open(img, flat, gauss);
		final ImageJHarness.Result cut = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=flat.tif method=richardson-lucy iterations=2 regularization=0 "
				+ "stop=fixed threshold=0.001 edges=non-circulant offset=100 background=2");
		final String notes = String.valueOf(ImageProvenance.of(output(cut)).orElseThrow().run().get("notes"));
		assertTrue(notes.contains("cut off laterally") && notes.contains("100 %"), notes);
		ImageJHarness.closeAll();
		DeconvolveCommandTest.open(img, gauss);
		final ImageJHarness.Result w = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=psf.tif method=richardson-lucy iterations=2 regularization=0 "
				+ "stop=fixed threshold=0.001 edges=non-circulant offset=100 background=2 watch every=1 references=[] open_references=[] photons=1 read_noise=0");
		final var run = ImageProvenance.of(output(w)).orElseThrow().run();
		assertEquals(false, run.get("suggestion_interior"), run.toString());
		assertTrue(String.valueOf(run.get("notes")).contains("no interior crossing"), run.toString());
		// the 9 x 9 x 5 Gaussian fits its box laterally; axially it is cut at 1.3 σ (outer planes 45 % of the central one) and is flagged so
		assertTrue(!String.valueOf(run.get("notes")).contains("cut off laterally") && String.valueOf(run.get("notes")).contains("cut off axially"), run.get("notes").toString());
	}
}
