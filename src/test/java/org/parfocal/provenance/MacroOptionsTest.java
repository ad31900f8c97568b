package org.parfocal.provenance;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.LinkedHashMap;
import java.util.Map;

import ij.Macro;

import org.junit.jupiter.api.Test;

class MacroOptionsTest {

	/** ImageJ 1.x's own reader of options strings, {@code ij.Macro.getValue}, is the reference. */
	@Test
	void parseAgreesWithImageJ() {
		final String options = "image=cell.tif psf=[bead psf 3.tif] boundary=mirror normalize background=2.5 photons=0 seed=42";
		final LinkedHashMap<String, String> map = MacroOptions.parse(options);
		assertEquals(7, map.size());
		for (final Map.Entry<String, String> e : map.entrySet()) {
			if ("true".equals(e.getValue())) assertEquals(e.getKey(), Macro.getValue(options + " ", e.getKey(), "absent") == null ? "" : e.getKey());
			else assertEquals(Macro.getValue(options, e.getKey(), null), e.getValue(), e.getKey());
		}
		assertEquals("true", map.get("normalize"));
		assertEquals("bead psf 3.tif", map.get("psf"));
	}

	@Test
	void formatRoundTrips() {
		final String options = "image=cell.tif psf=[bead psf.tif] boundary=mirror normalize background=2.5";
		assertEquals(options, MacroOptions.format(MacroOptions.parse(options)));
		assertEquals("1", MacroOptions.number(1.0));
		assertEquals("0.25", MacroOptions.number(0.25));
	}
}
