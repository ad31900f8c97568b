package org.parfocal.command;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.parfocal.provenance.MacroOptions;

/**
 * {@link BlindRequest} reads every key of {@link BlindKeys#MAIN}, of the band-limit optics ({@link BlindKeys#BAND})
 * with a start that is not from the optics, of the optics ({@link DeconvolveKeys#OPTICS}) with
 * {@code psf=from_optics} and of the watch ({@link DeconvolveKeys#WATCH}) with {@code watch}: changing any one
 * changes the request. Its recorded line reads back to the same request, and a bad value is one line naming its
 * key. The project's own consistency.
 */
class BlindRequestTest {

	static final String BASE = "image=cell.tif psf=gaussian fwhm_xy=0.3 fwhm_z=0.8 iterations=4 object_updates=1 psf_updates=1 object_tv=0.002 "
			+ "psf_tv=0.001 band_limit centring support_xy=9 support_z=5 support_units=voxels snapshot_interval=2 edges=extended offset=100 "
			+ "background=auto estimate=free-form trust_radius=0.2 na=1.2 immersion_index=1.333 emission=0.52";
	static final String OPTICS = "model=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 coverslip_index=1.522 "
			+ "coverslip_thickness=170 depth=0 immersion_index_design=1.333 coverslip_index_design=1.522 coverslip_thickness_design=170 "
			+ "working_distance=150 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=15 size_z=0";
	static final String FROM_OPTICS = BASE.replace("psf=gaussian", "psf=from_optics").replace(" na=1.2 immersion_index=1.333 emission=0.52", "") + " " + OPTICS;
	static final String WATCH = BASE + " watch every=3 reference_folder=[/refs a] reference_images=sharp-* photons=0.5 read_noise=2";

	/** For every main key, a value other than the base line's. */
	private static final Map<String, String> OTHER = Map.ofEntries(Map.entry("image", "other.tif"), Map.entry("psf", "psf.tif"), Map.entry("fwhm_xy", "0.25"),
			Map.entry("fwhm_z", "0.7"), Map.entry("iterations", "5"), Map.entry("object_updates", "2"), Map.entry("psf_updates", "0"),
			Map.entry("object_tv", "0.01"), Map.entry("psf_tv", "0"), Map.entry("band_limit", "false"), Map.entry("symmetric", "true"),
			Map.entry("centring", "false"), Map.entry("support_xy", "11"), Map.entry("support_z", "7"), Map.entry("support_units", "microns"),
			Map.entry("snapshot_interval", "1"), Map.entry("edges", "periodic"), Map.entry("offset", "auto"), Map.entry("background", "dark"),
			Map.entry("estimate", "model-fit"), Map.entry("trust_radius", "0.3"), Map.entry("watch", "true"));

	/**
	 * A line without {@code background} assumes the darkest region (the default since 2026-12-04, chosen on the
	 * independent scenes by {@code bin/parfocal-bench blind-background}: the median took the haze of the nuclei
	 * scenes for background); a recorded {@code background=auto} keeps its old meaning.
	 */
	@Test
	void backgroundDefaultsToTheDarkestRegionAndAutoKeepsItsMeaning() {
		assertEquals(org.parfocal.deconv.Level.DARK, read(BASE.replace(" background=auto", "")).background());
		assertEquals(org.parfocal.deconv.Level.ESTIMATED, read(BASE).background());
	}

	private static BlindRequest read(final String options) {
		return BlindRequest.from(MacroOptions.parse(options));
	}

	private static void everyKeyChanges(final String base, final KeyTable table, final java.util.function.Function<String, String> other) {
		final BlindRequest r = read(base);
		for (final String key : table.names()) {
			final Map<String, String> changed = new LinkedHashMap<>(MacroOptions.parse(base));
			changed.put(key, other.apply(key));
			assertNotEquals(r, BlindRequest.from(changed), table.title() + ": " + key + "= is read (" + changed.get(key) + ")");
		}
	}

	@Test
	void everyKeyIsRead() {
		assertEquals(BlindKeys.MAIN.names().size(), OTHER.size(), "a changed value for every key");
		everyKeyChanges(BASE, BlindKeys.MAIN, OTHER::get);
		everyKeyChanges(BASE, BlindKeys.BAND, k -> Map.of("na", "1.1", "immersion_index", "1.515", "emission", "0.6").get(k));
		final Map<String, String> optics = MacroOptions.parse(OPTICS);
		everyKeyChanges(FROM_OPTICS, DeconvolveKeys.OPTICS, k -> switch (k) {
		case "model" -> "gibson-lanni";
		case "modality" -> "confocal";
		case "size_xy" -> "17";
		case "size_z" -> "21";
		case "depth" -> "1";
		default -> MacroOptions.number(Double.parseDouble(optics.get(k)) * 0.99);
		});
		everyKeyChanges(WATCH, DeconvolveKeys.WATCH, k -> Map.of("every", "4", "reference_folder", "/other", "reference_images", "ref-?", "photons", "2",
				"read_noise", "1", "stop_at_suggestion", "true", "ignore_calibration", "true", "estimate_noise", "true", "match_resolution", "true").get(k));
		assertNull(read(BASE.replace("band_limit ", "")).band(), "no band-limit optics without band_limit");
		assertNull(read(FROM_OPTICS).band(), "the optics' own with from_optics");
		assertNull(read(BASE).watch(), "no watch without the flag");
		assertEquals(read(BASE), read(BASE.replace("edges=extended", "edges=non-circulant")), "the edge mode's old value");
	}

	@Test
	void theRecordedLineReadsBackToTheSameRequest() {
		for (final String options : List.of(BASE, FROM_OPTICS, WATCH + " stop_at_suggestion estimate_noise",
				BASE.replace("psf=gaussian", "psf=[my psf.tif]").replace("offset=100", "offset=0").replace("background=auto", "background=dark")
						.replace("band_limit centring", "symmetric").replace(" na=1.2 immersion_index=1.333 emission=0.52", "")
						.replace("estimate=free-form", "estimate=free-form").replace("support_units=voxels", "support_units=microns"),
				BASE.replace("estimate=free-form trust_radius=0.2", "estimate=widefield-fit-refined trust_radius=0.05"))) {
			final BlindRequest r = read(options);
			assertEquals(r, read(r.macroOptions()), options);
			assertEquals(r.macroOptions(), read(r.macroOptions()).macroOptions());
		}
		assertEquals(BASE, read(BASE).macroOptions(), "the line of a run in dialog order, as the Recorder writes it");
	}

	@Test
	void aBadValueIsOneLineNamingItsKey() {
		final List<String[]> bad = new ArrayList<>(List.of(new String[][] { { "iterations", "2.5" }, { "object_updates", "many" }, { "psf_updates", "0.5" },
				{ "fwhm_xy", "wide" }, { "support_xy", "-1" }, { "support_z", "deep" }, { "support_units", "inches" }, { "snapshot_interval", "1.5" },
				{ "edges", "wrap" }, { "offset", "dim" }, { "background", "fit" }, { "estimate", "guess" }, { "trust_radius", "2" }, { "object_tv", "x" },
				{ "na", "high" } }));
		for (final String[] b : bad) {
			final Map<String, String> o = new LinkedHashMap<>(MacroOptions.parse(BASE));
			o.put(b[0], b[1]);
			final String m = assertThrows(IllegalArgumentException.class, () -> BlindRequest.from(o), b[0]).getMessage();
			assertTrue(m.contains(b[0] + "=") && !m.contains("\n"), b[0] + "=" + b[1] + ": " + m);
		}
		for (final String[] b : new String[][] { { "every", "0" }, { "photons", "0" }, { "read_noise", "-1" } }) {
			final Map<String, String> o = new LinkedHashMap<>(MacroOptions.parse(WATCH));
			o.put(b[0], b[1]);
			final String m = assertThrows(IllegalArgumentException.class, () -> BlindRequest.from(o), b[0]).getMessage();
			assertTrue(m.contains(b[0] + "=") && !m.contains("\n"), m);
		}
		for (final String[] b : new String[][] { { "voxel_z", "thin" }, { "size_xy", "2.5" } }) {
			final Map<String, String> o = new LinkedHashMap<>(MacroOptions.parse(FROM_OPTICS));
			o.put(b[0], b[1]);
			final String m = assertThrows(IllegalArgumentException.class, () -> BlindRequest.from(o), b[0]).getMessage();
			assertTrue(m.contains(b[0] + "=") && !m.contains("\n"), m);
		}
		final String m = assertThrows(IllegalArgumentException.class, () -> read(BASE.replace("psf=gaussian", "psf=psf.tif").replace("free-form", "model-fit")))
				.getMessage();
		assertTrue(m.contains("estimate=free-form") && !m.contains("\n"), m);
	}
}
