package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Choice;
import java.awt.TextField;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import ij.IJ;
import ij.ImagePlus;
import ij.macro.Interpreter;
import ij.measure.ResultsTable;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.Level;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.MatchedResolution;
import org.parfocal.quality.PatchOptions;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/**
 * The command on our own synthetic data: cells of the invented sample scene ({@link SampleScene}), recorded
 * through a Gaussian PSF with Poisson noise ({@link Acquisition}), deconvolved by RL. The command's numbers are
 * checked against the core called directly (the core itself is checked against SciPy and POT in
 * {@code org.parfocal.quality}).
 */
class CompareWithReferencesCommandTest {

	private static final String CMD = "Compare with Sharp References...";
	static final List<String> KEYS = List.of("result", "reference_folder", "reference_images", "input", "psf", "offset", "background", "photons", "read_noise",
			"patch_size", "patches", "bootstrap", "seed");
	private static final VoxelSize VOXEL = SampleScene.VOXEL;

	@TempDir
	Path dir;

	static Volume truth(final long seed) {
		return SampleScene.cell(48, 48, 10, seed);
	}

	static Volume psf() {
		return SampleScene.gaussianPsf(9, 9, 5);
	}

	static Volume recording() {
		return new Acquisition(psf(), truth(7).shape(), new Acquisition.Options(Boundary.MIRROR, true, 5, 1, 3, 100)).record(truth(7), Monitor.NONE);
	}

	static Volume deconvolved() {
		return Deconvolution.run(recording(), psf(), DeconvolutionOptions.of(DeconvolutionMethod.RL, 20).withOffset(Level.of(100)).withBackground(Level.of(5)),
				Monitor.NONE).estimate();
	}

	static ImagePlus image(final Volume v, final String title) {
		return ImageBridge.toImagePlus(v.withVoxelSize(VOXEL), title);
	}

	/** Writes sharp reference cells (seeds 100…) as TIFFs into {@code folder}; a non-TIFF file is ignored. */
	static List<ImagePlus> writeReferences(final Path folder, final int n) throws Exception {
		final List<ImagePlus> out = new ArrayList<>();
		for (int i = 0; i < n; i++) {
			final ImagePlus imp = image(truth(100 + i), "sharp-" + i + ".tif");
			IJ.saveAsTiff(imp, folder.resolve("sharp-" + i + ".tif").toString());
			out.add(imp);
		}
		Files.writeString(folder.resolve("notes.txt"), "not an image");
		return out;
	}

	static void open(final ImagePlus... imps) {
		ImageJHarness.open(imps);
	}

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private String options(final String folder, final String pattern) {
		return "result=result.tif references=[" + folder + "] open_references=[" + pattern + "] input=recording.tif psf=psf.tif offset=100 background=5 "
				+ "photons=1 read_noise=0 patch_size=7 patches=2048 bootstrap=10 seed=3";
	}

	private static ReferenceComparison.Options coreOptions() {
		final ReferenceComparison.Options d = ReferenceComparison.Options.defaults();
		return d.withCounts(2048, d.marginalSamples(), 10).withSeed(3);
	}

	@Test
	void runByMenuNameEqualsTheCoreWithTablePlotAndProvenance() throws Exception {
		final List<ImagePlus> refs = writeReferences(dir, 2);
		final ImagePlus res = image(deconvolved(), "result.tif"), rec = image(recording(), "recording.tif"), psf = image(psf(), "psf.tif");
		final ImagePlus third = image(truth(102), "sharp-open-1.tif"), fourth = image(truth(103), "sharp-open-2.tif");
		open(res, rec, psf, third, fourth);
		final float[] before = ((float[]) res.getStack().getPixels(4)).clone();
		final String opts = options(dir.toString(), "sharp-open-*");
		final ImageJHarness.Result r = ImageJHarness.run(res, CMD, opts);
		assertArrayEquals(before, (float[]) res.getStack().getPixels(4), "input unchanged");
		// the same through the static entry, to read the table
		final CompareWithReferences.Output out = CompareWithReferences.run(parse(opts));
		final List<Volume> refVolumes = List.of(refs.get(0), refs.get(1), third, fourth).stream().map(i -> ImageBridge.toCore(i).first()).toList();
		final ReferenceComparison.Report core = ReferenceComparison.compare(ImageBridge.toCore(res).first(), refVolumes, ImageBridge.toCore(rec).first(),
				coreOptions(), Monitor.NONE);
		final ResultsTable t = out.table();
		for (int k = 0; k < core.rows().size(); k++) {
			final ReferenceComparison.Row row = core.rows().get(k);
			assertEquals(row.property(), t.getStringValue("property", k));
			assertEquals(row.distance(), t.getValue("value", k), 1e-12 * row.distance(), row.property());
			assertEquals(row.low(), t.getValue(ComparisonTable.LOW, k), 1e-12);
			assertEquals(row.floor(), t.getValue(ComparisonTable.FLOOR, k), 1e-12);
			assertEquals(row.baseline(), t.getValue(ComparisonTable.BASELINE, k), 1e-12);
			assertEquals(row.gapClosed(), t.getValue(ComparisonTable.GAP, k), 1e-9);
		}
		final ReblurConsistency.Result chi = new QualityWatch(null,
				QualityWatch.Consistency.forDeconvolution(ImageBridge.toCore(rec).first(), psf(), false, 100, 5, 1, 0), 1, false, VOXEL)
				.consistency(ImageBridge.toCore(res).first());
		assertEquals("re-blur chi-square", t.getStringValue("property", 4));
		assertEquals(chi.meanChiSquare(), t.getValue("value", 4), 1e-12);
		assertEquals(chi.whiteness(), t.getValue("value", 5), 1e-12);
		assertTrue(core.row("patches").gapClosed() > 0.2, "RL closes part of the gap:\n" + core.toText());
		// the plot image carries the provenance: every key, every input
		final ImagePlus plot = r.created().stream().filter(i -> i.getTitle().startsWith("Marginals of result")).findFirst().orElseThrow(
				() -> new AssertionError("no plot among " + r.created()));
		final var p = ImageProvenance.of(plot).orElseThrow();
		assertEquals(KEYS, List.copyOf(p.options().keySet()));
		assertEquals(1 + 4 + 2, p.inputs().size(), "result, 4 references, input, psf");
		assertEquals(ImageProvenance.sha256(third), p.inputs().get(3).sha256());
		assertEquals(core.distance(), ((Number) p.run().get("patch_distance")).doubleValue(), 1e-12);
	}

	/**
	 * {@code match_resolution}: the command blurs the references to the PSF's FWHM / 2 as the core does with
	 * {@code MatchedResolution.expectedFromPsf} (checked against the simulation's own figures in
	 * {@code MatchedResolutionTest}), records the resolution used and the references' notes as warnings; a line
	 * without the key compares the references as they are (old lines unchanged).
	 */
	@Test
	void matchResolutionBlursTheReferencesToTheExpectedResolution() throws Exception {
		// references of the same cells recorded at half the voxel size (structures half as large): sharper than the
		// expected resolution, so they are blurred
		final List<ImagePlus> refs = new ArrayList<>();
		for (int i = 0; i < 2; i++) {
			final ImagePlus imp = ImageBridge.toImagePlus(truth(100 + i).withVoxelSize(VoxelSize.microns(VOXEL.dx() / 2, VOXEL.dy() / 2, VOXEL.dz())), "fine-" + i + ".tif");
			IJ.saveAsTiff(imp, dir.resolve("fine-" + i + ".tif").toString());
			refs.add(imp);
		}
		final ImagePlus res = image(deconvolved(), "result.tif"), rec = image(recording(), "recording.tif"), psf = image(psf(), "psf.tif");
		open(res, rec, psf);
		final ImageJHarness.Result r = ImageJHarness.run(res, CMD, options(dir.toString(), "") + " match_resolution");
		final var p = ImageProvenance.of(r.created().stream().filter(i -> i.getTitle().startsWith("Marginals of result")).findFirst().orElseThrow()).orElseThrow();
		assertTrue(p.options().containsKey("match_resolution"), p.options().toString());
		final MatchedResolution expected = MatchedResolution.expectedFromPsf(ImageBridge.toCore(psf).first(), VOXEL);
		assertEquals(org.parfocal.command.CompareRunner.expectedText(expected, true), p.run().get("expected_resolution"));
		final List<Volume> refVolumes = refs.stream().map(i -> ImageBridge.toCore(i).first()).toList();
		final Volume result = ImageBridge.toCore(res).first(), input = ImageBridge.toCore(rec).first();
		final ReferenceComparison.Report matched = ReferenceComparison.compare(result, refVolumes, input, coreOptions().withResolution(expected), Monitor.NONE);
		final ReferenceComparison.Report plain = ReferenceComparison.compare(result, refVolumes, input, coreOptions(), Monitor.NONE);
		assertEquals(matched.distance(), ((Number) p.run().get("patch_distance")).doubleValue(), 1e-12);
		assertTrue(Math.abs(matched.distance() - plain.distance()) > 1e-3 * plain.distance(), "matching changed nothing: " + matched.distance() + " expected " + expected + " refs " + java.util.Arrays.toString(org.parfocal.quality.ApparentResolution.fwhm(refVolumes.get(0), new double[] { VOXEL.dx(), VOXEL.dy(), VOXEL.dz() })));
		assertEquals(matched.notes(), p.warnings(), "the references' notes are the record's warnings");
	}

	private static org.parfocal.command.CompareRequest parse(final String opts) {
		return org.parfocal.command.CompareRequest.from(MacroOptions.parse(opts)); // old key names read too
	}

	@Test
	void missingCalibrationIsAnErrorInAMacroUnlessIgnoreCalibrationIsGiven() throws Exception {
		final ImagePlus res = image(deconvolved(), "result.tif");
		final ImagePlus bare = ImageBridge.toImagePlus(truth(100), "sharp-open-1.tif");
		bare.setCalibration(new ij.measure.Calibration());
		final ImagePlus bare2 = ImageBridge.toImagePlus(truth(101), "sharp-open-2.tif");
		bare2.setCalibration(new ij.measure.Calibration());
		open(res, bare, bare2);
		final String opts = "result=result.tif references=[] open_references=sharp-open-* input=none psf=none offset=auto background=auto photons=1 read_noise=0 "
				+ "patch_size=7 patches=2048 bootstrap=0 seed=1";
		assertFails("The reference 'sharp-open-1.tif' has no calibration but 'result.tif' has", res, opts);
		assertFails("add ignore_calibration", res, opts);
		final ImagePlus plot = ImageJHarness.run(res, CMD, opts + " ignore_calibration").onlyCreated();
		assertTrue(ImageProvenance.of(plot).orElseThrow().options().containsKey("ignore_calibration"));
	}

	@Test
	void badInputIsRefusedInOneLineAndNothingIsCreated() throws Exception {
		writeReferences(dir, 2);
		final Path empty = Files.createDirectory(dir.resolve("empty"));
		final ImagePlus res = image(deconvolved(), "result.tif"), rec = image(recording(), "recording.tif"), psf = image(psf(), "psf.tif");
		final ImagePlus flat2D = image(SampleScene.cell(48, 48, 1, 100), "sharp-2d.tif");
		final Volume c = Volume.zeros(48, 48, 10, VOXEL);
		java.util.Arrays.fill(c.data(), 3f);
		final ImagePlus constant = image(c, "sharp-constant.tif");
		final ImagePlus tiny = image(SampleScene.cell(5, 5, 10, 100), "sharp-tiny.tif");
		open(res, rec, psf, flat2D, constant, tiny);
		final String base = options(dir.toString(), "");
		assertFails("No reference images given", res, base.replace("references=[" + dir + "]", "references=[]"));
		assertFails("does not exist", res, base.replace(dir.toString(), dir.resolve("nowhere").toString()));
		assertFails("No TIFF files", res, base.replace(dir.toString(), empty.toString()));
		assertFails("No open image matches the reference pattern 'lantern-*'", res, base.replace("open_references=[]", "open_references=lantern-*"));
		assertFails("2D but the result is 3D", res, base.replace("references=[" + dir + "]", "references=[]").replace("open_references=[]", "open_references=sharp-2d.tif"));
		assertFails("Reference 3 ('sharp-constant.tif') is constant", res, base.replace("open_references=[]", "open_references=sharp-constant.tif"));
		assertFails("smaller than", res, base.replace("open_references=[]", "open_references=sharp-tiny.tif"));
		assertFails("'nothing.tif'", res, base.replace("psf=psf.tif", "psf=nothing.tif"));
		assertFails("'many' is not a number", res, base.replace("patches=2048", "patches=many"));
		assertFails("A PSF was given without the input", res, base.replace("input=recording.tif", "input=none"));
	}

	private static void assertFails(final String expected, final ImagePlus current, final String options) {
		final int before = Interpreter.getBatchModeImageIDs().length;
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(current, CMD, options));
		assertTrue(e.getMessage().contains(expected), e.getMessage());
		assertTrue(!e.getMessage().contains("Exception"), "no stack trace: " + e.getMessage());
		assertEquals(before, Interpreter.getBatchModeImageIDs().length, "nothing created");
	}

	@Test
	@Tag("display")
	void recordedLineReplaysHeadless() throws Exception {
		ImageJHarness.assumeDisplay();
		writeReferences(dir, 2);
		final ImagePlus res = image(deconvolved(), "result.tif"), rec = image(recording(), "recording.tif"), psf = image(psf(), "psf.tif");
		open(res, rec, psf);
		final ImageJHarness.Recording recd = ImageJHarness.record(res, CMD, dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			ch.get(0).select("result.tif");
			ch.get(1).select("recording.tif");
			ch.get(2).select("psf.tif");
			final List<TextField> str = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			str.get(0).setText(dir.toString());
			str.get(1).setText("");
			str.get(2).setText("100");
			str.get(3).setText("5");
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			num.get(3).setText("2048");
			num.get(4).setText("10");
		});
		final String opts = ImageJHarness.parseRunLine(recd.line())[1];
		for (final String k : KEYS) assertTrue(opts.matches("(^|.* )" + k + "(=.*| .*|$)"), "recorded line lacks " + k + ": " + recd.line());
		final ImagePlus plot = recd.result().created().stream().filter(i -> i.getTitle().startsWith("Marginals of")).findFirst().orElseThrow();
		final var p = ImageProvenance.of(plot).orElseThrow();
		assertEquals(List.copyOf(MacroOptions.parse(opts).keySet()), List.copyOf(p.options().keySet()), "provenance holds exactly the recorded keys");
		final ImagePlus replayed = ImageJHarness.replayInHeadlessJvm(recd.line(), res, rec, psf);
		final var q = ImageProvenance.of(replayed).orElseThrow();
		assertEquals(p.run().get("patch_distance"), q.run().get("patch_distance"), "same distance replayed headless");
		assertEquals(p.run().get("chi_square"), q.run().get("chi_square"));
	}
}
