package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Choice;
import java.awt.TextField;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

class PsfFromOpticsCommandTest {

	private static final String CMD = "PSF from Optics...";
	static final List<String> KEYS = List.of("model", "modality", "na", "immersion_index", "sample_index", "coverslip_index",
			"coverslip_thickness", "depth", "immersion_index_design", "coverslip_index_design", "coverslip_thickness_design", "working_distance",
			"emission", "excitation", "pinhole", "sheet_thickness", "voxel_xy", "voxel_z", "size_xy", "size_z", "show_profiles");

	static final String OPTIONS = "model=born-wolf modality=widefield na=1.2 immersion_index=1.333 immersion_index_design=1.333 "
			+ "sample_index=1.333 coverslip_index=1.522 coverslip_index_design=1.522 coverslip_thickness=170 coverslip_thickness_design=170 "
			+ "working_distance=150 depth=0 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=33 size_z=21";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void runByMenuNameGivesTheCoreModelCalibratedWithProvenance() {
		final ImagePlus psf = ImageJHarness.run(null, CMD, OPTIONS).onlyCreated();
		assertEquals(32, psf.getBitDepth());
		assertEquals(33, psf.getWidth());
		assertEquals(21, psf.getNSlices());
		assertEquals(0.08, psf.getCalibration().pixelWidth, 1e-12);
		assertEquals(0.2, psf.getCalibration().pixelDepth, 1e-12);
		assertEquals("µm", psf.getCalibration().getUnit());
		final Optics optics = Optics.builder().na(1.2).immersionIndex(1.333).emissionWavelength(0.52).build();
		final Volume core = PsfModels.get("born-wolf").compute(optics, new PsfGrid(33, 33, 21, 0.08, 0.08, 0.2));
		final Volume got = ImageBridge.toVolume(psf, "psf");
		org.junit.jupiter.api.Assertions.assertArrayEquals(core.data(), got.data(), 1e-9f);
		assertEquals(1.0, got.sum(), 1e-5, "unit sum");
		final var p = ImageProvenance.of(psf).orElseThrow();
		assertEquals(KEYS.subList(0, KEYS.size() - 1), List.copyOf(p.options().keySet()), "every key but the unchecked flag");
		assertEquals(Fwhm.lateral(core), ((Number) p.run().get("fwhm_x_um")).doubleValue(), 1e-12);
	}

	/** Issue 17: a widefield run recorded excitation=0 and sheet_thickness=0 where the dialog showed 0.488 and 2. */
	@Test
	void theRecordKeepsWhatWasEnteredAndSaysWhichFieldsTheModalityIgnored() {
		final ImageJHarness.Result r = ImageJHarness.run(null, CMD, OPTIONS);
		final var p = ImageProvenance.of(r.onlyCreated()).orElseThrow();
		assertEquals("0.488", p.options().get("excitation"));
		assertEquals("2", p.options().get("sheet_thickness"));
		assertEquals("1", p.options().get("pinhole"), "accepted and recorded as given");
		final Map<?, ?> ignored = (Map<?, ?>) p.run().get("ignored");
		// born-wolf (no depth aberration, box given) in widefield: the layers, the design values and the scanning/sheet fields
		assertEquals(List.of("sample_index", "coverslip_index", "coverslip_thickness", "depth", "immersion_index_design", "coverslip_index_design",
				"coverslip_thickness_design", "working_distance", "excitation", "pinhole", "sheet_thickness"), List.copyOf(ignored.keySet()));
		assertEquals("widefield modality has no pinhole", ignored.get("pinhole"));
		final List<String> said = r.log().stream().filter(l -> l.contains("ignored")).toList();
		assertEquals(1, said.size(), r.log()::toString);
		assertTrue(said.get(0).contains("pinhole (widefield modality has no pinhole)"), said.get(0));
		// the record read back from the image's Info (JSON) keeps the entry
		assertEquals("widefield modality has no pinhole", ((Map<?, ?>) ImageProvenance.of(r.onlyCreated()).orElseThrow().run().get("ignored")).get("pinhole"));
	}

	@Test
	void fieldsTheModalityUsesAreNotListedIgnored() {
		final String confocal = OPTIONS.replace("model=born-wolf", "model=gibson-lanni").replace("modality=widefield", "modality=confocal");
		final var p = ImageProvenance.of(ImageJHarness.run(null, CMD, confocal).onlyCreated()).orElseThrow();
		final Map<?, ?> ignored = (Map<?, ?>) p.run().get("ignored");
		assertEquals(List.of("sheet_thickness"), List.copyOf(ignored.keySet()), "gibson-lanni confocal uses every field but the sheet");
		final String sheet = OPTIONS.replace("model=born-wolf", "model=gibson-lanni").replace("modality=widefield", "modality=light-sheet");
		final var q = ImageProvenance.of(ImageJHarness.run(null, CMD, sheet).onlyCreated()).orElseThrow();
		assertEquals(List.of("excitation", "pinhole"), List.copyOf(((Map<?, ?>) q.run().get("ignored")).keySet()));
	}

	@Test
	void undersamplingIsReportedWithTheNumbers() {
		final String coarse = OPTIONS.replace("voxel_xy=0.08", "voxel_xy=0.2");
		final ImageJHarness.Result r = ImageJHarness.run(null, CMD, coarse);
		assertTrue(String.join("\n", r.log()).contains("lateral step 0.2 µm is coarser than Nyquist"), () -> String.join("\n", r.log()));
		assertTrue(ImageProvenance.of(r.onlyCreated()).orElseThrow().warnings().get(0).startsWith("Undersampled"));
	}

	@Test
	void badOpticsAreRefusedInOneLineAndNothingIsCreated() {
		assertFails("must be below the immersion index", OPTIONS.replace("na=1.2", "na=1.4"));
		assertFails("emission", OPTIONS.replace("emission=0.52", "emission=-0.5"));
		assertFails("Enter the voxel size", OPTIONS.replace("voxel_xy=0.08", "voxel_xy=0"));
		assertFails("'gaussian-ish'", OPTIONS.replace("model=born-wolf", "model=gaussian-ish"));
	}

	private static void assertFails(final String expected, final String options) {
		final int before = Interpreter.getBatchModeImageIDs().length;
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(null, CMD, options));
		assertTrue(e.getMessage().contains(expected), e.getMessage());
		assertEquals(before, Interpreter.getBatchModeImageIDs().length, "nothing created");
	}

	@Test
	@Tag("display")
	void recordedLineHasEveryKeyAndReplaysHeadless() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImageJHarness.Recording rec = ImageJHarness.record(null, CMD, dialog -> {
			final List<Choice> choices = dialog.getChoices().stream().map(Choice.class::cast).toList();
			choices.get(0).select(ChoiceWords.word("model", "gibson-lanni")); // the dialog shows words
			choices.get(1).select(ChoiceWords.word("modality", "widefield"));
			final List<TextField> f = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			f.get(0).setText("1.3"); // na
			f.get(1).setText("1.518"); // immersion
			f.get(2).setText("1.518");
			f.get(3).setText("1.38"); // sample: index mismatch
			f.get(9).setText("8"); // depth
			f.get(10).setText("0.6"); // emission
			f.get(14).setText("0.1"); // voxel xy
			f.get(15).setText("0.25"); // voxel z
			f.get(16).setText("31");
			f.get(17).setText("41");
		});
		final String opts = ImageJHarness.parseRunLine(rec.line())[1];
		for (final String k : KEYS) assertTrue(opts.contains(k), "recorded line lacks " + k + ": " + rec.line());
		final ImagePlus recorded = rec.result().created().stream().filter(i -> i.getTitle().startsWith("psf-")).findFirst().orElseThrow();
		assertEquals(2, rec.result().created().size(), "the PSF and its profile plot");
		assertEquals(List.copyOf(org.parfocal.provenance.MacroOptions.parse(opts).keySet()),
				List.copyOf(ImageProvenance.of(recorded).orElseThrow().options().keySet()), "provenance holds exactly the recorded keys");
		ImageJHarness.assertSamePixels(recorded, ImageJHarness.replayInHeadlessJvm(rec.line()), 0);
	}

	/** Issue 17: the fields the chosen model and modality do not use are greyed out, and follow the choices. */
	@Test
	@Tag("display")
	void fieldsTheChoicesDoNotUseAreGreyedOutAndStillRecorded() throws Exception {
		ImageJHarness.assumeDisplay();
		final java.util.Map<String, List<String>> greyed = new java.util.LinkedHashMap<>();
		final ImageJHarness.Recording rec = ImageJHarness.record(null, CMD, dialog -> {
			final List<Choice> choices = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(choices.get(0), ChoiceWords.word("model", "gibson-lanni"));
			pick(choices.get(1), ChoiceWords.word("modality", "confocal"));
			greyed.put("gibson-lanni confocal", disabled(dialog));
			pick(choices.get(1), ChoiceWords.word("modality", "widefield"));
			greyed.put("gibson-lanni widefield", disabled(dialog));
			pick(choices.get(0), ChoiceWords.word("model", "born-wolf"));
			greyed.put("born-wolf widefield, automatic box", disabled(dialog));
			// only the fields' own labels grey: the Model label (the dialog's first) stays as it is
			final java.awt.Label first = java.util.Arrays.stream(((java.awt.Container) (Object) dialog).getComponents()).filter(java.awt.Label.class::isInstance)
					.map(java.awt.Label.class::cast).findFirst().orElseThrow();
			greyed.put("model label enabled", List.of(first.getText() + " " + first.isEnabled()));
			final List<TextField> f = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			f.get(14).setText("0.1");
			f.get(15).setText("0.25");
			f.get(16).setText("31"); // a box size typed: the text listener updates the greying
			f.get(17).setText("21");
			for (final TextField t : List.of(f.get(16), f.get(17))) // as typing does, whether or not setText posts the event here
				for (final java.awt.event.TextListener l : t.getTextListeners()) l.textValueChanged(new java.awt.event.TextEvent(t, java.awt.event.TextEvent.TEXT_VALUE_CHANGED));
			greyed.put("born-wolf widefield, box given", disabled(dialog));
		});
		assertEquals(List.of("Model: true"), greyed.get("model label enabled"));
		assertEquals(List.of("sheet_thickness"), greyed.get("gibson-lanni confocal"));
		assertEquals(List.of("excitation", "pinhole", "sheet_thickness"), greyed.get("gibson-lanni widefield"));
		assertEquals(List.of("coverslip_index", "coverslip_thickness", "immersion_index_design", "coverslip_index_design", "coverslip_thickness_design",
				"working_distance", "excitation", "pinhole", "sheet_thickness"), greyed.get("born-wolf widefield, automatic box"));
		assertTrue(greyed.get("born-wolf widefield, box given").containsAll(List.of("sample_index", "depth")), greyed.toString());
		final String opts = ImageJHarness.parseRunLine(rec.line())[1];
		assertTrue(opts.contains("pinhole=1") && opts.contains("excitation="), "greyed fields are still recorded: " + rec.line());
		final Map<?, ?> ignored = (Map<?, ?>) ImageProvenance.of(rec.result().created().stream().filter(i -> i.getTitle().startsWith("psf-")).findFirst().orElseThrow())
				.orElseThrow().run().get("ignored");
		assertEquals(greyed.get("born-wolf widefield, box given"), List.copyOf(ignored.keySet()), "the dialog greys what the record lists");
	}

	private static List<String> disabled(final ij.gui.GenericDialog gd) {
		final boolean[] on = OpticsGreying.enabled(gd);
		final List<String> out = new java.util.ArrayList<>();
		for (int i = 0; i < on.length; i++) if (!on[i]) out.add(org.parfocal.psf.OpticsFields.FIELDS.get(i).key());
		return out;
	}

	private static void pick(final Choice c, final String item) {
		c.select(item);
		assertEquals(item, c.getSelectedItem());
		for (final java.awt.event.ItemListener l : c.getItemListeners())
			l.itemStateChanged(new java.awt.event.ItemEvent(c, java.awt.event.ItemEvent.ITEM_STATE_CHANGED, item, java.awt.event.ItemEvent.SELECTED));
	}
}
