package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.TextField;
import java.util.List;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.gui.Overlay;
import ij.macro.Interpreter;
import ij.process.ShortProcessor;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.beads.BeadOptions;
import org.parfocal.beads.BeadPsf;
import org.parfocal.beads.BeadsForCommandTests;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/** {@code PSF from Beads...} end to end: by menu name headless, the same numbers as the core, bad input, record → replay. */
class PsfFromBeadsCommandTest {

	private static final String CMD = "PSF from Beads...";
	/** The frozen macro keys (public API), in dialog order. */
	static final List<String> KEYS = List.of("image", "box_xy", "box_z", "bead_diameter", "threshold", "reject_saturated", "outlier_z", "background",
			"averaging", "symmetrize", "voxel_xy", "voxel_z", "optics", "modality", "na", "immersion_index", "sample_index", "depth", "emission",
			"excitation", "pinhole", "sheet_thickness");
	static final String OPTIONS = "image=beads.tif box_xy=1.5 box_z=2.4 bead_diameter=0.1 threshold=6 reject_saturated outlier_z=3.5 background=stack "
			+ "averaging=mean voxel_xy=0 voxel_z=0 optics=none";

	/** A 16-bit, calibrated bead stack (four beads plus one at the edge) from the core tests' generator. */
	static ImagePlus beads(final String title) {
		final Volume v = BeadsForCommandTests.stack();
		final ImageStack st = new ImageStack(v.nx(), v.ny());
		for (int z = 0; z < v.nz(); z++) {
			final short[] px = new short[v.nx() * v.ny()];
			for (int i = 0; i < px.length; i++) px[i] = (short) Math.min(65535, Math.round(v.data()[z * px.length + i]));
			st.addSlice(null, new ShortProcessor(v.nx(), v.ny(), px, null));
		}
		final ImagePlus imp = new ImagePlus(title, st);
		ImageBridge.applyVoxelSize(imp, v.voxelSize());
		return imp;
	}

	static void open(final ImagePlus... imps) {
		ImageJHarness.open(imps);
	}

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void runByMenuNameGivesTheCorePsfWithProvenanceAndAnOverlay() {
		final ImagePlus in = beads("beads.tif");
		open(in);
		final short[] before = ((short[]) in.getStack().getPixels(10)).clone();
		final String sha = ImageProvenance.sha256(in);
		final ImagePlus psf = ImageJHarness.run(in, CMD, OPTIONS).onlyCreated();
		assertEquals(32, psf.getBitDepth());
		assertEquals(0.05, psf.getCalibration().pixelWidth, 1e-12);
		assertEquals(0.15, psf.getCalibration().pixelDepth, 1e-12);
		assertEquals("µm", psf.getCalibration().getUnit());
		final BeadPsf.Result core = BeadPsf.measure(ImageBridge.toVolume(in, "beads"),
				new BeadOptions(1.5, 2.4, 0.1, 6, true, 16, 3.5, BackgroundMode.STACK, Averaging.MEAN, false), Monitor.NONE);
		assertArrayEquals(core.psf().data(), ImageBridge.toVolume(psf, "psf").data(), "command = core, with the bit depth passed (16)");
		assertArrayEquals(before, (short[]) in.getStack().getPixels(10), "input pixels unchanged");
		assertEquals(sha, ImageProvenance.sha256(in));
		final var p = ImageProvenance.of(psf).orElseThrow();
		assertEquals(List.of("image", "box_xy", "box_z", "bead_diameter", "threshold", "reject_saturated", "outlier_z", "background", "averaging",
				"voxel_xy", "voxel_z", "optics"), List.copyOf(p.options().keySet()), "every key given (unset flags and absent optics aside)");
		assertEquals(4, ((Number) p.run().get("beads_accepted")).intValue());
		assertEquals(1, ((Number) p.run().get("rejected_edge")).intValue());
		final Overlay ov = in.getOverlay();
		assertEquals(5, ov.size(), "one ROI per bead");
		assertEquals(4, java.util.Arrays.stream(ov.toArray()).filter(r -> r.getName().endsWith("accepted")).count());
		// a second run replaces its own ROIs and keeps the user's
		ov.add(new ij.gui.Roi(1, 1, 5, 5));
		ImageJHarness.run(in, CMD, OPTIONS);
		assertEquals(6, in.getOverlay().size());
	}

	@Test
	void opticsAreComparedAndTheBoxCanComeFromThem() {
		final ImagePlus in = beads("beads.tif");
		open(in);
		final String withOptics = "image=beads.tif box_xy=1.5 box_z=2.4 bead_diameter=0.1 threshold=6 reject_saturated outlier_z=3.5 background=stack "
				+ "averaging=median symmetrize voxel_xy=0 voxel_z=0 optics=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 "
				+ "depth=0 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2";
		final ImageJHarness.Result r = ImageJHarness.run(in, CMD, withOptics);
		final var run = ImageProvenance.of(r.onlyCreated()).orElseThrow().run();
		final double measured = ((Number) run.get("fwhm_x_um")).doubleValue(), model = ((Number) run.get("model_fwhm_x_um")).doubleValue();
		assertEquals(model, measured, 0.05 * model, "the beads were drawn with this very model");
		assertEquals(KEYS, List.copyOf(ImageProvenance.of(r.onlyCreated()).orElseThrow().options().keySet()));
	}

	@Test
	void badInputIsRefusedInOneLineAndNothingIsCreated() {
		final ImagePlus in = beads("beads.tif");
		final ImagePlus flat = new ImagePlus("plane.tif", in.getStack().getProcessor(15).duplicate());
		ImageBridge.applyVoxelSize(flat, org.parfocal.core.VoxelSize.microns(0.05, 0.05, 0.15));
		final ImagePlus uncal = new ImagePlus("uncal.tif", in.getStack().duplicate());
		final ImagePlus rgb = IJ.createImage("colour.tif", "RGB ramp", 40, 40, 1);
		open(in, flat, uncal, rgb);
		assertFails("single plane but box_z is 2.4", flat, OPTIONS.replace("beads.tif", "plane.tif"));
		assertFails("has no voxel size: enter voxel_xy and voxel_z", uncal, OPTIONS.replace("beads.tif", "uncal.tif"));
		assertFails("RGB image", rgb, OPTIONS.replace("beads.tif", "colour.tif"));
		assertFails("No beads found", in, OPTIONS.replace("threshold=6", "threshold=900"));
		assertFails("Enter the box size", in, OPTIONS.replace("box_xy=1.5", "box_xy=0"));
		assertFails("'lots' is not a number", in, OPTIONS.replace("outlier_z=3.5", "outlier_z=lots"));
		assertFails("'trimmed'", in, OPTIONS.replace("averaging=mean", "averaging=trimmed"));
		assertEquals(null, uncal.getOverlay(), "nothing added to a refused input");
	}

	private static void assertFails(final String expected, final ImagePlus current, final String options) {
		final int before = Interpreter.getBatchModeImageIDs().length;
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(current, CMD, options));
		assertTrue(e.getMessage().contains(expected), e.getMessage());
		assertEquals(before, Interpreter.getBatchModeImageIDs().length, "nothing created");
	}

	@Test
	@Tag("display")
	void recordedLineHasEveryKeyAndReplaysHeadless() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus in = beads("beads.tif");
		open(in);
		final ImageJHarness.Recording rec = ImageJHarness.record(in, CMD, dialog -> {
			final List<Choice> c = dialog.getChoices().stream().map(Choice.class::cast).toList();
			c.get(0).select("beads.tif");
			c.get(1).select("border");
			c.get(2).select("median");
			c.get(3).select("gibson-lanni");
			final List<TextField> f = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			f.get(0).setText("1.5"); // box_xy
			f.get(1).setText("2.4"); // box_z
			f.get(3).setText("8"); // threshold
			f.get(7).setText("1.2"); // na
			f.get(8).setText("1.333");
			f.get(9).setText("1.333");
			((Checkbox) dialog.getCheckboxes().get(1)).setState(true); // symmetrize
		});
		final String opts = ImageJHarness.parseRunLine(rec.line())[1];
		for (final String k : KEYS) assertTrue(opts.contains(k), "recorded line lacks " + k + ": " + rec.line());
		final ImagePlus recorded = rec.result().created().stream().filter(i -> i.getTitle().startsWith("psf-beads")).findFirst().orElseThrow();
		assertEquals(List.copyOf(org.parfocal.provenance.MacroOptions.parse(opts).keySet()),
				List.copyOf(ImageProvenance.of(recorded).orElseThrow().options().keySet()), "provenance holds exactly the recorded keys");
		ImageJHarness.assertSamePixels(recorded, ImageJHarness.replayInHeadlessJvm(rec.line(), in), 0);
	}
}
