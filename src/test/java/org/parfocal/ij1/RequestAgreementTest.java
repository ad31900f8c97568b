package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.TextField;
import java.awt.event.ItemEvent;
import java.awt.event.ItemListener;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.command.BeadsKeys;
import org.parfocal.command.BeadsRequest;
import org.parfocal.command.BeadsRunner;
import org.parfocal.command.BlindKeys;
import org.parfocal.command.BlindRequest;
import org.parfocal.command.BlindRunner;
import org.parfocal.command.CompareKeys;
import org.parfocal.command.CompareRequest;
import org.parfocal.command.CompareRunner;
import org.parfocal.command.ConvolveKeys;
import org.parfocal.command.ConvolveRequest;
import org.parfocal.command.ConvolveRunner;
import org.parfocal.command.KeyTable;
import org.parfocal.command.OpticsRequest;
import org.parfocal.command.PsfFromOpticsRequest;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.testing.ImageJHarness;

/**
 * Convolve with PSF, PSF from Beads, Compare with Sharp References, Blind Deconvolve and PSF from Optics described once
 * ({@link ConvolveKeys}, {@link BeadsKeys}, {@link CompareKeys}, {@link BlindKeys}, {@link PsfFromOpticsRequest#KEYS}): set up in the real
 * dialog with every field off its default, the values entered, the line ImageJ's macro Recorder writes, the
 * provenance record and the request read back from the line and from the record ({@link ConvolveRequest#from},
 * {@link BeadsRequest#from}, {@link CompareRequest#from}, {@link BlindRequest#from}, {@link PsfFromOpticsRequest#from}) all ask for the same run, and the pixels (figures) made are
 * that request's. The sibling of
 * {@link KeyTableAgreementTest}'s Deconvolve check. Outside reference: ImageJ 1.54's Recorder and its derivation
 * of a recorded key from a dialog label.
 */
class RequestAgreementTest {

	@TempDir
	Path dir;

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void convolvesDialogLineRecordAndRequestAgree() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus obj = ConvolveWithPsfCommandTest.object("cell.tif"), psf = ConvolveWithPsfRequestTest.offCentrePsf("psf.tif");
		ImageJHarness.open(obj, psf);
		final ImageJHarness.Recording rec = ImageJHarness.record(obj, "Convolve with PSF...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), "cell.tif");
			pick(ch.get(1), "psf.tif");
			pick(ch.get(2), "periodic");
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			final String[] values = { "1.5", "20", "42", "100" }; // background photons seed offset
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(false); // normalize (first shown ticked)
			box.get(1).setState(true); // recentre
		});
		final ConvolveRequest entered = new ConvolveRequest("cell.tif", "psf.tif", new Acquisition.Options(Boundary.PERIODIC, false, 1.5, 20, 42, 100), true);
		final Map<String, String> line = recordedOptions(rec, ConvolveKeys.MAIN);
		final ImagePlus out = rec.result().onlyCreated();
		final Provenance record = ImageProvenance.of(out).orElseThrow();
		assertEquals(entered, ConvolveRequest.from(line), "the recorded line (" + rec.line() + ")");
		assertEquals(entered, ConvolveRequest.from(record.options()), "the record");
		assertNotEquals(entered, ConvolveRequest.from(Map.of("image", "cell.tif", "psf", "psf.tif")), "every value entered is off its default");
		final float[] expected = ConvolveRunner.run(entered, ImageBridge.toCore(obj), ImageBridge.toVolume(psf, "The PSF"), Monitor.NONE).image().first().data();
		assertArrayEquals(expected, ImageBridge.toCore(out).first().data(), "the pixels are the entered request's");
	}

	@Test
	void beadsDialogLineRecordAndRequestAgree() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus in = PsfFromBeadsCommandTest.beads("beads.tif");
		ImageJHarness.open(in);
		final ImageJHarness.Recording rec = ImageJHarness.record(in, "PSF from Beads...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), ChoiceWords.word("image", "beads.tif"));
			pick(ch.get(1), ChoiceWords.word("background", "border"));
			pick(ch.get(2), ChoiceWords.word("averaging", "median"));
			pick(ch.get(3), ChoiceWords.word("optics", "gaussian"));
			pick(ch.get(4), ChoiceWords.word("modality", "confocal"));
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			// box_xy box_z bead_diameter threshold outlier_z voxel_xy voxel_z na immersion_index sample_index depth emission excitation pinhole sheet_thickness
			final String[] values = { "1.5", "2.4", "0.12", "7", "3", "0.05", "0.15", "1.2", "1.333", "1.34", "1", "0.55", "0.49", "0.9", "1.5" };
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(false); // reject_saturated (first shown ticked)
			box.get(1).setState(true); // symmetrize
		});
		final Optics optics = Optics.builder().modality(Modality.CONFOCAL).na(1.2).immersionIndex(1.333).sampleIndex(1.34).depth(1).emissionWavelength(0.55)
				.excitationWavelength(0.49).pinholeAiryUnits(0.9).sheetThickness(1.5).build();
		final BeadsRequest entered = new BeadsRequest("beads.tif", 1.5, 2.4, 0.12, 7, false, 3, BackgroundMode.BORDER, Averaging.MEDIAN, true, 0.05, 0.15,
				"gaussian", optics);
		final Map<String, String> line = recordedOptions(rec, BeadsKeys.MAIN);
		final ImagePlus out = rec.result().created().stream().filter(i -> i.getTitle().startsWith("psf-beads")).findFirst().orElseThrow();
		final Provenance record = ImageProvenance.of(out).orElseThrow();
		assertEquals(entered, BeadsRequest.from(line), "the recorded line (" + rec.line() + ")");
		assertEquals(entered, BeadsRequest.from(record.options()), "the record");
		assertEquals(line.keySet(), record.options().keySet(), "the record holds the recorded keys");
		final BeadsRunner.Outcome direct = BeadsRunner.run(entered, ImageBridge.toVolume(in, "The bead stack"), in.getBitDepth(), in.getTitle(), Monitor.NONE);
		assertArrayEquals(direct.measurement().psf().data(), ImageBridge.toVolume(out, "psf").data(), "the PSF is the entered request's");
		for (final Map.Entry<String, Object> e : direct.facts().entrySet())
			assertEquals(String.valueOf(e.getValue()), String.valueOf(record.run().get(e.getKey())), "run fact " + e.getKey());
	}

	@Test
	void comparesDialogLineRecordAndRequestAgree() throws Exception {
		ImageJHarness.assumeDisplay();
		CompareWithReferencesCommandTest.writeReferences(dir, 2);
		final ImagePlus res = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.deconvolved(), "result.tif");
		final ImagePlus rec = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.recording(), "recording.tif");
		final ImagePlus psf = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.psf(), "psf.tif");
		final ImagePlus open = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.truth(102), "sharp-open-1.tif");
		ImageJHarness.open(res, rec, psf, open);
		final ImageJHarness.Recording recd = ImageJHarness.record(res, "Compare with Sharp References...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), "result.tif");
			pick(ch.get(1), "recording.tif");
			pick(ch.get(2), "psf.tif");
			final List<TextField> str = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			final String[] texts = { dir.toString(), "sharp-open-*", "100", "5" }; // reference_folder reference_images offset background
			for (int i = 0; i < texts.length; i++) str.get(i).setText(texts[i]);
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			final String[] values = { "2", "0.5", "5", "1024", "4", "9" }; // photons read_noise patch_size patches bootstrap seed
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(true); // ignore_calibration
			box.get(1).setState(false); // estimate_noise (first shown ticked)
			box.get(2).setState(true); // match_resolution
		});
		final CompareRequest entered = new CompareRequest("result.tif", dir.toString(), "sharp-open-*", "recording.tif", "psf.tif", Level.of(100), Level.of(5), 2,
				0.5, 5, 1024, 4, 9, true, false, true);
		final Map<String, String> line = recordedOptions(recd, CompareKeys.MAIN);
		final ImagePlus plot = recd.result().created().stream().filter(i -> i.getTitle().startsWith("Marginals of")).findFirst().orElseThrow();
		final Provenance record = ImageProvenance.of(plot).orElseThrow();
		assertEquals(entered, CompareRequest.from(line), "the recorded line (" + recd.line() + ")");
		assertEquals(entered, CompareRequest.from(record.options()), "the record");
		assertEquals(line.keySet(), record.options().keySet(), "the record holds the recorded keys");
		final List<org.parfocal.core.Volume> refs = ReferenceImages.references(dir.toString(), "sharp-open-*", List.of("result.tif", "recording.tif", "psf.tif"))
				.stream().map(CompareWithReferences.Reference::volume).toList();
		final CompareRunner.Outcome direct = CompareRunner.run(entered, ImageBridge.toVolume(res, "r"), refs, ImageBridge.toVolume(rec, "i"),
				ImageBridge.toVolume(psf, "p"), Monitor.NONE);
		assertEquals(direct.report().distance(), ((Number) record.run().get("patch_distance")).doubleValue(), 0, "the figures are the entered request's");
		assertEquals(direct.consistency().meanChiSquare(), ((Number) record.run().get("chi_square")).doubleValue(), 0);
	}

	@Test
	void blindDialogLineRecordAndRequestAgree() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		ImageJHarness.open(img);
		final ImageJHarness.Recording rec = ImageJHarness.record(img, "Blind Deconvolve...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), "cell.tif");
			pick(ch.get(1), ChoiceWords.word("psf", "gaussian"));
			pick(ch.get(2), ChoiceWords.word("support_units", "microns"));
			pick(ch.get(3), ChoiceWords.word("edges", "periodic"));
			pick(ch.get(4), ChoiceWords.word("estimate", "model-fit-refined"));
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			// fwhm_xy fwhm_z iterations object_updates psf_updates object_tv psf_tv support_xy support_z snapshot_interval trust_radius
			final String[] values = { "0.3", "0.8", "4", "2", "2", "0.003", "0.001", "0.72", "1", "2", "0.15" };
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<TextField> str = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			str.get(0).setText("100"); // offset
			str.get(1).setText("2.5"); // background
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(true); // band_limit: the band-limit optics' dialog follows
			box.get(1).setState(true); // symmetric
			box.get(2).setState(false); // centring (first shown ticked)
			BlindDeconvolveCommandTest.answerNextDialog(dialog, "1.2", "1.333", "0.55"); // na immersion_index emission
		});
		final BlindRequest entered = new BlindRequest("cell.tif", "gaussian", 0.3, 0.8, 4, 2, 2, 0.003, 0.001, true, true, false, 0.72, 1, "microns", 2,
				EdgeMode.PERIODIC, Level.of(100), Level.of(2.5), "model-fit-refined", 0.15, null, new BlindRequest.BandOptics(1.2, 1.333, 0.55), null);
		final Map<String, String> line = recordedOptions(rec, KeyTable.of("Blind Deconvolve and its band limit").all(BlindKeys.MAIN).all(BlindKeys.BAND).build());
		final ImagePlus out = rec.result().created().stream().filter(i -> i.getTitle().equals("cell-blind.tif")).findFirst().orElseThrow();
		final Provenance record = ImageProvenance.of(out).orElseThrow();
		assertEquals(entered, BlindRequest.from(line), "the recorded line (" + rec.line() + ")");
		assertEquals(entered, BlindRequest.from(record.options()), "the record");
		assertEquals(line.keySet(), record.options().keySet(), "the record holds the recorded keys");
		assertNotEquals(entered, BlindRequest.from(Map.of("image", "cell.tif", "psf", "gaussian", "band_limit", "")), "every value entered is off its default");
		final BlindRunner.Outcome direct = Commands.withImageJThreads(() -> BlindRunner.run(entered, ImageBridge.toCore(img).first(), null, null, null, Monitor.NONE));
		assertArrayEquals(direct.object().data(), ImageBridge.toCore(out).first().data(), "the pixels are the entered request's");
		for (final Map.Entry<String, Object> e : direct.facts(entered.iterations()).entrySet())
			assertEquals(String.valueOf(e.getValue()), String.valueOf(record.run().get(e.getKey())), "run fact " + e.getKey());
	}

	@Test
	void opticsDialogLineRecordAndRequestAgree() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImageJHarness.Recording rec = ImageJHarness.record(null, "PSF from Optics...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), ChoiceWords.word("model", "richards-wolf"));
			pick(ch.get(1), ChoiceWords.word("modality", "confocal"));
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			// na immersion_index sample_index coverslip_index coverslip_thickness depth immersion_index_design coverslip_index_design
			// coverslip_thickness_design working_distance emission excitation pinhole sheet_thickness voxel_xy voxel_z size_xy size_z
			final String[] values = { "1.3", "1.515", "1.38", "1.525", "175", "4", "1.516", "1.523", "172", "140", "0.6", "0.56", "0.8", "1.5", "0.1", "0.3",
					"11", "7" };
			assertEquals(values.length, num.size(), "every numeric field set");
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(true); // show_profiles (unticked for a macro that leaves it out)
		});
		final Optics optics = Optics.builder().modality(Modality.CONFOCAL).na(1.3).immersionIndex(1.515).sampleIndex(1.38).coverslipIndex(1.525)
				.coverslipThickness(175).depth(4).immersionIndexDesign(1.516).coverslipIndexDesign(1.523).coverslipThicknessDesign(172).workingDistance(140)
				.emissionWavelength(0.6).excitationWavelength(0.56).pinholeAiryUnits(0.8).sheetThickness(1.5).build();
		final PsfFromOpticsRequest entered = new PsfFromOpticsRequest(new OpticsRequest("richards-wolf", optics, 0.1, 0.3, 11, 7), true);
		final Map<String, String> line = recordedOptions(rec, PsfFromOpticsRequest.KEYS);
		final ImagePlus out = rec.result().created().stream().filter(i -> i.getTitle().startsWith("psf-")).findFirst().orElseThrow();
		final Provenance record = ImageProvenance.of(out).orElseThrow();
		assertEquals(entered, PsfFromOpticsRequest.from(line), "the recorded line (" + rec.line() + ")");
		assertEquals(entered, PsfFromOpticsRequest.from(record.options()), "the record");
		assertEquals(line.keySet(), record.options().keySet(), "the record holds the recorded keys");
		assertEquals(line, MacroOptions.parse(entered.macroOptions()), "the request's line is the recorded one");
		assertNotEquals(entered, PsfFromOpticsRequest.from(Map.of("voxel_xy", "0.1", "voxel_z", "0.3")), "every value entered is off its default");
		final Volume psf = Commands.withImageJThreads(entered.optics()::compute);
		assertArrayEquals(psf.data(), ImageBridge.toVolume(out, "psf").data(), "the pixels are the entered request's");
		assertEquals("11x11x7", record.run().get("grid"));
		assertEquals(String.valueOf(Fwhm.lateral(psf)), String.valueOf(record.run().get("fwhm_x_um")), "run fact fwhm_x_um");
		assertEquals(String.valueOf(Fwhm.axial(psf)), String.valueOf(record.run().get("fwhm_z_um")), "run fact fwhm_z_um (NaN when cut off, kept as text)");
		assertEquals(String.valueOf(entered.optics().ignored()), String.valueOf(record.run().get("ignored")), "run fact ignored");
	}

	/** The recorded line's options, after checking they are table keys in dialog order. */
	private static Map<String, String> recordedOptions(final ImageJHarness.Recording rec, final KeyTable table) {
		final Map<String, String> given = MacroOptions.parse(ImageJHarness.parseRunLine(rec.line())[1]);
		final List<String> inTableOrder = new ArrayList<>(table.names());
		inTableOrder.retainAll(given.keySet());
		assertEquals(inTableOrder, List.copyOf(given.keySet()), "recorded keys: table keys in dialog order (" + rec.line() + ")");
		return given;
	}

	private static void pick(final Choice c, final String item) {
		c.select(item);
		assertEquals(item, c.getSelectedItem());
		for (final ItemListener l : c.getItemListeners()) l.itemStateChanged(new ItemEvent(c, ItemEvent.ITEM_STATE_CHANGED, item, ItemEvent.SELECTED));
	}
}
