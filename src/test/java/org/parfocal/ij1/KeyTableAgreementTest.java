package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.TextField;
import java.awt.event.ItemEvent;
import java.awt.event.ItemListener;
import java.lang.reflect.Field;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;
import ij.Macro;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.blocks.Recipe;
import org.parfocal.command.BlindKeys;
import org.parfocal.command.CommandKeys;
import org.parfocal.command.CompareKeys;
import org.parfocal.command.KeyTableTest;
import org.parfocal.command.DeconvolveKeys;
import org.parfocal.command.DeconvolveRequest;
import org.parfocal.command.Key;
import org.parfocal.command.KeyTable;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.scijava.BlindDeconvolveCommand;
import org.parfocal.scijava.DeconvolveCommand;
import org.parfocal.testing.ImageJHarness;
import org.scijava.plugin.Parameter;

/**
 * Deconvolve described once ({@link DeconvolveKeys}): its dialog, the line ImageJ's macro Recorder writes for it,
 * the provenance record and the command-line reader ({@link Recipe}) agree, and so do the SciJava command's
 * inputs. Outside references: ImageJ 1.54's own derivation of a recorded key from a dialog label
 * ({@code ij.Macro.trimKey}) and its Recorder.
 */
class KeyTableAgreementTest {

	private static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** ImageJ records a field under the first word of its label: for every key, that word is the key. */
	@Test
	void imageJRecordsEveryFieldUnderItsKey() {
		for (final KeyTable t : KeyTableTest.TABLES)
			for (final Key k : t.keys())
				assertEquals(k.name(), Macro.trimKey(k.label()), t.title() + ": label '" + k.label() + "'");
	}

	/** The Help pages list the tables' keys in dialog order, with their units. */
	@Test
	void helpIsMadeFromTheTables() {
		assertEquals(DeconvolveKeys.MAIN.names(), DialogHelp.deconvolve().fields().stream().map(DialogHelp.Field::key).toList());
		assertEquals(DeconvolveKeys.WATCH.names(), DialogHelp.watch().fields().stream().map(DialogHelp.Field::key).toList());
		final List<String> optics = DialogHelp.psfFromOptics(false).fields().stream().map(DialogHelp.Field::key).toList();
		assertEquals(new java.util.HashSet<>(DeconvolveKeys.OPTICS.names()), new java.util.HashSet<>(optics));
		for (final DialogHelp.Field f : DialogHelp.psfFromOptics(false).fields()) assertEquals(DeconvolveKeys.OPTICS.key(f.key()).unit(), f.unit(), f.key());
		assertTrue(DialogHelp.deconvolve().html().contains("1 to 10000"), "the iterations' range is in Help");
		final List<DialogHelp.Field> withProfiles = DialogHelp.psfFromOptics(true).fields();
		assertEquals(optics.size() + 1, withProfiles.size());
		assertEquals(org.parfocal.command.OtherKeys.PROFILES.names(), List.of(withProfiles.get(withProfiles.size() - 1).key()), "show_profiles comes last");
		for (final Map.Entry<DialogHelp.Page, KeyTable> e : wholePages().entrySet()) {
			final KeyTable t = e.getValue();
			final List<DialogHelp.Field> rows = e.getKey().fields();
			assertEquals(t.names(), rows.stream().map(DialogHelp.Field::key).toList(), t.title() + ": Help rows are the table's, in dialog order");
			for (final DialogHelp.Field f : rows) {
				final Key k = t.key(f.key());
				assertEquals(k.helpLabel(), f.label(), t.title() + ": " + f.key());
				assertEquals(k.unit(), f.unit(), t.title() + ": " + f.key());
				assertTrue(f.meaning().startsWith(k.help()), t.title() + ": " + f.key());
			}
		}
	}

	/** Help pages made of one whole table each. */
	private static Map<DialogHelp.Page, KeyTable> wholePages() {
		final Map<DialogHelp.Page, KeyTable> m = new java.util.LinkedHashMap<>();
		m.put(DialogHelp.deconvolve(), DeconvolveKeys.MAIN);
		m.put(DialogHelp.watch(), DeconvolveKeys.WATCH);
		m.put(DialogHelp.blind(), BlindKeys.MAIN);
		m.put(DialogHelp.band(), BlindKeys.BAND);
		m.put(DialogHelp.compare(), CompareKeys.MAIN);
		m.put(DialogHelp.beads(), org.parfocal.command.BeadsKeys.MAIN);
		m.put(DialogHelp.convolve(), org.parfocal.command.ConvolveKeys.MAIN);
		m.put(DialogHelp.export(), org.parfocal.command.OtherKeys.EXPORT);
		m.put(DialogHelp.report(), org.parfocal.command.OtherKeys.REPORT);
		m.put(DialogHelp.options(), org.parfocal.command.OtherKeys.OPTIONS);
		return m;
	}

	/**
	 * The inputs of every converted SciJava command start at its table's defaults (what it sends with nothing
	 * changed is what a macro line without the key gets), and an input's minimum is the table's.
	 */
	@Test
	void everySciJavaCommandStartsAtItsTablesDefaults() throws Exception {
		assertSciJavaDefaults(new BlindDeconvolveCommand(), BlindKeys.MAIN, 15);
		assertSciJavaDefaults(new org.parfocal.scijava.CompareWithReferencesCommand(), CompareKeys.MAIN, 10);
		assertSciJavaDefaults(new org.parfocal.scijava.PsfFromBeadsCommand(), org.parfocal.command.BeadsKeys.MAIN, 20);
		assertSciJavaDefaults(new org.parfocal.scijava.ConvolveWithPsfCommand(), org.parfocal.command.ConvolveKeys.MAIN, 7);
		assertSciJavaDefaults(new org.parfocal.scijava.PsfFromOpticsCommand(), org.parfocal.command.OtherKeys.PROFILES, 1);
		assertSciJavaDefaults(new org.parfocal.scijava.ExportProvenanceMacroCommand(), org.parfocal.command.OtherKeys.EXPORT, 1);
		assertSciJavaDefaults(new org.parfocal.scijava.WriteReportCommand(), org.parfocal.command.OtherKeys.REPORT, 1);
		assertSciJavaDefaults(new org.parfocal.scijava.ParfocalOptionsCommand(), org.parfocal.command.OtherKeys.OPTIONS, 1);
	}

	/** Compares the options a fresh SciJava command sends with the table's defaults; at least {@code least} keys compared. */
	static void assertSciJavaDefaults(final org.parfocal.scijava.MenuCommand cmd, final KeyTable t, final int least) throws Exception {
		final Map<String, String> sent = MacroOptions.parse(cmd.macroOptions());
		int compared = 0;
		for (final Key k : t.keys()) {
			final String v = sent.get(k.name());
			if (k.kind() == CommandKeys.Kind.FLAG) {
				assertEquals(Boolean.parseBoolean(k.defaultValue()), sent.containsKey(k.name()), t.title() + ": " + k.name());
				compared++;
				continue;
			}
			if (v == null) continue; // an image, or a file left empty
			if (k.kind() == CommandKeys.Kind.NUMBER) assertEquals(k.defaultNumber(), Double.parseDouble(v), 0, t.title() + ": " + k.name());
			else if (k.name().equals("edges")) assertEquals(EdgeMode.parse(k.defaultValue()), EdgeMode.parse(v));
			else if (!k.defaultValue().isEmpty()) assertEquals(k.defaultValue(), v, t.title() + ": " + k.name());
			compared++;
		}
		assertTrue(compared >= least, t.title() + ": inputs compared: " + compared);
		for (Class<?> c = cmd.getClass(); c != Object.class; c = c.getSuperclass())
			for (final Field f : c.getDeclaredFields()) {
				final Parameter p = f.getAnnotation(Parameter.class);
				if (p == null || p.min().isEmpty()) continue;
				final Key k = t.find(f.getName()).orElse(null);
				if (k == null || Double.isNaN(k.min())) continue;
				assertEquals(k.min(), Double.parseDouble(p.min()), 0, t.title() + ": " + f.getName() + ": @Parameter min against the table");
			}
	}

	/** The SciJava command's inputs start at the table's defaults and its minimums are the table's. */
	@Test
	void theSciJavaInputsStartAtTheTablesDefaults() throws Exception {
		final Map<String, String> sent = MacroOptions.parse(new DeconvolveCommand().macroOptions());
		int compared = 0;
		for (final Key k : DeconvolveKeys.MAIN.keys()) {
			final String v = sent.get(k.name());
			if (v == null) continue; // an image, or a checkbox left unticked
			if (k.kind() == CommandKeys.Kind.NUMBER) assertEquals(k.defaultNumber(), Double.parseDouble(v), 0, k.name());
			else if (k.name().equals("edges")) assertEquals(EdgeMode.parse(k.defaultValue()), EdgeMode.parse(v));
			else if (!k.name().equals("psf")) assertEquals(k.defaultValue(), v, k.name());
			compared++;
		}
		assertTrue(compared >= 8, "inputs compared: " + compared);
		for (Class<?> c = DeconvolveCommand.class; c != Object.class; c = c.getSuperclass())
			for (final Field f : c.getDeclaredFields()) {
				final Parameter p = f.getAnnotation(Parameter.class);
				if (p == null || p.min().isEmpty()) continue;
				final Key k = DeconvolveKeys.MAIN.find(f.getName()).or(() -> DeconvolveKeys.WATCH.find(f.getName())).orElse(null);
				if (k == null || Double.isNaN(k.min())) continue;
				assertEquals(k.min(), Double.parseDouble(p.min()), 0, f.getName() + ": @Parameter min against the table");
			}
	}

	/**
	 * A run set up in the real dialog: the Recorder's line holds table keys in table order, and the line, the
	 * record and the command-line reader ask for the same run, which is the one entered.
	 */
	@Test
	void theDialogTheRecordedLineTheRecordAndTheCommandLineAgree() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		final ImagePlus psf = ImageBridge.toImagePlus(org.parfocal.demo.SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(VOXEL), "psf.tif");
		ImageJHarness.open(img, psf);
		final ImageJHarness.Recording rec = ImageJHarness.record(img, "Deconvolve...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), "cell.tif");
			pick(ch.get(1), "psf.tif");
			pick(ch.get(2), ChoiceWords.word("method", "richardson-lucy-tv"));
			pick(ch.get(3), ChoiceWords.word("stop", "fixed"));
			pick(ch.get(4), ChoiceWords.word("edges", "periodic"));
			final List<TextField> numbers = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			numbers.get(0).setText("7");
			numbers.get(1).setText("0.004");
			numbers.get(2).setText("0.002");
			final List<TextField> strings = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			strings.get(0).setText("100");
			strings.get(1).setText("5");
			final List<Checkbox> boxes = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			boxes.get(0).setState(false); // plot
			boxes.get(2).setState(true); // recentre
		});
		final String options = ImageJHarness.parseRunLine(rec.line())[1];
		final Map<String, String> given = MacroOptions.parse(options);
		final List<String> inTableOrder = new ArrayList<>(DeconvolveKeys.MAIN.names());
		inTableOrder.retainAll(given.keySet());
		assertEquals(inTableOrder, List.copyOf(given.keySet()), "recorded keys: table keys in dialog order (" + rec.line() + ")");
		final ImagePlus out = rec.result().created().stream().filter(i -> i.getTitle().equals("cell-deconvolved.tif")).findFirst().orElseThrow();
		final Provenance record = ImageProvenance.of(out).orElseThrow();
		final DeconvolutionOptions entered = new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 7, 0.004, Stopping.FIXED, 0.002, EdgeMode.PERIODIC,
				Level.of(100), Level.of(5));
		assertEquals(entered, DeconvolveRequest.from(given).deconvolution(), "the recorded line");
		assertEquals(entered, DeconvolveRequest.from(record.options()).deconvolution(), "the record");
		assertEquals(entered, Recipe.parse(options).options(), "the command-line reader of the line");
		assertEquals(entered, Recipe.fromProvenance(record).options(), "the command-line reader of the record");
		final DeconvolveRequest r = DeconvolveRequest.from(record.options());
		assertEquals(List.of(false, false, true), List.of(r.plot(), r.watch(), r.recentre()));
	}

	/**
	 * Blind Deconvolve set up in its real dialog: the Recorder's line holds table keys in table order, the record
	 * holds the line's options, and the values entered are the ones recorded.
	 */
	@Test
	void blindDeconvolvesRecordedLineHoldsTheTablesKeysInDialogOrder() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus img = DeconvolveCommandTest.recorded("cell.tif");
		ImageJHarness.open(img);
		ij.Prefs.set("parfocal.blind.estimate", "free-form");
		ij.Prefs.set("parfocal.blind.start", "gaussian");
		final ImageJHarness.Recording rec = ImageJHarness.record(img, "Blind Deconvolve...", dialog -> {
			final List<Choice> ch = dialog.getChoices().stream().map(Choice.class::cast).toList();
			pick(ch.get(0), "cell.tif");
			pick(ch.get(1), ChoiceWords.word("psf", "gaussian"));
			pick(ch.get(2), ChoiceWords.word("support_units", "voxels"));
			pick(ch.get(3), ChoiceWords.word("edges", "periodic"));
			pick(ch.get(4), ChoiceWords.word("estimate", "free-form"));
			final List<TextField> num = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			// fwhm_xy fwhm_z iterations object_updates psf_updates object_tv psf_tv support_xy support_z snapshot_interval trust_radius
			final String[] values = { "0.3", "0.8", "3", "1", "1", "0.002", "0.001", "9", "5", "3", "0.05" };
			for (int i = 0; i < values.length; i++) num.get(i).setText(values[i]);
			final List<Checkbox> box = dialog.getCheckboxes().stream().map(Checkbox.class::cast).toList();
			box.get(0).setState(false); // band_limit: no second dialog
			box.get(1).setState(true); // symmetric
			box.get(2).setState(true); // centring
			box.get(3).setState(false); // watch
			final List<TextField> str = dialog.getStringFields().stream().map(TextField.class::cast).toList();
			str.get(0).setText("100");
			str.get(1).setText("auto");
		});
		final String options = ImageJHarness.parseRunLine(rec.line())[1];
		final Map<String, String> given = MacroOptions.parse(options);
		final List<String> inTableOrder = new ArrayList<>(BlindKeys.MAIN.names());
		inTableOrder.retainAll(given.keySet());
		assertEquals(inTableOrder, List.copyOf(given.keySet()), "recorded keys: table keys in dialog order (" + rec.line() + ")");
		final List<String> expected = new ArrayList<>(BlindKeys.MAIN.names());
		expected.removeAll(List.of("band_limit", "watch")); // unticked boxes are not recorded
		assertEquals(expected, List.copyOf(given.keySet()), rec.line());
		final ImagePlus out = rec.result().created().stream().filter(i -> i.getTitle().equals("cell-blind.tif")).findFirst().orElseThrow();
		final Provenance record = ImageProvenance.of(out).orElseThrow();
		assertEquals(given, record.options(), "the record holds the recorded options");
		assertEquals(Map.of("fwhm_xy", "0.3", "iterations", "3", "psf_tv", "0.001", "snapshot_interval", "3", "edges", "periodic", "offset", "100"),
				Map.of("fwhm_xy", given.get("fwhm_xy"), "iterations", given.get("iterations"), "psf_tv", given.get("psf_tv"), "snapshot_interval",
						given.get("snapshot_interval"), "edges", given.get("edges"), "offset", given.get("offset")), "the values entered");
	}

	private static void pick(final Choice c, final String item) {
		c.select(item);
		assertEquals(item, c.getSelectedItem());
		for (final ItemListener l : c.getItemListeners()) l.itemStateChanged(new ItemEvent(c, ItemEvent.ITEM_STATE_CHANGED, item, ItemEvent.SELECTED));
	}
}
