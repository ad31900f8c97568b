package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Choice;
import java.awt.TextField;
import java.awt.event.KeyEvent;
import java.util.List;
import java.util.concurrent.atomic.AtomicBoolean;

import ij.IJ;
import ij.ImagePlus;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.demo.SampleScene;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

class DeconvolveCommandTest {

	private static final String CMD = "Deconvolve...";
	static final List<String> KEYS = List.of("image", "psf", "method", "iterations", "regularization", "stop", "threshold", "edges", "offset",
			"background", "plot");
	private static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	/** Own synthetic data: the sample scene's cell, small, blurred by a Gaussian PSF with Poisson noise and an offset. */
	static Volume truth() {
		return SampleScene.cell(40, 36, 10, 7);
	}

	static Volume gaussianPsf() {
		return SampleScene.gaussianPsf(9, 9, 5);
	}

	static ImagePlus recorded(final String title) {
		final Volume y = new Acquisition(gaussianPsf(), truth().shape(), new Acquisition.Options(Boundary.ZERO, true, 2, 1, 5, 100)).record(truth(),
				Monitor.NONE);
		return ImageBridge.toImagePlus(y.withVoxelSize(VOXEL), title);
	}

	static void open(final ImagePlus... imps) {
		ImageJHarness.open(imps);
	}

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	static final String OPTIONS = "image=cell.tif psf=psf.tif method=richardson-lucy-tv iterations=12 regularization=0.002 stop=fixed "
			+ "threshold=0.001 edges=non-circulant offset=100 background=auto";

	@Test
	void runByMenuNameEqualsTheCoreWithProvenanceAndKeepsTheInput() {
		final ImagePlus img = recorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		open(img, psf);
		final float[] before = ((float[]) img.getStack().getPixels(5)).clone();
		final ImagePlus out = ImageJHarness.run(img, CMD, OPTIONS).onlyCreated();
		assertArrayEquals(before, (float[]) img.getStack().getPixels(5), "input unchanged");
		assertEquals(0.2, out.getCalibration().pixelDepth, 1e-12);
		final DeconvolutionOptions d = new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 12, 0.002, Stopping.FIXED, 0.001, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.ESTIMATED);
		final Volume core = Deconvolution.run(ImageBridge.toCore(img).first(), gaussianPsf(), d, Monitor.NONE).estimate();
		assertArrayEquals(core.data(), ImageBridge.toCore(out).first().data(), 1e-6f * max(core.data()), "command = core");
		final var p = ImageProvenance.of(out).orElseThrow();
		assertEquals(KEYS.subList(0, KEYS.size() - 1), List.copyOf(p.options().keySet()));
		assertEquals(12L, p.run().get("iterations"));
		assertTrue(p.run().get("stop_reason").toString().contains("12 iteration"));
		assertEquals(ImageProvenance.sha256(psf), p.inputs().get(1).sha256());
	}

	@Test
	void psfFromOpticsInTheSameCommand() {
		final ImagePlus img = recorded("cell.tif");
		open(img);
		final String optics = "model=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 coverslip_index=1.522 "
				+ "coverslip_thickness=170 depth=0 immersion_index_design=1.333 coverslip_index_design=1.522 coverslip_thickness_design=170 "
				+ "working_distance=150 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=15 size_z=7";
		final String options = OPTIONS.replace("psf=psf.tif", "psf=from_optics").replace("iterations=12", "iterations=5") + " " + optics;
		final ImageJHarness.Result run = ImageJHarness.run(img, CMD, options);
		final ImagePlus out = run.onlyCreated();
		final Volume psf = PsfModels.get("born-wolf").compute(Optics.builder().na(1.2).immersionIndex(1.333).emissionWavelength(0.52).build(),
				new PsfGrid(15, 15, 7, 0.08, 0.08, 0.2));
		final DeconvolutionOptions d = new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 5, 0.002, Stopping.FIXED, 0.001, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.ESTIMATED);
		final Volume core = Deconvolution.run(ImageBridge.toCore(img).first(), psf, d, Monitor.NONE).estimate();
		assertArrayEquals(core.data(), ImageBridge.toCore(out).first().data(), 1e-6f * max(core.data()));
		final var keys = ImageProvenance.of(out).orElseThrow().options().keySet();
		assertTrue(keys.containsAll(List.of("na", "sample_index", "voxel_z", "size_xy")), keys.toString());
		// issue 17: the pinhole was given but a widefield PSF has none: accepted, recorded, ignored, and said once
		final java.util.Map<?, ?> ignored = (java.util.Map<?, ?>) ImageProvenance.of(out).orElseThrow().run().get("ignored");
		assertEquals("widefield modality has no pinhole", ignored.get("pinhole"), String.valueOf(ignored));
		assertTrue(ignored.containsKey("working_distance") && !ignored.containsKey("na") && !ignored.containsKey("emission"), String.valueOf(ignored));
		assertEquals(1, run.log().stream().filter(l -> l.startsWith("Deconvolve: not used by born-wolf widefield, ignored:")).count(), run.log()::toString);
	}

	/** A stack whose padded transform does not fit the memory budget is deconvolved block by block, and says so. */
	@Test
	void tooLargeForTheBudgetGoesBlockByBlockAndMatchesTheWholeRun() {
		final Volume big = SampleScene.cell(140, 120, 10, 7);
		final Volume y = new Acquisition(gaussianPsf(), big.shape(), new Acquisition.Options(Boundary.ZERO, true, 2, 1, 5, 100)).record(big, Monitor.NONE);
		final ImagePlus img = ImageBridge.toImagePlus(y.withVoxelSize(VOXEL), "cell.tif");
		final ImagePlus psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		open(img, psf);
		final String options = OPTIONS.replace("iterations=12", "iterations=8");
		final ImagePlus whole = ImageJHarness.run(img, CMD, options).onlyCreated();
		final ImageJHarness.Result r;
		final Volume v = ImageBridge.toCore(img).first();
		final DeconvolutionOptions d = new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 8, 0.002, Stopping.FIXED, 0.001, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.ESTIMATED);
		// 60 % of what the whole-stack run needs: too little, so the stack is cut into a few blocks
		final long needed = Deconvolution.bytesNeeded(v.shape(), gaussianPsf().shape(), d) + 8L * v.size();
		System.setProperty(Deconvolve.BUDGET_PROPERTY, Long.toString(needed * 6 / 10));
		try {
			r = ImageJHarness.run(img, CMD, options);
		} finally {
			System.clearProperty(Deconvolve.BUDGET_PROPERTY);
		}
		assertTrue(String.join("\n", r.log()).contains("deconvolving block by block"), () -> String.join("\n", r.log()));
		final ImagePlus blocks = r.onlyCreated();
		final var p = ImageProvenance.of(blocks).orElseThrow();
		assertTrue(p.run().get("block_plan") instanceof java.util.Map<?, ?>, "the block plan is in the provenance");
		final float[] a = ImageBridge.toCore(whole).first().data(), b = ImageBridge.toCore(blocks).first().data();
		float range = 0, diff = 0;
		for (int i = 0; i < a.length; i++) {
			range = Math.max(range, a[i]);
			diff = Math.max(diff, Math.abs(a[i] - b[i]));
		}
		assertTrue(diff <= 0.01 * range, "block-wise within 1 % of the range: " + diff / range);
	}

	@Test
	void aPsfAtAnotherVoxelSizeIsResampledAndSaysSo() {
		final ImagePlus img = recorded("cell.tif");
		final ImagePlus fine = ImageBridge.toImagePlus(SampleScene.gaussianPsf(17, 17, 9).withVoxelSize(VoxelSize.microns(0.04, 0.04, 0.1)), "psf.tif");
		open(img, fine);
		final ImageJHarness.Result r = ImageJHarness.run(img, CMD, OPTIONS.replace("iterations=12", "iterations=2"));
		assertTrue(String.join("\n", r.log()).contains("PSF resampled from 0.04 x 0.04 x 0.1 µm"), () -> String.join("\n", r.log()));
		assertTrue(ImageProvenance.of(r.onlyCreated()).orElseThrow().run().get("notes").toString().contains("resampled"));
	}

	@Test
	void badInputIsRefusedInOneLineAndNothingIsCreated() {
		final ImagePlus img = recorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		final ImagePlus flat = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 1).withVoxelSize(VOXEL), "flat.tif");
		final Volume nanVol = ImageBridge.toCore(img).first().copy();
		nanVol.set(3, 3, 3, Float.NaN);
		final ImagePlus nan = ImageBridge.toImagePlus(nanVol, "nan.tif");
		open(img, psf, flat, nan);
		assertFails("Iterations must be between 1 and 10000", img, OPTIONS.replace("iterations=12", "iterations=0"));
		assertFails("Iterations must be between 1 and 10000", img, OPTIONS.replace("iterations=12", "iterations=20000"));
		assertFails("regularisation weight must be 0 or more", img, OPTIONS.replace("regularization=0.002", "regularization=-1"));
		assertFails("'sharpest'", img, OPTIONS.replace("method=richardson-lucy-tv", "method=sharpest"));
		assertFails("'dark' is not a number or auto (offset=)", img, OPTIONS.replace("offset=100", "offset=dark"));
		assertFails("2D", img, OPTIONS.replace("psf=psf.tif", "psf=flat.tif"));
		assertFails("non-finite", nan, OPTIONS.replace("image=cell.tif", "image=nan.tif"));
	}

	private static void assertFails(final String expected, final ImagePlus current, final String options) {
		final int before = Interpreter.getBatchModeImageIDs().length;
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(current, CMD, options));
		assertTrue(e.getMessage().contains(expected), e.getMessage());
		assertEquals(before, Interpreter.getBatchModeImageIDs().length, "nothing created");
	}

	/** Esc (ImageJ's escape flag) stops the run: no output, input untouched. */
	@Test
	void escapeCancelsCleanly() throws Exception {
		final ImagePlus img = recorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		open(img, psf);
		final float[] before = ((float[]) img.getStack().getPixels(3)).clone();
		final AtomicBoolean done = new AtomicBoolean();
		final Thread presser = new Thread(() -> {
			while (!done.get()) {
				IJ.setKeyDown(KeyEvent.VK_ESCAPE);
				try {
					Thread.sleep(5);
				} catch (final InterruptedException e) {
					return;
				}
			}
		});
		presser.start();
		final ImageJHarness.Result r;
		try {
			r = ImageJHarness.run(img, CMD, OPTIONS.replace("iterations=12", "iterations=10000"));
		} finally {
			done.set(true);
			presser.join();
			IJ.resetEscape();
			IJ.setKeyUp(KeyEvent.VK_ESCAPE);
		}
		assertTrue(r.created().stream().noneMatch(i -> i.getTitle().contains("deconvolved")), "nothing created: " + r.created());
		assertEquals(2, Interpreter.getBatchModeImageIDs().length, "only the two inputs are open");
		assertArrayEquals(before, (float[]) img.getStack().getPixels(3));
		assertNull(ImageProvenance.of(img).orElse(null), "input untouched");
	}

	/** Sharp references of the same kind: other cells of the sample scene (our own synthetic data), calibrated like the recording. */
	static ImagePlus[] sharpReferences() {
		final ImagePlus[] refs = new ImagePlus[3];
		for (int i = 0; i < refs.length; i++) refs[i] = ImageBridge.toImagePlus(SampleScene.cell(40, 36, 10, 100 + i).withVoxelSize(VOXEL), "sharp-" + i + ".tif");
		return refs;
	}

	/** A dimmer recording (0.02 photons per unit), where RL starts fitting noise within 60 iterations. */
	static ImagePlus dimRecorded(final String title) {
		final Volume y = new Acquisition(gaussianPsf(), truth().shape(), new Acquisition.Options(Boundary.ZERO, true, 2, 0.02, 5, 100)).record(truth(),
				Monitor.NONE);
		return ImageBridge.toImagePlus(y.withVoxelSize(VOXEL), title);
	}

	static final String WATCH = "image=cell.tif psf=psf.tif method=richardson-lucy iterations=60 regularization=0 stop=fixed threshold=0.001 "
			+ "edges=non-circulant offset=100 background=2 watch every=3 references=[] open_references=sharp-* photons=0.02 read_noise=0";

	/**
	 * Watch mode: the suggestion equals the core watch's (same references, same noise model), the plot is made,
	 * and with stop_at_suggestion the output is the iterate of a run stopped at the suggested iteration; the
	 * provenance holds the keys, the rule, the suggestion and the curve.
	 */
	@Test
	void watchModeSuggestsAnIterationAndCanReturnIt() {
		final ImagePlus img = dimRecorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		final ImagePlus[] refs = sharpReferences();
		open(img, psf, refs[0], refs[1], refs[2]);
		final ImageJHarness.Result r = ImageJHarness.run(img, CMD, WATCH + " stop_at_suggestion");
		final ImagePlus out = r.created().stream().filter(i -> i.getTitle().equals("cell-deconvolved.tif")).findFirst().orElseThrow();
		assertTrue(r.created().stream().anyMatch(i -> i.getTitle().startsWith("Quality of cell-deconvolved")), "quality plot: " + r.created());
		// the core watch with the same settings
		final Volume y = ImageBridge.toCore(img).first();
		final java.util.List<Volume> refVolumes = java.util.Arrays.stream(refs).map(i -> ImageBridge.toCore(i).first()).toList();
		final org.parfocal.quality.QualityWatch w = new org.parfocal.quality.QualityWatch(
				org.parfocal.quality.ReferenceComparison.prepare(refVolumes, y, org.parfocal.quality.ReferenceComparison.Options.defaults(), Monitor.NONE),
				org.parfocal.quality.QualityWatch.Consistency.forDeconvolution(y, gaussianPsf(), false, 100, 2, 0.02, 0), 3, false, VOXEL);
		final DeconvolutionOptions d = new DeconvolutionOptions(DeconvolutionMethod.RL, 60, 0, Stopping.FIXED, 0.001, EdgeMode.NON_CIRCULANT, Level.of(100),
				Level.of(2));
		Deconvolution.run(y, gaussianPsf(), d, null, Monitor.NONE, w);
		final int k = w.suggestion().iteration();
		assertEquals(20, w.points().size());
		final var p = ImageProvenance.of(out).orElseThrow();
		assertEquals((long) k, p.run().get("suggested_iteration"));
		assertEquals((long) k, p.run().get("returned_iteration"));
		assertTrue(p.run().get("stop_reason").toString().contains("suggested iterate " + k), p.run().get("stop_reason").toString());
		assertEquals(20, p.run().get("watch_curve").toString().split(";").length);
		assertEquals(org.parfocal.quality.StoppingRule.DESCRIPTION, p.run().get("watch_rule"));
		assertEquals(List.of("image", "psf", "method", "iterations", "regularization", "stop", "threshold", "edges", "offset", "background", "watch", "every",
				"reference_folder", "reference_images", "photons", "read_noise", "stop_at_suggestion"), List.copyOf(p.options().keySet()));
		final Volume stopped = Deconvolution.run(y, gaussianPsf(), d.withIterations(k), Monitor.NONE).estimate();
		assertArrayEquals(stopped.data(), ImageBridge.toCore(out).first().data(), 1e-6f * max(stopped.data()), "output = the iterate at the suggestion");
		// χ² only (no references): the last iterate with χ² ≥ 1, here well before the end
		final ImagePlus chiOnly = ImageJHarness.run(img, CMD, WATCH.replace("open_references=sharp-*", "open_references=[]") + " stop_at_suggestion").created()
				.stream().filter(i -> i.getTitle().startsWith("cell-deconvolved")).findFirst().orElseThrow();
		final org.parfocal.quality.QualityWatch wc = new org.parfocal.quality.QualityWatch(null,
				org.parfocal.quality.QualityWatch.Consistency.forDeconvolution(y, gaussianPsf(), false, 100, 2, 0.02, 0), 3, false, VOXEL);
		Deconvolution.run(y, gaussianPsf(), d, null, Monitor.NONE, wc);
		final int kc = wc.suggestion().iteration();
		assertTrue(kc > 0 && kc < 60, "chi-square-only suggestion " + kc);
		assertEquals((long) kc, ImageProvenance.of(chiOnly).orElseThrow().run().get("returned_iteration"));
		final Volume stoppedChi = Deconvolution.run(y, gaussianPsf(), d.withIterations(kc), Monitor.NONE).estimate();
		assertArrayEquals(stoppedChi.data(), ImageBridge.toCore(chiOnly).first().data(), 1e-6f * max(stoppedChi.data()));
		// without stop_at_suggestion the output is the last iterate, as without watch mode
		final ImagePlus last = ImageJHarness.run(img, CMD, WATCH).created().stream()
				.filter(i -> i.getTitle().startsWith("cell-deconvolved")).findFirst().orElseThrow();
		final Volume core = Deconvolution.run(y, gaussianPsf(), d, Monitor.NONE).estimate();
		assertArrayEquals(core.data(), ImageBridge.toCore(last).first().data(), 1e-6f * max(core.data()));
	}

	/**
	 * background=fit through the macro: the output equals the core run's, the provenance records the fitted value
	 * (not the start) and the note; estimate_noise puts the watch's noise model, estimated from the recording, in
	 * the notes, and a line without it keeps the given photons (old macros).
	 */
	@Test
	void backgroundFitAndEstimatedNoiseThroughTheMacro() {
		final ImagePlus img = recorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		open(img, psf);
		final String fit = OPTIONS.replace("background=auto", "background=fit");
		final ImagePlus out = ImageJHarness.run(img, CMD, fit).onlyCreated();
		final DeconvolutionOptions d = new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 12, 0.002, Stopping.FIXED, 0.001, EdgeMode.NON_CIRCULANT,
				Level.of(100), Level.FIT);
		final org.parfocal.deconv.DeconvolutionResult core = Deconvolution.run(ImageBridge.toCore(img).first(), gaussianPsf(), d, Monitor.NONE);
		assertArrayEquals(core.estimate().data(), ImageBridge.toCore(out).first().data(), 1e-6f * max(core.estimate().data()), "command = core");
		final var p = ImageProvenance.of(out).orElseThrow();
		assertEquals("fit", p.options().get("background"));
		assertEquals(core.background(), ((Number) p.run().get("background")).doubleValue(), 1e-9 * core.background());
		assertTrue(p.run().get("notes").toString().contains("Background fitted with the object"), p.run().get("notes").toString());
		final String watch = fit + " watch every=4 reference_folder=[] reference_images=[] photons=1 read_noise=0";
		final var withEstimate = ImageProvenance.of(ImageJHarness.run(img, CMD, watch + " estimate_noise").created().stream()
				.filter(i -> i.getTitle().startsWith("cell-deconvolved")).findFirst().orElseThrow()).orElseThrow();
		assertTrue(withEstimate.run().get("notes").toString().contains("watch noise model estimated from the recording"), withEstimate.run().get("notes").toString());
		final var without = ImageProvenance.of(ImageJHarness.run(img, CMD, watch).created().stream()
				.filter(i -> i.getTitle().startsWith("cell-deconvolved")).findFirst().orElseThrow()).orElseThrow();
		assertTrue(!without.run().get("notes").toString().contains("watch noise model"), without.run().get("notes").toString());
	}

	@Test
	void watchModeBadInputIsRefusedInOneLine() {
		final ImagePlus img = recorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		final ImagePlus[] refs = sharpReferences();
		final ImagePlus bare = ImageBridge.toImagePlus(SampleScene.cell(40, 36, 10, 200).withVoxelSize(VoxelSize.UNCALIBRATED), "bare-ref.tif");
		final ImagePlus flat = ImageBridge.toImagePlus(SampleScene.cell(40, 36, 1, 200).withVoxelSize(VOXEL), "flat-ref.tif");
		open(img, psf, refs[0], refs[1], refs[2], bare, flat);
		final String w = WATCH;
		assertFails("Watch mode needs an iterative method", img, w.replace("method=richardson-lucy", "method=wiener").replace("regularization=0", "regularization=0.001"));
		assertFails("Evaluate every 1 to 10000 iterations, got 0 (every=)", img, w.replace("every=3", "every=0"));
		assertFails("The reference folder '/no/such/folder' does not exist", img, w.replace("references=[]", "references=/no/such/folder"));
		assertFails("No open image matches the reference pattern 'lantern-*'", img, w.replace("sharp-*", "lantern-*"));
		assertFails("add ignore_calibration", img, w.replace("sharp-*", "bare-ref.tif"));
		assertFails("Reference 1 ('flat-ref.tif') is 2D but the result is 3D", img, w.replace("sharp-*", "flat-ref.tif"));
		assertFails("Photons per unit must be positive", img, w.replace("photons=0.02", "photons=0"));
	}

	@Test
	@Tag("display")
	void recordedLineReplaysHeadless() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = recorded("cell.tif"), psf = ImageBridge.toImagePlus(gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		open(img, psf);
		final ImageJHarness.Recording rec = ImageJHarness.record(img, CMD, dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			ch.get(0).select("cell.tif");
			ch.get(1).select("psf.tif");
			ch.get(2).select(ChoiceWords.word("method", "accelerated-richardson-lucy")); // the dialog shows words
			ch.get(3).select(ChoiceWords.word("stop", "relative-change"));
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			num.get(0).setText("15");
			num.get(2).setText("0.002");
			final List<TextField> str = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			str.get(0).setText("100");
			str.get(1).setText("auto");
		});
		final String opts = ImageJHarness.parseRunLine(rec.line())[1];
		for (final String k : KEYS) assertTrue(opts.matches("(^|.* )" + k + "(=.*| .*|$)"), "recorded line lacks " + k + ": " + rec.line());
		final ImagePlus recorded = rec.result().created().stream().filter(i -> i.getTitle().equals("cell-deconvolved.tif")).findFirst().orElseThrow();
		assertEquals(List.copyOf(org.parfocal.provenance.MacroOptions.parse(opts).keySet()),
				List.copyOf(ImageProvenance.of(recorded).orElseThrow().options().keySet()), "provenance holds exactly the recorded keys");
		ImageJHarness.assertSamePixels(recorded, ImageJHarness.replayInHeadlessJvm(rec.line(), img, psf), 0);
	}

	private static float max(final float[] a) {
		float m = 0;
		for (final float v : a) m = Math.max(m, Math.abs(v));
		return m;
	}
}
