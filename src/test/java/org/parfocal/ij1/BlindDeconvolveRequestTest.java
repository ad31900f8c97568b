package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;

import java.util.List;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.command.BlindRequest;
import org.parfocal.command.BlindRunner;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.testing.ImageJHarness;

/**
 * The menu command {@code Blind Deconvolve...} and the front-end-free path ({@link BlindRequest#from} +
 * {@link BlindRunner#run}) give the same object and PSF, float for float, the same recorded line and the same run
 * facts, on small seeded cases: a Gaussian start with the band limit's own optics, a start from the optics
 * (cropped to the image), an open PSF with the box in microns, a refined model fit, and a 2D image with a dark
 * background and periodic edges. When this test was written, the menu side was still the command's own dialog →
 * options → start PSF path ({@code BlindDeconvolveOptions}, {@code BlindStartPsf}), so it proved the new path
 * bit-identical to it before that code was deleted. The comparison is the project's own consistency.
 */
class BlindDeconvolveRequestTest {

	private static final String CMD = "Blind Deconvolve...";
	private static final String OPTIONS = BlindDeconvolveCommandTest.OPTIONS.replace("iterations=4", "iterations=3");
	private static final String NO_BAND = " na=1.2 immersion_index=1.333 emission=0.52";
	private static final String OPTICS = "model=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 coverslip_index=1.522 "
			+ "coverslip_thickness=170 depth=0 immersion_index_design=1.333 coverslip_index_design=1.522 coverslip_thickness_design=170 "
			+ "working_distance=150 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=15 size_z=0";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	static List<String> cases() {
		return List.of(OPTIONS, // Gaussian start, band limit from its own dialog, a 9 x 9 x 5 box
				OPTIONS.replace("psf=gaussian", "psf=from_optics").replace("support_xy=9 support_z=5", "support_xy=0 support_z=0")
						.replace("iterations=3", "iterations=2").replace(NO_BAND, "") + " " + OPTICS,
				OPTIONS.replace("psf=gaussian", "psf=psf.tif").replace("band_limit centring", "symmetric centring")
						.replace("support_xy=9 support_z=5 support_units=voxels", "support_xy=0.72 support_z=1.0 support_units=microns")
						.replace("object_updates=1 psf_updates=1", "object_updates=2 psf_updates=2").replace("snapshot_interval=2", "snapshot_interval=3")
						.replace(NO_BAND, ""),
				OPTIONS.replace("estimate=free-form trust_radius=0.2", "estimate=model-fit-refined trust_radius=0.15"),
				OPTIONS.replace("image=cell.tif", "image=plane.tif").replace("band_limit centring", "centring").replace(NO_BAND, "")
						.replace("support_z=5", "support_z=0").replace("edges=non-circulant", "edges=periodic").replace("background=auto", "background=dark"));
	}

	@Test
	void theMenuPathAndTheRequestPathGiveTheSameFloatsLineAndFacts() {
		for (final String options : cases()) {
			ImageJHarness.closeAll(); // fresh inputs, so the outputs' titles are the plain ones
			final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
			final ImagePlus psfImp = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(SampleScene.VOXEL), "psf.tif");
			final Volume cell = ImageBridge.toCore(img).first();
			final Volume plane = Volume.zeros(cell.nx(), cell.ny(), 1, SampleScene.VOXEL);
			System.arraycopy(cell.data(), 5 * cell.nx() * cell.ny(), plane.data(), 0, cell.nx() * cell.ny());
			ImageJHarness.open(img, psfImp, ImageBridge.toImagePlus(plane, "plane.tif"));
			final BlindRequest request = BlindRequest.from(MacroOptions.parse(options));
			final ImagePlus image = ij.WindowManager.getImage(request.image());
			final ImagePlus start = ij.WindowManager.getImage(request.psf());
			final Hyperstack open = start == null ? null : ImageBridge.toCore(start);
			final BlindRunner.Outcome viaRequest = Commands.withImageJThreads(() -> BlindRunner.run(request, ImageBridge.toCore(image).first(), open,
					start == null ? null : start.getTitle(), null, Monitor.NONE));
			final ImageJHarness.Result run = ImageJHarness.run(image, CMD, options);
			final String base = ConvolveWithPsf.stripExtension(image.getTitle());
			final ImagePlus object = created(run, base + "-blind.tif"), psf = created(run, base + "-blind-psf.tif");
			same(ImageBridge.toCore(object).first().data(), viaRequest.object().data(), options + ": object");
			same(ImageBridge.toCore(psf).first().data(), viaRequest.psf().data(), options + ": PSF");
			final Provenance record = ImageProvenance.of(object).orElseThrow();
			assertEquals(ImageJHarness.parseRunLine(record.macro())[1], request.macroOptions(), "the recorded line");
			for (final Map.Entry<String, Object> e : viaRequest.facts(request.iterations()).entrySet())
				assertEquals(String.valueOf(e.getValue()), String.valueOf(record.run().get(e.getKey())), options + ": run fact " + e.getKey());
			assertEquals(viaRequest.notes().isEmpty() ? null : String.join("; ", viaRequest.notes()), record.run().get("notes"), options + ": notes");
		}
	}

	/**
	 * Watch mode with {@code stop_at_suggestion} (a line with the watch keys' old names): the menu and the request
	 * path with the same references and watch return the same suggested iterate, line and facts. Written after the
	 * menu path had become the runner's, so it checks the translation of the watch, not the old code.
	 */
	@Test
	void watchModeGivesTheSameSuggestedIterate() {
		final String options = BlindDeconvolveCommandTest.WATCH + " stop_at_suggestion";
		final ImagePlus img = DeconvolveCommandTest.dimRecorded("cell.tif");
		final ImagePlus[] refs = DeconvolveCommandTest.sharpReferences();
		ImageJHarness.open(img, refs[0], refs[1], refs[2]);
		final BlindRequest request = BlindRequest.from(MacroOptions.parse(options));
		final Volume image = ImageBridge.toCore(img).first();
		final Deconvolve.Watch w = Deconvolve.Watch.of(request.watch());
		final BlindRunner.Outcome viaRequest = Commands.withImageJThreads(() -> BlindRunner.run(request, image, null, null,
				(o, notes) -> BlindDeconvolve.watch(w, image, o, CompareWithReferences.references(w.referenceFolder(), w.openReferences(), List.of("cell.tif")),
						Monitor.NONE, notes), Monitor.NONE));
		final ImagePlus object = created(ImageJHarness.run(img, CMD, options), "cell-blind.tif");
		same(ImageBridge.toCore(object).first().data(), viaRequest.object().data(), "watch: object");
		final Provenance record = ImageProvenance.of(object).orElseThrow();
		assertEquals(ImageJHarness.parseRunLine(record.macro())[1], request.macroOptions(), "the recorded line");
		assertEquals((long) viaRequest.watch().suggestion().iteration(), record.run().get("returned_iteration"));
		for (final Map.Entry<String, Object> e : viaRequest.facts(request.iterations()).entrySet())
			assertEquals(String.valueOf(e.getValue()), String.valueOf(record.run().get(e.getKey())), "run fact " + e.getKey());
	}

	private static ImagePlus created(final ImageJHarness.Result r, final String title) {
		final ImagePlus imp = r.created().stream().filter(i -> i.getTitle().equals(title)).findFirst().orElse(null);
		assertNotNull(imp, title + " among " + r.created());
		return imp;
	}

	private static void same(final float[] menu, final float[] request, final String what) {
		assertEquals(ConvolveWithPsfRequestTest.hash(menu), ConvolveWithPsfRequestTest.hash(request), what + ": hash of the float bits");
		assertArrayEquals(menu, request, what);
	}
}
