package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;
import ij.gui.NewImage;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.testing.ImageJHarness;

/**
 * Blind Deconvolve's and PSF from Beads' guiding lists, headless: which open images the starting-PSF list and the
 * bead-stack list offer, in which order, which start is preselected, and choices in words that macros may give
 * as words or as the released values (the same pixels, the record keeping the values). Outside reference:
 * ImageJ's rule that images are numbered −1, −2, … in the order they are made, so the most negative ID is the
 * newest (from memory of {@code ImagePlus.setID}).
 */
class BlindAndBeadsChoicesTest {

	private static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);
	private static final org.parfocal.command.OpticsRequest OPTICS = new org.parfocal.command.OpticsRequest("born-wolf",
			org.parfocal.psf.Optics.builder().na(1.2).immersionIndex(1.333).emissionWavelength(0.52).build(), 0.08, 0.2, 9, 5);

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static ImagePlus opticsPsf() {
		return ImageJHarness.run(null, "PSF from Optics...", PsfFromOpticsCommandTest.OPTIONS.replace("size_xy=33 size_z=21", "size_xy=9 size_z=5"))
				.onlyCreated();
	}

	private static List<String> titles(final List<BeadStackChoices.Candidate> cs) {
		final List<String> t = new ArrayList<>();
		for (final BeadStackChoices.Candidate c : cs) t.add(c.title());
		return t;
	}

	@Test
	void blindStartListHoldsPlausiblePsfsThenTheOpticsAndTheGaussianAndPreselectsTheNewestParfocalPsf() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus measured = ImageBridge.toImagePlus(SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(VOXEL), "measured-psf.tif");
		final ImagePlus truth = ImageBridge.toImagePlus(DeconvolveCommandTest.truth().withVoxelSize(VOXEL), "cell-truth.tif");
		final ImagePlus rgb = NewImage.createRGBImage("plot.png", 9, 9, 1, NewImage.FILL_WHITE);
		ImageJHarness.open(img, measured, truth, rgb);
		final ImagePlus psf = opticsPsf();
		ImageJHarness.open(psf);
		final String[] starts = PsfChoices.items(img, BlindDeconvolve.FROM_OPTICS, BlindDeconvolve.GAUSSIAN);
		assertArrayEquals(new String[] { psf.getTitle(), "measured-psf.tif", BlindDeconvolve.FROM_OPTICS, BlindDeconvolve.GAUSSIAN }, starts,
				"not the image, its truth (as large as it) or the RGB plot");
		assertTrue(PsfChoices.madeAsPsf(psf.getTitle()));
		assertEquals(false, PsfChoices.madeAsPsf("measured-psf.tif"));
		final String ff = BlindDeconvolve.FREE_FORM;
		assertEquals(psf.getTitle(), BlindDeconvolveDialog.defaultStart(starts, true, BlindDeconvolve.GAUSSIAN, ff), "the PSF just computed");
		assertEquals(BlindDeconvolve.GAUSSIAN, BlindDeconvolveDialog.defaultStart(starts, false, BlindDeconvolve.GAUSSIAN, ff), "a stack of unknown origin is not pushed");
		assertEquals(starts[0], BlindDeconvolveDialog.defaultStart(starts, false, "image", ff), "the last run started from an image");
		assertEquals(BlindDeconvolve.FROM_OPTICS, BlindDeconvolveDialog.defaultStart(starts, true, BlindDeconvolve.FROM_OPTICS, BlindDeconvolve.MODEL_FIT),
				"a model fit cannot start from an image");
		assertEquals(BlindDeconvolve.GAUSSIAN, BlindDeconvolveDialog.defaultStart(new String[] { BlindDeconvolve.FROM_OPTICS, BlindDeconvolve.GAUSSIAN },
				false, "image", ff), "no plausible PSF open");
	}

	@Test
	void blindAndBeadsWordsMapBackToTheReleasedValues() {
		final Map<String, List<String>> values = Map.of("estimate", BlindDeconvolve.ESTIMATES, "support_units", List.of(BlindDeconvolve.VOXELS, BlindDeconvolve.MICRONS),
				"psf", List.of(BlindDeconvolve.FROM_OPTICS, BlindDeconvolve.GAUSSIAN), "background", List.of(BackgroundMode.keys()), "averaging",
				List.of(Averaging.keys()), "optics", List.of(org.parfocal.psf.PsfModels.keys()));
		for (final Map.Entry<String, List<String>> e : values.entrySet()) {
			final List<String> words = new ArrayList<>();
			for (final String v : e.getValue()) {
				final String w = ChoiceWords.word(e.getKey(), v);
				assertEquals(v, ChoiceWords.value(e.getKey(), w), e.getKey() + "=" + v);
				assertEquals(v, ChoiceWords.value(e.getKey(), v), "the released value is still read: " + e.getKey() + "=" + v);
				assertNotEquals(v, w, "shown in words: " + e.getKey() + "=" + v);
				assertTrue(!words.contains(w), "words unique per key: " + w);
				words.add(w);
			}
		}
		assertEquals(PsfFromBeads.NONE, ChoiceWords.word("optics", PsfFromBeads.NONE), "none stays none (the box hints read it)");
		assertEquals("compute from the optics (next dialog)", ChoiceWords.word("psf", Deconvolve.FROM_OPTICS), "Deconvolve's words unchanged");
		assertEquals("background=auto offset=100", ChoiceWords.valuesForWords("background=auto offset=100"), "a typed level is not a bead choice");
	}

	/**
	 * The hints agree with what the command accepts: FWHM_xy warns that a model fit needs another start exactly
	 * when the options record refuses that start with that estimate, and Trust_radius is used exactly by the
	 * refined estimates (those whose plan refines, {@link org.parfocal.command.BlindRequest#plan}).
	 */
	@Test
	void blindHintsAgreeWithWhatTheOptionsAccept() {
		for (final String psf : List.of("psf.tif", BlindDeconvolve.FROM_OPTICS, BlindDeconvolve.GAUSSIAN))
			for (final String estimate : BlindDeconvolve.ESTIMATES) {
				final String[] h = BlindHints.hints(psf, BlindDeconvolve.VOXELS, estimate);
				boolean refused = false;
				org.parfocal.command.BlindRequest o = null;
				try {
					o = new org.parfocal.command.BlindRequest("cell.tif", psf, 0.3, 0.8, 2, 1, 1, 0.002, 0, false, false, true, 0, 0, BlindDeconvolve.VOXELS, 1,
							null, null, null, estimate, 0.2, BlindDeconvolve.FROM_OPTICS.equals(psf) ? OPTICS : null, null, null);
				} catch (final IllegalArgumentException e) {
					refused = true;
				}
				assertEquals(refused, h[0].contains("needs the Gaussian or the optics"), psf + " / " + estimate + ": " + h[0]);
				if (o != null) assertEquals(o.plan() != null && o.plan().refine(), !h[4].startsWith("not used"), estimate + ": " + h[4]);
				assertEquals(BlindDeconvolve.GAUSSIAN.equals(psf), !h[1].startsWith("not used"), psf + ": " + h[1]);
			}
		assertTrue(BlindHints.hints(BlindDeconvolve.GAUSSIAN, BlindDeconvolve.MICRONS, BlindDeconvolve.FREE_FORM)[2].contains("µm"));
	}

	@Test
	void aBlindLineInWordsRunsAsTheLineInValuesAndTheRecordKeepsTheValues() {
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		ImageJHarness.open(img);
		final String values = "image=cell.tif psf=gaussian fwhm_xy=0.3 fwhm_z=0.8 iterations=2 object_updates=1 psf_updates=1 object_tv=0.002 psf_tv=0 "
				+ "centring support_xy=1.2 support_z=1 support_units=microns snapshot_interval=1 edges=periodic offset=100 background=auto "
				+ "estimate=free-form trust_radius=0.2";
		String words = values;
		for (final String[] kv : new String[][] { { "psf", "gaussian" }, { "support_units", "microns" }, { "edges", "periodic" }, { "estimate", "free-form" } })
			words = words.replace(kv[0] + "=" + kv[1], kv[0] + "=" + MacroOptions.quote(ChoiceWords.word(kv[0], kv[1])));
		assertNotEquals(values, words);
		final ImageJHarness.Result a = ImageJHarness.run(img, "Blind Deconvolve...", values), b = ImageJHarness.run(img, "Blind Deconvolve...", words);
		final ImagePlus ia = deblurred(a), ib = deblurred(b);
		ImageJHarness.assertSamePixels(ia, ib, 0);
		final var rec = ImageProvenance.of(ib).orElseThrow().options();
		assertEquals("gaussian", rec.get("psf"));
		assertEquals("microns", rec.get("support_units"));
		assertEquals("free-form", rec.get("estimate"));
		assertEquals("periodic", rec.get("edges"));
	}

	private static ImagePlus deblurred(final ImageJHarness.Result r) {
		return r.created().stream().filter(i -> i.getTitle().matches("cell-blind(-\\d+)?\\.tif")).findFirst().orElseThrow(() -> new AssertionError(r.created()));
	}

	@Test
	void beadStackListPutsRecordingsFirstNewestFirstAndLeavesOutRgbAndMultiChannel() {
		final ImagePlus older = PsfFromBeadsCommandTest.beads("beads-monday.tif");
		final ImagePlus wide = ImageBridge.toImagePlus(SampleScene.cell(96, 96, 8, 7).withVoxelSize(VOXEL), "widefield.tif");
		final ImagePlus psf = opticsPsf();
		final ImagePlus unitSum = ImageBridge.toImagePlus(SampleScene.gaussianPsf(97, 97, 5).withVoxelSize(VOXEL), "wide-kernel.tif"); // sums to 1
		final ImagePlus rgb = NewImage.createRGBImage("beads-plot.png", 200, 200, 1, NewImage.FILL_WHITE);
		final ImagePlus two = ImageBridge.toImagePlus(new Hyperstack(2, 1, List.of(SampleScene.cell(96, 96, 4, 1), SampleScene.cell(96, 96, 4, 2))),
				"beads-two-channel.tif", null);
		final ImagePlus newer = PsfFromBeadsCommandTest.beads("beads-tuesday.tif");
		final List<ImagePlus> open = List.of(older, wide, psf, unitSum, rgb, two, newer);
		assertEquals(List.of("beads-tuesday.tif", "beads-monday.tif", "widefield.tif", "wide-kernel.tif", psf.getTitle()),
				titles(BeadStackChoices.candidates(open)), "bead recordings newest first, other recordings, then PSF-like stacks newest first");
		assertEquals(BeadStackChoices.Rank.PSF_LIKE, BeadStackChoices.rank(psf), "a Parfocal PSF");
		assertEquals(BeadStackChoices.Rank.RECORDING, BeadStackChoices.rank(wide));
		for (final ImagePlus no : List.of(rgb, two)) assertNull(BeadStackChoices.rank(no), no.getTitle());
		assertTrue(BeadStackChoices.psfLike(ImageBridge.toImagePlus(SampleScene.cell(40, 36, 4, 3), "small.tif")), "at most 64 x 64: a PSF box");
	}

	@Test
	void aBeadsLineInWordsRunsAsTheLineInValuesAndTheRecordKeepsTheValues() {
		final ImagePlus in = PsfFromBeadsCommandTest.beads("beads.tif");
		ImageJHarness.open(in);
		final String values = PsfFromBeadsCommandTest.OPTIONS.replace("background=stack averaging=mean", "background=border averaging=median");
		final String words = values.replace("background=border", "background=" + MacroOptions.quote(ChoiceWords.word("background", "border")))
				.replace("averaging=median", "averaging=" + MacroOptions.quote(ChoiceWords.word("averaging", "median")));
		assertNotEquals(values, words);
		final ImagePlus a = ImageJHarness.run(in, "PSF from Beads...", values).onlyCreated();
		final ImagePlus b = ImageJHarness.run(in, "PSF from Beads...", words).onlyCreated();
		ImageJHarness.assertSamePixels(a, b, 0);
		final var rec = ImageProvenance.of(b).orElseThrow().options();
		assertEquals("border", rec.get("background"));
		assertEquals("median", rec.get("averaging"));
	}
}
