package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.testing.ImageJHarness;

/**
 * Deconvolve's watch mode with {@code match_resolution}: references at half the recording's voxel size are blurred
 * to the expected resolution (the PSF's FWHM / 2, {@link org.parfocal.quality.MatchedResolution}) and the record and
 * the notes say so; a line without the key (every line recorded before it) compares the references as they are.
 */
class WatchMatchedResolutionTest {

	private static final String LINE = "image=cell.tif psf=psf.tif method=richardson-lucy iterations=6 stop=fixed edges=non-circulant offset=100 "
			+ "background=dark watch every=3 reference_folder=[] reference_images=[ref-*] photons=1 read_noise=0";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static Map<String, Object> run(final String line) {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(VoxelSize.microns(0.08, 0.08, 0.2)), "psf.tif");
		final ImagePlus ref = ImageBridge.toImagePlus(SampleScene.cell(80, 72, 20, 11).withVoxelSize(VoxelSize.microns(0.04, 0.04, 0.1)), "ref-1.tif");
		ImageJHarness.open(img, psf, ref);
		final ImageJHarness.Result r = ImageJHarness.run(img, "Deconvolve...", line);
		final ImagePlus out = r.created().stream().filter(i -> i.getTitle().startsWith("cell-deconvolved")).findFirst().orElseThrow();
		final var record = ImageProvenance.of(out).orElseThrow();
		return Map.of("run", record.run(), "options", record.options());
	}

	@Test
	void matchedReferencesAreSaidInTheRecordAndOldLinesCompareAsBefore() {
		final Map<String, Object> matched = run(LINE + " match_resolution");
		assertTrue(((Map<?, ?>) matched.get("options")).containsKey("match_resolution"), () -> "the key is recorded: " + matched.get("options"));
		final String notes = String.valueOf(((Map<?, ?>) matched.get("run")).get("notes"));
		assertTrue(notes.contains("watch references blurred to the expected resolution"), notes);
		// the PSF is SampleScene.gaussianPsf: its FWHM / 2 in µm is what the note gives (lateral below the PSF's own FWHM)
		assertTrue(notes.contains("µm (the PSF's FWHM / 2)"), notes);

		final Map<String, Object> plain = run(LINE);
		assertFalse(((Map<?, ?>) plain.get("options")).containsKey("match_resolution"), () -> "not added to old lines: " + plain.get("options"));
		assertFalse(String.valueOf(((Map<?, ?>) plain.get("run")).get("notes")).contains("blurred to the expected resolution"));
	}
}
