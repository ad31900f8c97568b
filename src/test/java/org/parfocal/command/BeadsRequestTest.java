package org.parfocal.command;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.LinkedHashMap;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.parfocal.beads.Averaging;
import org.parfocal.beads.BackgroundMode;
import org.parfocal.provenance.MacroOptions;

/**
 * {@link BeadsRequest} reads every key of {@link BeadsKeys} (changing any one changes the request; the optics keys
 * with a model, in a modality that uses them), its record line reads back to the same request, and a bad value is
 * one line naming its key. The project's own consistency.
 */
class BeadsRequestTest {

	private static final String BASE = "image=beads.tif box_xy=1.5 box_z=2.4 bead_diameter=0.1 threshold=6 outlier_z=3.5 background=stack "
			+ "averaging=mean voxel_xy=0 voxel_z=0 optics=born-wolf modality=confocal na=1.2 immersion_index=1.333 sample_index=1.333 depth=0 "
			+ "emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=0";

	/** For every key, a value other than the base line's. */
	private static final Map<String, String> OTHER = Map.ofEntries(Map.entry("image", "other.tif"), Map.entry("box_xy", "2"), Map.entry("box_z", "3"),
			Map.entry("bead_diameter", "0.2"), Map.entry("threshold", "5"), Map.entry("reject_saturated", "true"), Map.entry("outlier_z", "0"),
			Map.entry("background", "border"), Map.entry("averaging", "median"), Map.entry("symmetrize", "true"), Map.entry("voxel_xy", "0.05"),
			Map.entry("voxel_z", "0.15"), Map.entry("optics", "gaussian"), Map.entry("modality", "widefield"), Map.entry("na", "1.25"),
			Map.entry("immersion_index", "1.518"), Map.entry("sample_index", "1.4"), Map.entry("depth", "5"), Map.entry("emission", "0.6"),
			Map.entry("excitation", "0.56"), Map.entry("pinhole", "0.8"), Map.entry("sheet_thickness", "1.5"));

	private static BeadsRequest read(final String options) {
		return BeadsRequest.from(MacroOptions.parse(options));
	}

	@Test
	void everyKeyIsRead() {
		final BeadsRequest base = read(BASE);
		assertEquals(BeadsKeys.MAIN.names().size(), OTHER.size(), "a changed value for every key");
		for (final String key : BeadsKeys.MAIN.names()) {
			final Map<String, String> changed = new LinkedHashMap<>(MacroOptions.parse(BASE));
			changed.put(key, OTHER.get(key));
			assertNotEquals(base, BeadsRequest.from(changed), key + "= is read");
		}
		assertEquals(BackgroundMode.STACK, base.background());
		assertEquals(Averaging.MEAN, base.averaging());
		final BeadsRequest none = read("image=beads.tif");
		assertNull(none.optics(), "optics=none by default: no optics");
		assertEquals(BeadsKeys.MAIN.key("threshold").defaultNumber(), none.threshold(), 0);
	}

	@Test
	void theRecordLineReadsBackToTheSameRequest() {
		for (final String options : new String[] { BASE, BASE.replace("confocal", "widefield") + " reject_saturated symmetrize",
				BASE.replace("confocal", "light-sheet").replace("sheet_thickness=0", "sheet_thickness=2"), "image=[my beads.tif] box_xy=1 box_z=0" }) {
			final BeadsRequest r = read(options);
			assertEquals(r, read(r.macroOptions()), options);
		}
	}

	@Test
	void aBadValueIsOneLineNamingItsKey() {
		for (final String[] bad : new String[][] { { "box_xy", "wide" }, { "threshold", "high" }, { "background", "ring" }, { "averaging", "trimmed" },
				{ "optics", "airy-ish" }, { "modality", "sted" }, { "na", "x" }, { "box_z", "-1" }, { "voxel_xy", "-0.1" } }) {
			final Map<String, String> o = new LinkedHashMap<>(MacroOptions.parse(BASE));
			o.put(bad[0], bad[1]);
			final String m = assertThrows(IllegalArgumentException.class, () -> BeadsRequest.from(o)).getMessage();
			assertTrue(m.contains(bad[0] + "=") && !m.contains("\n"), m);
		}
	}
}
