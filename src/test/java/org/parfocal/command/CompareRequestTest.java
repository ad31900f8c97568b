package org.parfocal.command;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.LinkedHashMap;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.parfocal.provenance.MacroOptions;

/**
 * {@link CompareRequest} reads every key of {@link CompareKeys} (changing any one changes the request), the old
 * names {@code references} and {@code open_references} too, its record line reads back to the same request, and a
 * bad value is one line naming its key. The project's own consistency.
 */
class CompareRequestTest {

	private static final String BASE = "result=result.tif reference_folder=/refs reference_images=sharp-* input=recording.tif psf=psf.tif offset=100 "
			+ "background=5 photons=1 read_noise=0 patch_size=7 patches=2048 bootstrap=10 seed=3";

	/** For every key, a value other than the base line's. */
	private static final Map<String, String> OTHER = Map.ofEntries(Map.entry("result", "other.tif"), Map.entry("reference_folder", "/other"),
			Map.entry("reference_images", "ref-?"), Map.entry("input", "none"), Map.entry("psf", "none"), Map.entry("offset", "auto"),
			Map.entry("background", "dark"), Map.entry("photons", "2"), Map.entry("read_noise", "1.5"), Map.entry("patch_size", "5"),
			Map.entry("patches", "1024"), Map.entry("bootstrap", "0"), Map.entry("seed", "4"), Map.entry("ignore_calibration", "true"),
			Map.entry("estimate_noise", "true"), Map.entry("match_resolution", "true"));

	private static CompareRequest read(final String options) {
		return CompareRequest.from(MacroOptions.parse(options));
	}

	@Test
	void everyKeyAndTheOldNamesAreRead() {
		final CompareRequest base = read(BASE);
		assertEquals(CompareKeys.MAIN.names().size(), OTHER.size(), "a changed value for every key");
		for (final String key : CompareKeys.MAIN.names()) {
			final Map<String, String> changed = new LinkedHashMap<>(MacroOptions.parse(BASE));
			changed.put(key, OTHER.get(key));
			assertNotEquals(base, CompareRequest.from(changed), key + "= is read");
		}
		assertEquals(base, read(BASE.replace("reference_folder=", "references=").replace("reference_images=", "open_references=")), "old names");
		assertEquals(CompareRequest.NONE, read("result=r.tif reference_images=s*").input(), "the table's default");
	}

	@Test
	void theRecordLineReadsBackToTheSameRequest() {
		for (final String options : new String[] { BASE, BASE + " ignore_calibration estimate_noise match_resolution",
				"result=[my result.tif] reference_folder=[/a b] offset=auto background=dark seed=-9" }) {
			final CompareRequest r = read(options);
			assertEquals(r, read(r.macroOptions()), options);
		}
	}

	@Test
	void aBadValueIsOneLineNamingItsKey() {
		for (final String[] bad : new String[][] { { "photons", "0" }, { "photons", "many" }, { "read_noise", "-1" }, { "patch_size", "7.5" },
				{ "patches", "lots" }, { "bootstrap", "2.5" }, { "seed", "1.5" }, { "offset", "dim" }, { "background", "fit" } }) {
			final Map<String, String> o = new LinkedHashMap<>(MacroOptions.parse(BASE));
			o.put(bad[0], bad[1]);
			final String m = assertThrows(IllegalArgumentException.class, () -> CompareRequest.from(o)).getMessage();
			assertTrue(m.contains(bad[0] + "=") && !m.contains("\n"), m);
		}
		final String m = assertThrows(IllegalArgumentException.class, () -> read("result=r.tif")).getMessage();
		assertTrue(m.contains("reference_folder=") && m.contains("reference_images="), m);
	}
}
