package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;

import java.nio.file.Path;
import java.util.List;

import ij.ImagePlus;
import ij.WindowManager;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.command.CompareRequest;
import org.parfocal.command.CompareRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.testing.ImageJHarness;

/**
 * The menu command {@code Compare with Sharp References...} and the front-end-free path ({@link CompareRequest#from}
 * + {@link CompareRunner#run}) give the same figures, to the last bit of every recorded double and the same table
 * text, on cases that use the keys: with input and PSF (χ²), estimated noise, matched resolution from the PSF and
 * from the input, old key names, references only. When this test was written the menu side was still the command's
 * own dialog → options → comparison path, so it proved the new path identical before that code was deleted. The
 * project's own consistency.
 */
class CompareWithReferencesRequestTest {

	private static final String CMD = "Compare with Sharp References...";

	@TempDir
	Path dir;

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void theMenuPathAndTheRequestPathGiveTheSameFigures() throws Exception {
		CompareWithReferencesCommandTest.writeReferences(dir, 2);
		final ImagePlus res = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.deconvolved(), "result.tif");
		final ImagePlus rec = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.recording(), "recording.tif");
		final ImagePlus psf = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.psf(), "psf.tif");
		final ImagePlus open = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.truth(102), "sharp-open-1.tif");
		ImageJHarness.open(res, rec, psf, open);
		final String folder = "reference_folder=[" + dir + "]";
		final List<String> cases = List.of(
				"result=result.tif " + folder + " reference_images=sharp-open-* input=recording.tif psf=psf.tif offset=100 background=5 photons=1 "
						+ "read_noise=0 patch_size=7 patches=1024 bootstrap=5 seed=3",
				"result=result.tif references=[" + dir + "] input=recording.tif psf=psf.tif offset=auto background=auto photons=2 read_noise=1.5 "
						+ "patch_size=5 patches=512 bootstrap=0 seed=4 estimate_noise match_resolution",
				"result=result.tif open_references=sharp-open-* input=recording.tif psf=none patch_size=7 patches=512 bootstrap=3 seed=5 match_resolution",
				"result=result.tif " + folder + " patch_size=7 patches=512 bootstrap=2 seed=6 match_resolution");
		for (final String options : cases) {
			final CompareRequest r = CompareRequest.from(MacroOptions.parse(org.parfocal.command.CommandKeys.check(org.parfocal.command.CommandKeys.COMPARE, options)));
			final List<Volume> refs = ReferenceImages.references(r.referenceFolder(), r.openReferences(), List.of(r.result(), r.input(), r.psf())).stream()
					.map(CompareWithReferences.Reference::volume).toList();
			final Volume input = CompareRequest.NONE.equals(r.input()) ? null : ImageBridge.toVolume(WindowManager.getImage(r.input()), "The input");
			final Volume kernel = CompareRequest.NONE.equals(r.psf()) ? null : ImageBridge.toVolume(WindowManager.getImage(r.psf()), "The PSF");
			final CompareRunner.Outcome direct = CompareRunner.run(r, ImageBridge.toVolume(res, "The result"), refs, input, kernel, Monitor.NONE);
			final ImagePlus plot = ImageJHarness.run(res, CMD, options).created().stream().filter(i -> i.getTitle().startsWith("Marginals of result"))
					.findFirst().orElseThrow();
			final Provenance p = ImageProvenance.of(plot).orElseThrow();
			final ReferenceComparison.Row row = direct.report().row(ReferenceComparison.PATCHES);
			assertEquals(row.distance(), number(p, "patch_distance"), 0, options);
			assertEquals(row.floor(), number(p, "floor"), 0, options);
			assertEquals(refs.size(), (int) number(p, "references"), options);
			assertEquals(direct.report().toText().strip().replace('\n', ';'), p.run().get("table"), options);
			if (direct.consistency() == null) assertNull(p.run().get("chi_square"), options);
			else {
				assertEquals(direct.consistency().meanChiSquare(), number(p, "chi_square"), 0, options);
				assertEquals(direct.consistency().whiteness(), number(p, "whiteness"), 0, options);
			}
			assertEquals(direct.expected() == null ? null : CompareRunner.expectedText(direct.expected(), true), p.run().get("expected_resolution"), options);
			assertEquals(direct.notes(), p.warnings(), options);
			assertEquals(r, CompareRequest.from(p.options()), options + ": the record reads back to the request");
		}
	}

	private static double number(final Provenance p, final String key) {
		return ((Number) p.run().get(key)).doubleValue();
	}
}
