package org.parfocal.command;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.parfocal.blocks.Recipe;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.provenance.MacroOptions;

/**
 * The one description of Deconvolve's keys ({@link DeconvolveKeys}) against its readers: the registry of macro
 * keys is made from it, the defaults a line without keys gets are the table's, and every range the table states
 * is the one the run enforces. These are checks of the project's own consistency (no outside reference applies).
 */
public class KeyTableTest {

	/** Every command's tables, in the order its dialogs read them (a key shared by two tables counts once, at its first). */
	public static final Map<CommandKeys.Command, List<KeyTable>> BY_COMMAND = new java.util.LinkedHashMap<>();
	static {
		BY_COMMAND.put(CommandKeys.DECONVOLVE, List.of(DeconvolveKeys.MAIN, DeconvolveKeys.OPTICS, DeconvolveKeys.WATCH));
		BY_COMMAND.put(CommandKeys.BLIND_DECONVOLVE, List.of(BlindKeys.MAIN, DeconvolveKeys.OPTICS, BlindKeys.BAND, DeconvolveKeys.WATCH));
		BY_COMMAND.put(CommandKeys.COMPARE, List.of(CompareKeys.MAIN));
		BY_COMMAND.put(CommandKeys.PSF_FROM_BEADS, List.of(BeadsKeys.MAIN));
		BY_COMMAND.put(CommandKeys.CONVOLVE, List.of(ConvolveKeys.MAIN));
		BY_COMMAND.put(CommandKeys.PSF_FROM_OPTICS, List.of(DeconvolveKeys.OPTICS, OtherKeys.PROFILES));
		BY_COMMAND.put(CommandKeys.EXPORT_MACRO, List.of(OtherKeys.EXPORT));
		BY_COMMAND.put(CommandKeys.WRITE_REPORT, List.of(OtherKeys.REPORT));
		BY_COMMAND.put(CommandKeys.PARFOCAL_OPTIONS, List.of(OtherKeys.OPTIONS));
	}

	/** Every table once. */
	public static final List<KeyTable> TABLES = BY_COMMAND.values().stream().flatMap(List::stream).distinct().toList();

	@Test
	void keysAreUniqueLowerCaseAndDescribed() {
		for (final KeyTable t : TABLES) {
			assertEquals(t.names().size(), t.names().stream().distinct().count(), t.title());
			for (final Key k : t.keys()) {
				assertTrue(k.name().matches("[a-z][a-z0-9]*(_[a-z0-9]+)*"), k.name());
				assertFalse(k.help().isBlank(), k.name() + " has no help line");
				assertTrue(k.label().toLowerCase(java.util.Locale.ROOT).startsWith(k.name()), k.name() + ": label '" + k.label() + "' must start with the key");
				if (k.kind() == CommandKeys.Kind.NUMBER) assertTrue(k.inRange(k.defaultNumber()), k.name() + " default outside its range");
			}
		}
		assertEquals(12, TABLES.size(), "tables: " + TABLES.size());
		assertThrows(IllegalArgumentException.class, () -> KeyTable.of("t").flag("a", "A", false, "x").flag("a", "A", false, "y").build());
		assertThrows(IllegalArgumentException.class, () -> KeyTable.of("t").flag("Read_noise", "Read_noise", false, "x"));
	}

	/** The registry every front end checks keys against is the table, in dialog order, with its old names. */
	@Test
	void theRegistryOfMacroKeysIsMadeFromTheTables() {
		final List<String> expected = new ArrayList<>(DeconvolveKeys.MAIN.names());
		expected.addAll(DeconvolveKeys.OPTICS.names());
		expected.addAll(DeconvolveKeys.WATCH.names());
		assertEquals(expected, CommandKeys.keysOf(CommandKeys.DECONVOLVE));
		for (final String k : expected)
			assertEquals(tableOf(k).key(k).kind(), CommandKeys.DECONVOLVE.kind(k).orElseThrow(), k);
		assertEquals(Map.of("references", "reference_folder", "open_references", "reference_images"), CommandKeys.DECONVOLVE.oldNames());
		assertEquals(DeconvolveKeys.OPTICS.names(), CommandKeys.keysOf(CommandKeys.PSF_FROM_OPTICS).subList(0, DeconvolveKeys.OPTICS.names().size()));
	}

	/** Every converted command's registry entry is its tables, in dialog order, with their kinds and old names. */
	@Test
	void everyCommandsRegistryEntryIsMadeFromItsTables() {
		for (final Map.Entry<CommandKeys.Command, List<KeyTable>> e : BY_COMMAND.entrySet()) {
			final CommandKeys.Command c = e.getKey();
			final java.util.LinkedHashMap<String, Key> expected = new java.util.LinkedHashMap<>();
			final Map<String, String> old = new HashMap<>();
			for (final KeyTable t : e.getValue()) {
				for (final Key k : t.keys()) {
					final Key before = expected.putIfAbsent(k.name(), k);
					if (before != null) assertEquals(before.kind(), k.kind(), c.label() + ": " + k.name() + " has one kind in every table");
				}
				old.putAll(t.oldNames());
			}
			assertEquals(List.copyOf(expected.keySet()), CommandKeys.keysOf(c), c.label());
			for (final Key k : expected.values()) assertEquals(k.kind(), c.kind(k.name()).orElseThrow(), c.label() + ": " + k.name());
			assertEquals(old, c.oldNames(), c.label());
			for (final String r : c.required()) assertTrue(expected.containsKey(r), c.label() + ": required " + r);
		}
		final java.util.Set<String> uncovered = new java.util.TreeSet<>();
		for (final CommandKeys.Command c : CommandKeys.all()) if (!BY_COMMAND.containsKey(c)) uncovered.add(c.label());
		assertEquals(UNCOVERED, uncovered, "commands whose keys are not described by a table yet");
	}

	/** Commands still defined by literal specifications in {@link CommandKeys}. */
	private static final java.util.Set<String> UNCOVERED = java.util.Set.of();

	/** A line with only a PSF file gets the table's defaults, through the command-line reader too. */
	@Test
	void aLineWithoutKeysGetsTheTablesDefaults() {
		final DeconvolveRequest r = DeconvolveRequest.from(Map.of());
		final DeconvolutionOptions d = r.deconvolution();
		final KeyTable t = DeconvolveKeys.MAIN;
		assertEquals(t.key("method").defaultValue(), d.method().key());
		assertEquals(t.key("iterations").defaultNumber(), d.iterations());
		assertEquals(t.key("regularization").defaultNumber(), d.regularization());
		assertEquals(t.key("stop").defaultValue(), d.stopping().key());
		assertEquals(t.key("threshold").defaultNumber(), d.changeThreshold());
		assertEquals(EdgeMode.parse(t.key("edges").defaultValue()), d.edges());
		assertEquals(t.key("offset").defaultValue(), d.offset().macroValue());
		assertEquals(t.key("background").defaultValue(), d.background().macroValue());
		assertFalse(r.plot() || r.watch() || r.recentre());
		assertEquals("32-bit", r.output());
		final Recipe recipe = Recipe.parse("psf=/data/psf.tif");
		assertEquals(d, recipe.options(), "the command-line recipe reads the same way");
		assertFalse(recipe.sixteenBit());
		// the default run's rule: a line that gives its iterations without a stop runs them all
		assertEquals(Stopping.FIXED, DeconvolveRequest.from(Map.of("iterations", "12")).deconvolution().stopping());
	}

	/** Given values are read as given; the optics only with psf=from_optics, with the optics table's defaults. */
	@Test
	void givenValuesAndTheOptics() {
		final Map<String, String> o = MacroOptions.parse("image=a.tif psf=from_optics method=richardson-lucy-tv iterations=7 regularization=0.004 "
				+ "stop=relative-change threshold=0.01 edges=periodic offset=100 background=fit plot recentre output=16-bit na=1.2 voxel_xy=0.1 voxel_z=0.3");
		final DeconvolveRequest r = DeconvolveRequest.from(o);
		assertEquals(new DeconvolutionOptions(DeconvolutionMethod.RL_TV, 7, 0.004, Stopping.RELATIVE_CHANGE, 0.01, EdgeMode.PERIODIC, Level.of(100),
				Level.FIT), r.deconvolution());
		assertTrue(r.plot() && r.recentre() && !r.watch());
		assertEquals(1.2, r.optics().optics().na());
		assertEquals(DeconvolveKeys.OPTICS.key("sample_index").defaultNumber(), r.optics().optics().sampleIndex());
		assertEquals(DeconvolveKeys.OPTICS.key("model").defaultValue(), r.optics().model());
		assertEquals(r.optics(), Recipe.parse(MacroOptions.format(o)).optics());
		assertEquals(null, DeconvolveRequest.from(Map.of("psf", "p.tif", "na", "1.2")).optics());
	}

	/** Every bound the table states (and Help prints) is the one the run enforces: just past it is refused in one line. */
	@Test
	void theTablesRangesAreTheOnesTheRunEnforces() {
		int checked = 0;
		for (final Key k : DeconvolveKeys.MAIN.keys()) {
			if (k.kind() != CommandKeys.Kind.NUMBER) continue;
			for (final double bound : new double[] { k.min(), k.max() }) {
				if (Double.isNaN(bound)) continue;
				final double step = k.name().equals("iterations") ? 1 : 1e-3 * Math.max(1, Math.abs(bound));
				final double past = bound == k.min() ? bound - step : bound + step;
				DeconvolveRequest.from(with(k.name(), bound)); // the bound itself is accepted (inclusive)
				final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> DeconvolveRequest.from(with(k.name(), past)),
						k.name() + "=" + past);
				assertFalse(e.getMessage().contains("\n"), e.getMessage());
				checked++;
			}
		}
		assertTrue(checked >= 3, "bounds checked: " + checked);
	}

	private static Map<String, String> with(final String key, final double v) {
		final Map<String, String> o = new HashMap<>(Map.of("method", "richardson-lucy-tv", "stop", "relative-change"));
		o.put(key, MacroOptions.number(v));
		return o;
	}

	private static KeyTable tableOf(final String key) {
		for (final KeyTable t : TABLES)
			if (t.find(key).isPresent()) return t;
		throw new AssertionError(key);
	}
}
