package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import ij.ImagePlus;
import ij.gui.NewImage;
import ij.measure.Calibration;
import ij.process.ShortProcessor;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Stopping;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.testing.ImageJHarness;

/**
 * Deconvolve's guiding dialog, headless: which open images the PSF list offers and which it preselects, choices
 * in words that macros may give as words or as the released values, and the 16-bit output. Outside references:
 * ImageJ's rule that images are numbered −1, −2, … in the order they are made (so the most negative ID is the
 * newest; from memory of {@code ImagePlus.setID}), and the definition of uniform quantisation (a value rounded
 * to the nearest of offset + scale·k lies within scale/2 of it).
 */
class DeconvolveChoicesTest {

	private static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** A PSF made by PSF from Optics (so its record says so). */
	private static ImagePlus opticsPsf(final double na) {
		return ImageJHarness.run(null, "PSF from Optics...", PsfFromOpticsCommandTest.OPTIONS.replace("na=1.2", "na=" + na)
				.replace("size_xy=33 size_z=21", "size_xy=9 size_z=5")).onlyCreated();
	}

	@Test
	void psfListHoldsParfocalPsfsNewestFirstThenSmallStacksAndNeverTheImageRgbOrMisfits() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif"); // 40 x 36 x 10
		final ImagePlus older = opticsPsf(1.1), newer = opticsPsf(1.2);
		final ImagePlus small = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(VOXEL), "measured-psf.tif");
		final ImagePlus smallNoName = ImageBridge.toImagePlus(SampleScene.gaussianPsf(7, 7, 3).withVoxelSize(VOXEL), "kernel.tif");
		final ImagePlus truth = ImageBridge.toImagePlus(DeconvolveCommandTest.truth().withVoxelSize(VOXEL), "cell-truth.tif"); // as large as the image
		final ImagePlus rgb = NewImage.createRGBImage("plot.png", 9, 9, 1, NewImage.FILL_WHITE);
		final ImagePlus twoChannels = ImageBridge.toImagePlus(new Hyperstack(2, 1, List.of(SampleScene.gaussianPsf(9, 9, 5), SampleScene.gaussianPsf(9, 9, 5))),
				"two-channel-psf.tif", null);
		final Volume neg = SampleScene.gaussianPsf(9, 9, 5);
		neg.data()[0] = -0.5f; // far below zero: not a PSF
		final ImagePlus negative = ImageBridge.toImagePlus(neg, "difference.tif");
		final ImagePlus deep = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 15), "deep-psf.tif"); // more planes than the image: allowed
		final List<ImagePlus> open = List.of(img, older, small, truth, rgb, smallNoName, twoChannels, negative, newer, deep);
		final List<String> titles = new ArrayList<>();
		for (final PsfChoices.Candidate c : PsfChoices.candidates(img, open)) titles.add(c.title());
		assertEquals(List.of(newer.getTitle(), older.getTitle(), "deep-psf.tif", "measured-psf.tif", "kernel.tif"), titles, "small stacks named PSF first, newest first");
		assertTrue(newer.getID() < older.getID(), "ImageJ numbers newer images more negatively");
		assertEquals(PsfChoices.Kind.PARFOCAL, PsfChoices.kind(newer, img));
		assertEquals(PsfChoices.Kind.STACK, PsfChoices.kind(small, img));
		for (final ImagePlus no : List.of(truth, rgb, twoChannels, negative)) assertNull(PsfChoices.kind(no, img), no.getTitle());
		// a 2D image takes only 2D PSFs
		final ImagePlus flat = ImageBridge.toImagePlus(SampleScene.cell(40, 36, 1, 7).withVoxelSize(VOXEL), "flat.tif");
		assertNull(PsfChoices.kind(small, flat));
		assertEquals(PsfChoices.Kind.STACK, PsfChoices.kind(ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 1), "psf2d.tif"), flat));
		// the two-channel PSF fits a two-channel image
		final ImagePlus two = ImageBridge.toImagePlus(new Hyperstack(2, 1, List.of(DeconvolveCommandTest.truth(), DeconvolveCommandTest.truth())), "two.tif", null);
		assertEquals(PsfChoices.Kind.STACK, PsfChoices.kind(twoChannels, two));
	}

	@Test
	void theSampleStacksPreselectTheirOwnPsfs() {
		final java.util.Map<String, ImagePlus> samples = org.parfocal.demo.SampleStacks.make();
		ImageJHarness.open(samples.values().toArray(ImagePlus[]::new));
		// the widefield stack's own PSF, not the bead PSF made after it; the two-channel stack's PSF of two channels
		assertEquals("quillwort-psf.tif", PsfChoices.items(samples.get("quillwort-widefield.tif"))[0]);
		assertEquals("quillwort-two-channel-psf.tif", PsfChoices.items(samples.get("quillwort-two-channel.tif"))[0]);
	}

	@Test
	void theDialogsPsfListPreselectsTheNewestParfocalPsfAndEndsWithTheOptics() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus small = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(VOXEL), "measured-psf.tif");
		final ImagePlus rgb = NewImage.createRGBImage("plot.png", 9, 9, 1, NewImage.FILL_WHITE);
		ImageJHarness.open(img, small, rgb);
		final ImagePlus psf = opticsPsf(1.2);
		ImageJHarness.open(psf);
		final String[] items = PsfChoices.items(img);
		assertArrayEquals(new String[] { psf.getTitle(), "measured-psf.tif", Deconvolve.FROM_OPTICS }, items);
		assertEquals("compute from the optics (next dialog)", ChoiceWords.word("psf", Deconvolve.FROM_OPTICS));
	}

	@Test
	void choiceWordsMapBackToTheReleasedMacroValuesAndMacrosMayGiveEither() {
		for (final String k : DeconvolutionMethod.keys()) assertEquals(k, ChoiceWords.value("method", ChoiceWords.word("method", k)));
		for (final Stopping s : Stopping.values()) assertEquals(s.key(), ChoiceWords.value("stop", ChoiceWords.word("stop", s.key())));
		for (final String k : EdgeMode.keys()) assertEquals(k, ChoiceWords.value("edges", ChoiceWords.word("edges", k)));
		for (final String k : OutputDepth.keys()) assertEquals(k, ChoiceWords.value("output", ChoiceWords.word("output", k)));
		for (final String k : org.parfocal.psf.PsfModels.keys()) assertEquals(k, ChoiceWords.value("model", ChoiceWords.word("model", k)));
		for (final String k : org.parfocal.psf.Modality.keys()) assertEquals(k, ChoiceWords.value("modality", ChoiceWords.word("modality", k)));
		assertEquals("model=gibson-lanni na=1.2 psf=[a b.tif]", ChoiceWords.valuesForWords("model=[" + ChoiceWords.word("model", "gibson-lanni")
				+ "] na=1.2 psf=[a b.tif]"), "a macro may give the words");
		assertFalse(ChoiceWords.word("method", "richardson-lucy-tv").equals("richardson-lucy-tv"), "shown in words");
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif"), psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		ImageJHarness.open(img, psf);
		final String values = "image=cell.tif psf=psf.tif method=accelerated-richardson-lucy iterations=4 regularization=0 stop=fixed threshold=0.001 "
				+ "edges=periodic offset=100 background=auto";
		final String words = "image=cell.tif psf=psf.tif method=" + MacroOptions.quote(ChoiceWords.word("method", "accelerated-richardson-lucy"))
				+ " iterations=4 regularization=0 stop=" + MacroOptions.quote(ChoiceWords.word("stop", "fixed")) + " threshold=0.001 edges="
				+ MacroOptions.quote(ChoiceWords.word("edges", "periodic")) + " offset=100 background=auto";
		final ImagePlus a = ImageJHarness.run(img, "Deconvolve...", values).onlyCreated();
		final ImagePlus b = ImageJHarness.run(img, "Deconvolve...", words).onlyCreated();
		ImageJHarness.assertSamePixels(a, b, 0);
		// the record keeps the released values either way
		final var rb = ImageProvenance.of(b).orElseThrow().options();
		assertEquals("accelerated-richardson-lucy", rb.get("method"));
		assertEquals("periodic", rb.get("edges"));
		assertNull(rb.get("output"), "32-bit, the default, is left out of the record as out of recorded lines");
		assertEquals(ImagePlus.GRAY32, b.getType());
	}

	/**
	 * The preview predicts the run: its plane (a few iterations on a slab of planes around the current one) is
	 * much closer to the same plane of the full run with the same iterations than the data are. Reference: the
	 * full command's own result (RL is local: with extended edges, planes beyond the PSF's reach hardly matter).
	 */
	@Test
	void thePreviewPlaneIsCloseToTheSamePlaneOfTheFullRun() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif"), psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		img.setSlice(5);
		ImageJHarness.open(img, psf);
		final var opts = org.parfocal.deconv.DeconvolutionOptions.of(DeconvolutionMethod.RL, DeconvolvePreview.MAX_ITERATIONS)
				.withOffset(org.parfocal.deconv.Level.of(100)).withBackground(org.parfocal.deconv.Level.of(2));
		final PreviewRun.Result r = PreviewRun.compute(new PreviewRun.Settings("cell.tif", "psf.tif", opts, false), () -> false);
		assertEquals(2, r.z0());
		assertEquals(8, r.z1());
		assertEquals(DeconvolvePreview.MAX_ITERATIONS, r.iterations());
		final ImagePlus full = ImageJHarness.run(img, "Deconvolve...", "image=cell.tif psf=psf.tif method=richardson-lucy iterations="
				+ DeconvolvePreview.MAX_ITERATIONS + " regularization=0 stop=fixed threshold=0.001 edges=extended offset=100 background=2").onlyCreated();
		final float[] f = (float[]) full.getStack().getPixels(5);
		double dPreview = 0, dData = 0, norm = 0;
		for (int i = 0; i < f.length; i++) {
			dPreview += (r.result()[i] - f[i]) * (double) (r.result()[i] - f[i]);
			dData += (r.data()[i] - 100 - f[i]) * (double) (r.data()[i] - 100 - f[i]);
			norm += f[i] * (double) f[i];
		}
		System.out.printf("preview vs full run, plane 5: relative difference %.4f; data vs full run %.4f%n", Math.sqrt(dPreview / norm), Math.sqrt(dData / norm));
		assertTrue(Math.sqrt(dPreview / norm) < 0.05, "preview within 5 % of the full run");
		assertTrue(dPreview < 0.05 * dData, "the preview is much closer to the result than the data are");
	}

	@Test
	void opticsDefaultsComeFromTheNearestRecordThatHoldsOptics() {
		final ImagePlus psf = opticsPsf(1.1);
		assertEquals("1.1", OpticsDefaults.of(psf).get("na"), "the PSF's own record");
		final ImagePlus obj = ImageBridge.toImagePlus(DeconvolveCommandTest.truth().withVoxelSize(VOXEL), "cell.tif");
		ImageJHarness.open(obj, psf);
		final ImagePlus blurred = ImageJHarness.run(obj, "Convolve with PSF...", "image=cell.tif psf=" + psf.getTitle()
				+ " boundary=zero normalize background=0 photons=0 seed=1 offset=0").onlyCreated();
		final var found = OpticsDefaults.of(blurred);
		assertEquals("1.1", found.get("na"), "through the Convolve record's PSF input");
		assertEquals("born-wolf", found.get("model"));
		assertEquals("0.52", found.get("emission"));
		assertNull(found.get("voxel_xy"), "sampling comes from the image, not from the record");
		assertTrue(OpticsDefaults.of(obj).isEmpty(), "no record, no optics");
		assertEquals(1.1, OpticsDefaults.number(found, "na", 1.4));
		// Blind Deconvolve's band-limit optics: the starting PSF's record first, else the image's
		ImageJHarness.open(blurred);
		assertEquals("1.1", BlindDeconvolveDialog.bandDefaults("cell.tif", psf.getTitle()).get("na"));
		assertEquals("1.1", BlindDeconvolveDialog.bandDefaults(blurred.getTitle(), BlindDeconvolve.GAUSSIAN).get("na"));
		assertTrue(BlindDeconvolveDialog.bandDefaults("cell.tif", BlindDeconvolve.GAUSSIAN).isEmpty());
		assertEquals(1.4, OpticsDefaults.number(found, "no_such_key", 1.4));
	}

	@Test
	void sixteenBitOutputTimesScalePlusOffsetIsTheFloatResultWithinOneStep() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif"), psf = ImageBridge.toImagePlus(DeconvolveCommandTest.gaussianPsf().withVoxelSize(VOXEL), "psf.tif");
		ImageJHarness.open(img, psf);
		final String opts = "image=cell.tif psf=psf.tif method=richardson-lucy iterations=6 regularization=0 stop=fixed threshold=0.001 edges=extended "
				+ "offset=100 background=auto";
		final ImagePlus f = ImageJHarness.run(img, "Deconvolve...", opts).onlyCreated();
		final ImagePlus s = ImageJHarness.run(img, "Deconvolve...", opts + " output=16-bit").onlyCreated();
		assertEquals(ImagePlus.GRAY32, f.getType());
		assertEquals(ImagePlus.GRAY16, s.getType());
		final var rec = ImageProvenance.of(s).orElseThrow();
		assertEquals("16-bit", rec.options().get("output"));
		final double offset = ((Number) rec.run().get("output_offset")).doubleValue(), scale = ((Number) rec.run().get("output_scale")).doubleValue();
		assertTrue(scale > 0);
		final String info = (String) s.getProperty("Info");
		assertTrue(info.contains(OutputDepth.infoLine(new OutputDepth.Scaling(offset, scale))), info);
		final Calibration cal = s.getCalibration();
		assertEquals(Calibration.STRAIGHT_LINE, cal.getFunction());
		float min = Float.MAX_VALUE, max = -Float.MAX_VALUE;
		int top = 0;
		double worst = 0;
		for (int z = 1; z <= f.getStackSize(); z++) {
			final float[] a = (float[]) f.getStack().getPixels(z);
			final short[] q = (short[]) s.getStack().getPixels(z);
			for (int i = 0; i < a.length; i++) {
				final int stored = q[i] & 0xffff;
				top = Math.max(top, stored);
				final double back = offset + scale * stored;
				// uniform quantisation: within half a step; one step allowed for float rounding of the 32-bit values
				assertTrue(Math.abs(back - a[i]) <= scale, "voxel " + i + " of plane " + z + ": " + back + " vs " + a[i]);
				worst = Math.max(worst, Math.abs(back - a[i]) / scale);
				assertEquals(back, cal.getCValue(stored), 1e-9 * Math.abs(back) + 1e-12, "ImageJ's calibration shows the real value");
				min = Math.min(min, a[i]);
				max = Math.max(max, a[i]);
			}
		}
		System.out.printf("16-bit output: scale %.6g, offset %.6g, largest error %.4f step(s)%n", scale, offset, worst);
		assertEquals(min, offset, scale, "offset = the smallest value");
		assertEquals(OutputDepth.MAX_STORED, top, "the largest value uses the whole 16-bit range");
		assertEquals((max - min) / 65535.0, scale, 1e-6 * scale);
		// the 16-bit record's line replays to the same stored values
		final ImagePlus again = ImageJHarness.run(img, "Deconvolve...", MacroOptions.format(rec.options())).onlyCreated();
		assertArrayEquals((short[]) s.getStack().getPixels(3), (short[]) again.getStack().getPixels(3));
		assertTrue(again.getProcessor() instanceof ShortProcessor);
	}
}
