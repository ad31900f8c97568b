package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.EventQueue;
import java.awt.TextField;
import java.awt.event.ActionEvent;
import java.awt.event.KeyEvent;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.atomic.AtomicBoolean;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.GenericDialog;
import ij.macro.Interpreter;
import ij.measure.ResultsTable;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.blind.BlindDeconvolution;
import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.BlindResult;
import org.parfocal.blind.PsfSnapshot;
import org.parfocal.blind.PsfStart;
import org.parfocal.blind.SupportBox;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/**
 * The command against the core it wraps ({@link BlindDeconvolution}, tested against outside references in its own
 * package), on own synthetic data: the small sample-scene cell of {@link DeconvolveCommandTest} (Gaussian blur,
 * Poisson noise, offset 100).
 */
class BlindDeconvolveCommandTest {

	private static final String CMD = "Blind Deconvolve...";
	static final List<String> KEYS = List.of("image", "psf", "fwhm_xy", "fwhm_z", "iterations", "object_updates", "psf_updates", "object_tv", "psf_tv",
			"band_limit", "symmetric", "centring", "support_xy", "support_z", "support_units", "snapshot_interval", "edges", "offset", "background", "estimate", "trust_radius");
	private static final List<String> BAND_KEYS = List.of("na", "immersion_index", "emission");

	/** Gaussian start, band limit (optics from the second dialog), a 9 x 9 x 5 box, a snapshot every 2 of 4 iterations. */
	static final String OPTIONS = "image=cell.tif psf=gaussian fwhm_xy=0.3 fwhm_z=0.8 iterations=4 object_updates=1 psf_updates=1 object_tv=0.002 "
			+ "psf_tv=0.001 band_limit centring support_xy=9 support_z=5 support_units=voxels snapshot_interval=2 edges=non-circulant offset=100 "
			+ "background=auto estimate=free-form trust_radius=0.2 na=1.2 immersion_index=1.333 emission=0.52";

	private static final Optics BAND = Optics.builder().na(1.2).immersionIndex(1.333).emissionWavelength(0.52).build();

	@AfterEach
	void closeAll() {
		for (final int id : Interpreter.getBatchModeImageIDs()) {
			final ImagePlus imp = ij.WindowManager.getImage(id);
			if (imp != null) Interpreter.removeBatchModeImage(imp);
		}
	}

	@Test
	void runByMenuNameEqualsTheCoreWithHistoryTablePlotAndProvenance() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		DeconvolveCommandTest.open(img);
		final float[] before = ((float[]) img.getStack().getPixels(5)).clone();
		final ImageJHarness.Result run = ImageJHarness.run(img, CMD, OPTIONS);
		assertArrayEquals(before, (float[]) img.getStack().getPixels(5), "input unchanged");
		assertNull(ImageProvenance.of(img).orElse(null), "input untouched");

		final BlindOptions o = new BlindOptions(4, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 5), true, false, true, BAND, 2,
				EdgeMode.NON_CIRCULANT, Level.of(100), Level.ESTIMATED);
		final BlindResult core = BlindDeconvolution.run(ImageBridge.toCore(img).first(), o, Monitor.NONE);

		final ImagePlus out = created(run, "cell-blind.tif"), psf = created(run, "cell-blind-psf.tif"), hist = created(run, "cell-blind-psf-history.tif");
		assertTrue(run.created().stream().anyMatch(i -> i.getTitle().equals("PSF convergence of cell")), "the plot: " + run.created());
		assertEquals(out, run.current(), "the deblurred image is current for the next macro line");
		assertClose(core.estimate().data(), ImageBridge.toCore(out).first().data(), "deblurred image = core");
		assertClose(core.psf().data(), ImageBridge.toCore(psf).first().data(), "final PSF = core");
		for (final ImagePlus i : List.of(out, psf, hist)) {
			assertEquals(0.08, i.getCalibration().pixelWidth, 1e-12, i.getTitle());
			assertEquals(0.2, i.getCalibration().pixelDepth, 1e-12, i.getTitle());
			assertEquals(List.copyOf(MacroOptions.parse(OPTIONS).keySet()), List.copyOf(ImageProvenance.of(i).orElseThrow().options().keySet()),
					"provenance of " + i.getTitle() + " holds every key of the line");
		}
		assertEquals(9, psf.getWidth());
		assertEquals(5, psf.getNSlices());

		// history: one frame per snapshot (iterations 0, 2, 4), each = the core's snapshot, labelled, unit sum
		final List<PsfSnapshot> snaps = core.snapshots();
		assertEquals(List.of(0, 2, 4), snaps.stream().map(PsfSnapshot::iteration).toList());
		assertEquals(3, hist.getNFrames());
		assertEquals(5, hist.getNSlices());
		assertTrue(hist.isHyperStack());
		final List<Volume> frames = ImageBridge.toCore(hist).volumes();
		for (int t = 0; t < 3; t++) {
			assertClose(snaps.get(t).psf().data(), frames.get(t).data(), "history frame " + (t + 1));
			double sum = 0;
			for (final float v : frames.get(t).data()) sum += v;
			assertEquals(1, sum, 1e-5, "unit-sum constraint at snapshot " + t);
			assertEquals("iteration " + snaps.get(t).iteration() + ", z 3", hist.getStack().getSliceLabel(hist.getStackIndex(1, 3, t + 1)).replace("start (iteration 0)", "iteration 0"));
		}
		assertFalse(snaps.get(2).distanceToStart() == 0, "the PSF moved (PSF updates on)");

		// table: one row per snapshot with the core's figures
		final ResultsTable rt = BlindOutputs.table(snaps, "µm");
		assertEquals(3, rt.size());
		for (int t = 0; t < 3; t++) {
			assertEquals(snaps.get(t).iteration(), rt.getValue("Iteration", t), 0);
			assertEquals(snaps.get(t).fwhmLateral(), rt.getValue("FWHM lateral (µm)", t), 1e-12);
			assertEquals(snaps.get(t).fwhmAxial(), rt.getValue("FWHM axial (µm)", t), 1e-12);
			assertEquals(snaps.get(t).distanceToStart(), rt.getValue("Distance to start", t), 1e-12);
			assertEquals(snaps.get(t).sum(), rt.getValue("Sum", t), 1e-12);
		}
		final var p = ImageProvenance.of(out).orElseThrow();
		assertEquals("9x9x5", p.run().get("psf_box"));
		assertEquals(3L, p.run().get("snapshots"));
	}

	@Test
	void openImageAndOpticsStarts() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final Volume given = DeconvolveCommandTest.gaussianPsf().withVoxelSize(SampleScene.VOXEL);
		final ImagePlus psfImp = ImageBridge.toImagePlus(given, "psf.tif");
		DeconvolveCommandTest.open(img, psfImp);
		final Volume image = ImageBridge.toCore(img).first();

		// an open image as start, no band limit, symmetric, the box in microns: 0.72 / 0.08 = 9, 1.0 / 0.2 = 5 voxels
		final String opt = OPTIONS.replace("psf=gaussian", "psf=psf.tif").replace("band_limit centring", "symmetric centring")
				.replace("support_xy=9 support_z=5 support_units=voxels", "support_xy=0.72 support_z=1.0 support_units=microns")
				.replace("iterations=4 object_updates=1 psf_updates=1", "iterations=3 object_updates=2 psf_updates=2")
				.replace("snapshot_interval=2", "snapshot_interval=3").replace(" na=1.2 immersion_index=1.333 emission=0.52", "");
		final ImageJHarness.Result r1 = ImageJHarness.run(img, CMD, opt);
		final BlindOptions o1 = new BlindOptions(3, 2, 2, 0.002, 0.001, PsfStart.given(given), new SupportBox(9, 9, 5), false, true, true, null, 3,
				EdgeMode.NON_CIRCULANT, Level.of(100), Level.ESTIMATED);
		final BlindResult c1 = BlindDeconvolution.run(image, o1, Monitor.NONE);
		assertClose(c1.estimate().data(), ImageBridge.toCore(created(r1, "cell-blind.tif")).first().data(), "open-image start = core");
		assertClose(c1.psf().data(), ImageBridge.toCore(created(r1, "cell-blind-psf.tif")).first().data(), "open-image start: PSF = core");
		final var p1 = ImageProvenance.of(created(r1, "cell-blind.tif")).orElseThrow();
		assertEquals(ImageProvenance.sha256(psfImp), p1.inputs().get(1).sha256(), "the starting PSF is an input of the record");

		// from the optics (Born & Wolf, second dialog) with the band limit from the same optics; z size automatic,
		// cropped to the image's 10 slices (largest odd: 9)
		final String optics = "model=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 coverslip_index=1.522 "
				+ "coverslip_thickness=170 depth=0 immersion_index_design=1.333 coverslip_index_design=1.522 coverslip_thickness_design=170 "
				+ "working_distance=150 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=15 size_z=0";
		final String opt2 = OPTIONS.replace("psf=gaussian", "psf=from_optics").replace("support_xy=9 support_z=5", "support_xy=0 support_z=0")
				.replace("iterations=4", "iterations=2").replace(" na=1.2 immersion_index=1.333 emission=0.52", "") + " " + optics;
		final ImageJHarness.Result r2 = ImageJHarness.run(img, CMD, opt2);
		final PsfGrid grid = PsfGrid.forOptics(BAND, 0.08, 0.08, 0.2);
		assertTrue(grid.nz() > 9, "the automatic z size exceeds the image, so the crop is exercised: " + grid.nz());
		final Volume model = PsfModels.get("born-wolf").compute(BAND, new PsfGrid(15, 15, grid.nz(), 0.08, 0.08, 0.2)).withVoxelSize(image.voxelSize());
		final BlindOptions o2 = new BlindOptions(2, 1, 1, 0.002, 0.001, PsfStart.given(model), new SupportBox(15, 15, 9), true, false, true, BAND, 2,
				EdgeMode.NON_CIRCULANT, Level.of(100), Level.ESTIMATED);
		final BlindResult c2 = BlindDeconvolution.run(image, o2, Monitor.NONE);
		final ImagePlus out2 = created(r2, "cell-blind.tif");
		assertClose(c2.estimate().data(), ImageBridge.toCore(out2).first().data(), "optics start = core");
		assertEquals(9, created(r2, "cell-blind-psf.tif").getNSlices());
		assertTrue(String.join("\n", r2.log()).contains("cropped to the image"), () -> String.join("\n", r2.log()));
		final var keys = List.copyOf(ImageProvenance.of(out2).orElseThrow().options().keySet());
		assertEquals(List.copyOf(MacroOptions.parse(opt2).keySet()), keys);
		assertEquals(1, keys.stream().filter("na"::equals).count(), "the optics keys appear once");
	}

	@Test
	void twoDimensionalImage() {
		final Volume plane = ImageBridge.toCore(DeconvolveCommandTest.recorded("x")).first();
		final Volume v = Volume.zeros(plane.nx(), plane.ny(), 1, SampleScene.VOXEL);
		System.arraycopy(plane.data(), 5 * plane.nx() * plane.ny(), v.data(), 0, plane.nx() * plane.ny());
		final ImagePlus img = ImageBridge.toImagePlus(v, "plane.tif");
		DeconvolveCommandTest.open(img);
		// a line recorded before estimate= and trust_radius= existed: still runs, free-form
		final String opt = OPTIONS.replace("image=cell.tif", "image=plane.tif").replace("band_limit centring", "centring").replace(" estimate=free-form trust_radius=0.2", "")
				.replace(" na=1.2 immersion_index=1.333 emission=0.52", "").replace("support_z=5", "support_z=0");
		final ImageJHarness.Result r = ImageJHarness.run(img, CMD, opt);
		final BlindOptions o = new BlindOptions(4, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 1), false, false, true, null, 2,
				EdgeMode.NON_CIRCULANT, Level.of(100), Level.ESTIMATED);
		final BlindResult core = BlindDeconvolution.run(v, o, Monitor.NONE);
		assertClose(core.estimate().data(), ImageBridge.toCore(created(r, "plane-blind.tif")).first().data(), "2D = core");
		final ImagePlus hist = created(r, "plane-blind-psf-history.tif");
		assertEquals(1, hist.getNSlices());
		assertEquals(3, hist.getNFrames());
		assertEquals("iteration 4", hist.getStack().getSliceLabel(3));
		assertFalse(ImageProvenance.of(hist).orElseThrow().run().containsKey("fwhm_axial"), "no axial width in 2D");
	}

	/**
	 * estimate=model-fit-refined by menu name: the core's result (same plan), the fitted parameters in the
	 * provenance, and the table's stages with the reason for every refinement step.
	 */
	@Test
	void modelFitByMenuNameEqualsTheCoreAndTheTableSaysWhyEachStepWasKept() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		DeconvolveCommandTest.open(img);
		final String opt = OPTIONS.replace("estimate=free-form trust_radius=0.2", "estimate=model-fit-refined trust_radius=0.15");
		final ImageJHarness.Result run = ImageJHarness.run(img, CMD, opt);
		final BlindOptions o = new BlindOptions(4, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 5), true, false, true, BAND, 2,
				EdgeMode.NON_CIRCULANT, Level.of(100), Level.ESTIMATED);
		final BlindResult core = BlindDeconvolution.run(ImageBridge.toCore(img).first(), o, org.parfocal.blind.FitPlan.refined().withTrustRadius(0.15)
				.withGaussianStart(org.parfocal.blind.FitPlan.GaussianStart.GAUSSIAN),
				Monitor.NONE, null);
		assertClose(core.estimate().data(), ImageBridge.toCore(created(run, "cell-blind.tif")).first().data(), "command = core");
		final var prov = ImageProvenance.of(created(run, "cell-blind.tif")).orElseThrow();
		assertTrue(String.valueOf(prov.run().get("model_fit")).startsWith("gaussian: fwhm_xy = "), "fitted parameters recorded");
		assertEquals("model-fit-refined", prov.options().get("estimate"));
		final ResultsTable rt = BlindOutputs.table(core, "µm");
		assertEquals("start", rt.getStringValue("Stage", 0));
		assertEquals("model fit", rt.getStringValue("Stage", 1));
		assertEquals(core.refinement().size(), rt.size() - 2);
		for (int i = 2; i < rt.size(); i++) {
			final String why = rt.getStringValue("PSF step", i);
			assertTrue(why.startsWith("kept: held-out") || why.startsWith("undone: held-out"), why);
		}
	}

	/**
	 * estimate=widefield-fit by menu name: the core's result with the widefield shape for the Gaussian start (the
	 * plan differs from model-fit's only there), the word recorded, and a fitted PSF other than model-fit's.
	 */
	@Test
	void widefieldFitByMenuNameEqualsTheCoreWithTheWidefieldShape() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		DeconvolveCommandTest.open(img);
		final String opt = OPTIONS.replace("estimate=free-form trust_radius=0.2", "estimate=widefield-fit trust_radius=0.15");
		final ImageJHarness.Result run = ImageJHarness.run(img, CMD, opt);
		final BlindOptions o = new BlindOptions(4, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 5), true, false, true, BAND, 2,
				EdgeMode.NON_CIRCULANT, Level.of(100), Level.ESTIMATED);
		final BlindResult wide = BlindDeconvolution.run(ImageBridge.toCore(img).first(), o, org.parfocal.blind.FitPlan.model().withTrustRadius(0.15)
				.withGaussianStart(org.parfocal.blind.FitPlan.GaussianStart.WIDEFIELD), Monitor.NONE, null);
		final BlindResult gauss = BlindDeconvolution.run(ImageBridge.toCore(img).first(), o, org.parfocal.blind.FitPlan.model().withTrustRadius(0.15)
				.withGaussianStart(org.parfocal.blind.FitPlan.GaussianStart.GAUSSIAN), Monitor.NONE, null);
		assertClose(wide.estimate().data(), ImageBridge.toCore(created(run, "cell-blind.tif")).first().data(), "command = core with the widefield shape");
		assertEquals("widefield-fit", ImageProvenance.of(created(run, "cell-blind.tif")).orElseThrow().options().get("estimate"));
		double d = 0;
		final float[] a = wide.psf().data(), b = gauss.psf().data();
		for (int i = 0; i < Math.min(a.length, b.length); i++) d += Math.abs(a[i] - b[i]);
		assertTrue(a.length != b.length || d > 1e-3, "the widefield shape is another PSF than the Gaussian fit (L1 difference " + d + ")");
	}

	@Test
	void badInputIsRefusedInOneLineAndNothingIsCreated() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus flat = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 1).withVoxelSize(SampleScene.VOXEL), "flat-psf.tif");
		final ImagePlus psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(SampleScene.VOXEL), "psf.tif");
		final ImagePlus raw = ImageBridge.toImagePlus(ImageBridge.toCore(img).first().withVoxelSize(VoxelSize.UNCALIBRATED), "raw.tif");
		final ImagePlus two = ij.plugin.HyperStackConverter.toHyperStack(new ImagePlus("two.tif", ImageBridge.toImagePlus(ImageBridge.toCore(img).first(), "t")
				.getStack().duplicate()), 2, 5, 1);
		two.setTitle("two.tif");
		DeconvolveCommandTest.open(img, flat, psf, raw, two);
		final float[] before = ((float[]) img.getStack().getPixels(4)).clone();
		assertFails("PSF support box (41 x 41 x 5) is larger than the image (40 x 36 x 10)", img, OPTIONS.replace("support_xy=9", "support_xy=41"));
		assertFails("snapshot interval (9) is larger than the number of iterations (4)", img, OPTIONS.replace("snapshot_interval=2", "snapshot_interval=9"));
		assertFails("starting PSF is 2D but the image is 3D", img, OPTIONS.replace("psf=gaussian", "psf=flat-psf.tif"));
		assertFails("band-limit constraint needs the voxel size", raw, OPTIONS.replace("image=cell.tif", "image=raw.tif").replace("psf=gaussian", "psf=psf.tif"));
		assertFails("support box in microns needs the voxel size", raw,
				OPTIONS.replace("image=cell.tif", "image=raw.tif").replace("support_units=voxels", "support_units=microns"));
		assertFails("odd sizes", img, OPTIONS.replace("support_xy=9", "support_xy=8"));
		assertFails("Give both support sizes", img, OPTIONS.replace("support_z=5", "support_z=0"));
		assertFails("'inches' is not a valid support unit", img, OPTIONS.replace("support_units=voxels", "support_units=inches"));
		assertFails("Iterations must be a whole number", img, OPTIONS.replace("iterations=4", "iterations=2.5"));
		assertFails("NA 1.5 must be below the immersion index 1.333", img, OPTIONS.replace("na=1.2", "na=1.5"));
		assertFails("'dark' is not a number or auto (offset=)", img, OPTIONS.replace("offset=100", "offset=dark"));
		assertFails("'two.tif' has 2 channels and 1 frames; blind deconvolution takes one of each", two, OPTIONS.replace("image=cell.tif", "image=two.tif"));
		assertFails("A model fit starts from from_optics or gaussian, not from an open PSF", img, OPTIONS.replace("psf=gaussian", "psf=psf.tif").replace("estimate=free-form", "estimate=model-fit"));
		assertFails("'guess' is not a valid PSF estimate", img, OPTIONS.replace("estimate=free-form", "estimate=guess"));
		assertFails("trust radius must be above 0 and at most 1", img, OPTIONS.replace("estimate=free-form trust_radius=0.2", "estimate=model-fit-refined trust_radius=2"));
		assertArrayEquals(before, (float[]) img.getStack().getPixels(4), "input unchanged");
	}

	/** The dim cell of {@link DeconvolveCommandTest#dimRecorded} (0.02 photons per unit), 15 outer iterations, watched every 3. */
	static final String WATCH = OPTIONS.replace("iterations=4", "iterations=15").replace("snapshot_interval=2", "snapshot_interval=5")
			.replace("background=auto", "background=2").replace("trust_radius=0.2", "trust_radius=0.2 watch") + " every=3 references=[] open_references=sharp-* photons=0.02 read_noise=0";

	private static final BlindOptions WATCH_CORE = new BlindOptions(15, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 5), true, false,
			true, BAND, 5, EdgeMode.NON_CIRCULANT, Level.of(100), Level.of(2));

	/**
	 * Watch mode by menu name: the quality plot is made; the suggestion equals that of a core watch with the same
	 * references and noise model; with stop_at_suggestion the deblurred image and the PSF are those of a run
	 * stopped at the suggested iteration (bit for bit up to thread-count rounding, 1e-6 relative); the provenance
	 * holds the keys, the rule, the suggestion and the curve; without stop_at_suggestion the outputs are those of
	 * a run without watch mode.
	 */
	@Test
	void watchModeSuggestsAnIterationAndCanReturnIt() {
		final ImagePlus img = DeconvolveCommandTest.dimRecorded("cell.tif");
		final ImagePlus[] refs = DeconvolveCommandTest.sharpReferences();
		DeconvolveCommandTest.open(img, refs[0], refs[1], refs[2]);
		final float[] before = ((float[]) img.getStack().getPixels(5)).clone();
		final ImageJHarness.Result r = ImageJHarness.run(img, CMD, WATCH + " stop_at_suggestion");
		assertArrayEquals(before, (float[]) img.getStack().getPixels(5), "input unchanged");
		assertTrue(r.created().stream().anyMatch(i -> i.getTitle().equals("Quality of cell-blind.tif")), "quality plot: " + r.created());
		final ImagePlus out = created(r, "cell-blind.tif"), psf = created(r, "cell-blind-psf.tif");

		final Volume y = ImageBridge.toCore(img).first();
		final List<Volume> refVolumes = java.util.Arrays.stream(refs).map(i -> ImageBridge.toCore(i).first()).toList();
		final org.parfocal.quality.BlindQualityWatch w = new org.parfocal.quality.BlindQualityWatch(
				org.parfocal.quality.ReferenceComparison.prepare(refVolumes, y, org.parfocal.quality.ReferenceComparison.Options.defaults(), Monitor.NONE),
				new org.parfocal.quality.BlindQualityWatch.Recording(y, false, 100, 2, 0.02, 0), 3, false, y.voxelSize());
		final BlindResult full = BlindDeconvolution.run(y, WATCH_CORE, Monitor.NONE, w);
		final int k = w.suggestion().iteration();
		assertEquals(5, w.points().size());
		assertTrue(k >= 3 && k <= 15 && k % 3 == 0, "suggestion " + k);

		final var p = ImageProvenance.of(out).orElseThrow();
		assertEquals((long) k, p.run().get("suggested_iteration"));
		assertEquals((long) k, p.run().get("returned_iteration"));
		assertEquals(w.suggestion().reason(), p.run().get("suggestion"));
		assertEquals(org.parfocal.quality.StoppingRule.DESCRIPTION, p.run().get("watch_rule"));
		assertEquals(3L, p.run().get("watch_references"));
		assertEquals(w.floor(), ((Number) p.run().get("watch_floor")).doubleValue(), 1e-12 * w.floor());
		final String curve = p.run().get("watch_curve").toString();
		assertEquals(5, curve.split(";").length, curve);
		assertTrue(curve.startsWith("3: d ") && curve.contains("; 15: d "), curve);
		System.out.println("Blind watch: suggested " + k + " (" + w.suggestion().reason() + "); floor " + w.floor() + "; curve " + curve);
		final List<String> keys = new ArrayList<>(KEYS);
		keys.addAll(BAND_KEYS);
		keys.addAll(List.of("watch", "every", "reference_folder", "reference_images", "photons", "read_noise", "stop_at_suggestion"));
		keys.remove("symmetric"); // unchecked
		keys.add(keys.indexOf("na"), keys.remove(keys.indexOf("watch"))); // "watch" follows background, as in Deconvolve
		// WATCH gives the reference keys by their old names (still accepted); the record holds the new ones
		assertEquals(List.copyOf(MacroOptions.parse(WATCH.replace(" references=", " reference_folder=").replace(" open_references=", " reference_images=")
				+ " stop_at_suggestion").keySet()), List.copyOf(p.options().keySet()));
		assertEquals(keys, List.copyOf(p.options().keySet()));
		assertEquals((long) k, ImageProvenance.of(psf).orElseThrow().run().get("returned_iteration"), "the PSF's record too");

		final BlindResult stopped = BlindDeconvolution.run(y, new BlindOptions(k, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 5),
				true, false, true, BAND, Math.min(5, k), EdgeMode.NON_CIRCULANT, Level.of(100), Level.of(2)), Monitor.NONE);
		assertClose(stopped.estimate().data(), ImageBridge.toCore(out).first().data(), "output = the object at the suggestion");
		assertClose(stopped.psf().data(), ImageBridge.toCore(psf).first().data(), "PSF output = the PSF at the suggestion");
		// χ² only (no references): the last evaluated iterate with χ² ≥ 1, here before the end, so the returned
		// object and PSF are not the last ones
		final ImageJHarness.Result chiOnly = ImageJHarness.run(img, CMD, WATCH.replace("open_references=sharp-*", "open_references=[]") + " stop_at_suggestion");
		final org.parfocal.quality.BlindQualityWatch wc = new org.parfocal.quality.BlindQualityWatch(null,
				new org.parfocal.quality.BlindQualityWatch.Recording(y, false, 100, 2, 0.02, 0), 3, false, y.voxelSize());
		BlindDeconvolution.run(y, WATCH_CORE, Monitor.NONE, wc);
		final int kc = wc.suggestion().iteration();
		assertTrue(kc > 0 && kc < 15, "chi-square-only suggestion " + kc);
		final ImagePlus outChi = created(chiOnly, "cell-blind.tif");
		assertEquals((long) kc, ImageProvenance.of(outChi).orElseThrow().run().get("returned_iteration"));
		assertFalse(ImageProvenance.of(outChi).orElseThrow().run().containsKey("watch_floor"), "no floor without references");
		final BlindResult stoppedChi = BlindDeconvolution.run(y, new BlindOptions(kc, 1, 1, 0.002, 0.001, PsfStart.gaussian(0.3, 0.8), new SupportBox(9, 9, 5),
				true, false, true, BAND, Math.min(5, kc), EdgeMode.NON_CIRCULANT, Level.of(100), Level.of(2)), Monitor.NONE);
		assertClose(stoppedChi.estimate().data(), ImageBridge.toCore(outChi).first().data(), "chi-square only: output = the object at the suggestion");
		assertClose(stoppedChi.psf().data(), ImageBridge.toCore(created(chiOnly, "cell-blind-psf.tif")).first().data(), "chi-square only: PSF at the suggestion");
		assertFalse(java.util.Arrays.equals(full.estimate().data(), ImageBridge.toCore(outChi).first().data()), "not the last iterate");
		assertFalse(java.util.Arrays.equals(full.psf().data(), ImageBridge.toCore(created(chiOnly, "cell-blind-psf.tif")).first().data()), "not the last PSF");
		System.out.println("Blind watch, chi-square only: suggested " + kc + " (" + wc.suggestion().reason() + ")");

		// without stop_at_suggestion: the last iterate and PSF, exactly as without watch mode
		final ImageJHarness.Result plain = ImageJHarness.run(img, CMD, WATCH);
		assertClose(full.estimate().data(), ImageBridge.toCore(created(plain, "cell-blind.tif")).first().data(), "watch on, no stop: last iterate");
		assertClose(full.psf().data(), ImageBridge.toCore(created(plain, "cell-blind-psf.tif")).first().data(), "watch on, no stop: last PSF");
		final ImageJHarness.Result off = ImageJHarness.run(img, CMD, WATCH.replace(" watch", "").substring(0, WATCH.indexOf(" every=") - " watch".length()));
		assertArrayEquals(ImageBridge.toCore(created(plain, "cell-blind.tif")).first().data(), ImageBridge.toCore(created(off, "cell-blind.tif")).first().data(),
				0f, "watch on or off: the same result");
		assertTrue(off.created().stream().noneMatch(i -> i.getTitle().startsWith("Quality of")), "no quality plot when off");
		assertFalse(ImageProvenance.of(created(off, "cell-blind.tif")).orElseThrow().run().containsKey("watch_rule"), "no watch facts when off");
		assertFalse(ImageProvenance.of(created(plain, "cell-blind.tif")).orElseThrow().run().containsKey("returned_iteration"));
	}

	@Test
	void watchModeBadInputIsRefusedInOneLine() {
		final ImagePlus img = DeconvolveCommandTest.dimRecorded("cell.tif");
		final ImagePlus[] refs = DeconvolveCommandTest.sharpReferences();
		final ImagePlus bare = ImageBridge.toImagePlus(SampleScene.cell(40, 36, 10, 200).withVoxelSize(VoxelSize.UNCALIBRATED), "bare-ref.tif");
		final ImagePlus flat = ImageBridge.toImagePlus(SampleScene.cell(40, 36, 1, 200).withVoxelSize(SampleScene.VOXEL), "flat-ref.tif");
		DeconvolveCommandTest.open(img, refs[0], refs[1], refs[2], bare, flat);
		assertFails("Evaluate every 1 to 10000 iterations, got 0 (every=)", img, WATCH.replace("every=3", "every=0"));
		assertFails("The reference folder '/no/such/folder' does not exist", img, WATCH.replace("references=[]", "references=/no/such/folder"));
		assertFails("No open image matches the reference pattern 'lantern-*'", img, WATCH.replace("sharp-*", "lantern-*"));
		assertFails("add ignore_calibration", img, WATCH.replace("sharp-*", "bare-ref.tif"));
		assertFails("Reference 1 ('flat-ref.tif') is 2D but the result is 3D", img, WATCH.replace("sharp-*", "flat-ref.tif"));
		assertFails("Photons per unit must be positive", img, WATCH.replace("photons=0.02", "photons=0"));
	}

	private static void assertFails(final String expected, final ImagePlus current, final String options) {
		final int before = Interpreter.getBatchModeImageIDs().length;
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(current, CMD, options));
		assertTrue(e.getMessage().contains(expected), e.getMessage());
		assertFalse(e.getMessage().contains("Exception"), "no stack trace: " + e.getMessage());
		assertEquals(before, Interpreter.getBatchModeImageIDs().length, "nothing created");
	}

	/** Esc (ImageJ's escape flag) stops the run: no output, input untouched. */
	@Test
	void escapeCancelsCleanly() throws Exception {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		DeconvolveCommandTest.open(img);
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
			r = ImageJHarness.run(img, CMD, OPTIONS.replace("iterations=4", "iterations=10000"));
		} finally {
			done.set(true);
			presser.join();
			IJ.resetEscape();
			IJ.setKeyUp(KeyEvent.VK_ESCAPE);
		}
		assertTrue(r.created().isEmpty(), "nothing created: " + r.created());
		assertEquals(1, Interpreter.getBatchModeImageIDs().length, "only the input is open");
		assertArrayEquals(before, (float[]) img.getStack().getPixels(3));
		assertNull(ImageProvenance.of(img).orElse(null), "input untouched");
	}

	@Test
	@Tag("display")
	void recordedLineReplaysHeadless() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus rgb = ij.gui.NewImage.createRGBImage("plot.png", 9, 9, 1, ij.gui.NewImage.FILL_WHITE);
		DeconvolveCommandTest.open(img, rgb);
		final ImagePlus opticsPsf = ImageJHarness.run(null, "PSF from Optics...",
				PsfFromOpticsCommandTest.OPTIONS.replace("size_xy=33 size_z=21", "size_xy=9 size_z=5")).onlyCreated();
		DeconvolveCommandTest.open(opticsPsf);
		ij.Prefs.set("parfocal.blind.estimate", BlindDeconvolve.FREE_FORM); // the last interactive run: free-form from the Gaussian
		ij.Prefs.set("parfocal.blind.start", BlindDeconvolve.GAUSSIAN);
		final List<String> shown = new ArrayList<>(), hints = new ArrayList<>();
		final String[] preselected = new String[1];
		final ImageJHarness.Recording rec = ImageJHarness.record(img, CMD, dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			for (int i = 0; i < ch.get(1).getItemCount(); i++) shown.add(ch.get(1).getItem(i));
			preselected[0] = ch.get(1).getSelectedItem();
			final TextField fwhm = (TextField) dialog.getNumericFields().get(0), trust = (TextField) dialog.getNumericFields().get(10);
			hints.add(DeconvolveHints.unitLabel(fwhm).getText().trim());
			pick(ch.get(0), "cell.tif");
			pick(ch.get(1), ChoiceWords.word("psf", "gaussian"));
			hints.add(DeconvolveHints.unitLabel(fwhm).getText().trim());
			pick(ch.get(2), ChoiceWords.word("support_units", "voxels"));
			pick(ch.get(3), ChoiceWords.word("edges", "extended"));
			pick(ch.get(4), ChoiceWords.word("estimate", "model-fit-refined"));
			hints.add(DeconvolveHints.unitLabel(trust).getText().trim());
			pick(ch.get(4), ChoiceWords.word("estimate", "free-form"));
			hints.add(DeconvolveHints.unitLabel(trust).getText().trim());
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			// fwhm_xy fwhm_z iterations object_updates psf_updates object_tv psf_tv support_xy support_z snapshot_interval trust_radius
			final String[] values = { "0.3", "0.8", "4", "1", "1", "0.002", "0", "9", "5", "2", "0.2" };
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(true); // band limit: a second dialog asks for the optics
			box.get(1).setState(false);
			box.get(2).setState(true);
			final List<TextField> str = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			str.get(0).setText("100");
			str.get(1).setText("auto");
			answerNextDialog(dialog, "1.2", "1.333", "0.52");
		});
		assertEquals(List.of(opticsPsf.getTitle(), ChoiceWords.word("psf", "from_optics"), ChoiceWords.word("psf", "gaussian")), shown,
				"the start list: the Parfocal PSF, the optics, the Gaussian; not the image, not the RGB plot");
		assertEquals(opticsPsf.getTitle(), preselected[0], "the newest Parfocal PSF is preselected");
		assertEquals(List.of("not used: the start is the image chosen", "µm, lateral width of the Gaussian start",
				"largest distance of a refined PSF to the fitted model", "not used: only with a fit, then refine"), hints, "hints follow the start and the estimate");
		final String opts = ImageJHarness.parseRunLine(rec.line())[1];
		final var given = MacroOptions.parse(opts);
		for (final String[] kv : new String[][] { { "psf", "gaussian" }, { "support_units", "voxels" }, { "edges", "extended" }, { "estimate", "free-form" } })
			assertEquals(kv[1], given.get(kv[0]), "the released macro value is recorded: " + rec.line());
		final List<String> all = new ArrayList<>(KEYS);
		all.remove("symmetric"); // unchecked boxes are not recorded
		all.addAll(BAND_KEYS);
		for (final String k : all) assertTrue(opts.matches("(^|.* )" + k + "(=.*| .*|$)"), "recorded line lacks " + k + ": " + rec.line());
		final ImagePlus recorded = rec.result().created().stream().filter(i -> i.getTitle().equals("cell-blind.tif")).findFirst().orElseThrow();
		for (final ImagePlus i : rec.result().created().stream().filter(i -> i.getTitle().startsWith("cell-blind")).toList())
			assertEquals(List.copyOf(MacroOptions.parse(opts).keySet()), List.copyOf(ImageProvenance.of(i).orElseThrow().options().keySet()),
					"provenance of " + i.getTitle() + " holds exactly the recorded keys");
		ImageJHarness.assertSamePixels(recorded, ImageJHarness.replayInHeadlessJvm(rec.line(), img), 0);
	}

	/** Selects an item as a user does: the choice's listeners hear of it. */
	private static void pick(final Choice c, final String item) {
		c.select(item);
		assertEquals(item, c.getSelectedItem(), "no such item: " + item);
		for (final java.awt.event.ItemListener l : c.getItemListeners())
			l.itemStateChanged(new java.awt.event.ItemEvent(c, java.awt.event.ItemEvent.ITEM_STATE_CHANGED, item, java.awt.event.ItemEvent.SELECTED));
	}

	/** Waits (on its own thread) for the dialog that follows {@code first}, fills its numeric fields and presses OK. */
	static void answerNextDialog(final GenericDialog first, final String... numbers) {
		final Thread t = new Thread(() -> {
			final long end = System.nanoTime() + 60_000_000_000L;
			while (System.nanoTime() < end) {
				final GenericDialog d = GenericDialog.getInstance();
				if (d != null && d != first && d.isShowing()) {
					try {
						EventQueue.invokeAndWait(() -> {
							final List<TextField> num = d.getNumericFields().stream().map(TextField.class::cast).toList();
							for (int i = 0; i < numbers.length; i++) num.get(i).setText(numbers[i]);
							d.actionPerformed(new ActionEvent(d.getButtons()[0], ActionEvent.ACTION_PERFORMED, "OK"));
						});
					} catch (final Exception e) {
						throw new IllegalStateException(e);
					}
					return;
				}
				try {
					Thread.sleep(10);
				} catch (final InterruptedException e) {
					return;
				}
			}
		}, "answer-second-dialog");
		t.setDaemon(true);
		t.start();
	}

	private static ImagePlus created(final ImageJHarness.Result r, final String title) {
		return r.created().stream().filter(i -> i.getTitle().equals(title)).findFirst()
				.orElseThrow(() -> new AssertionError("no image '" + title + "' among " + r.created()));
	}

	/** Max |ref − got| ≤ 1e-6 · max |ref| (the core is deterministic; the tolerance covers thread-count rounding). */
	private static void assertClose(final float[] ref, final float[] got, final String what) {
		assertEquals(ref.length, got.length, what + ": size");
		float m = 0;
		for (final float v : ref) m = Math.max(m, Math.abs(v));
		assertArrayEquals(ref, got, 1e-6f * m, what);
	}
}
