package org.parfocal.command;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;

import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.testing.TestVolumes;

/**
 * {@link ConvolveRequest} reads every key of {@link ConvolveKeys} (changing any one changes the request, and the
 * noise keys change the pixels), its record line reads back to the same request, and a bad value is one line
 * naming its key. The project's own consistency.
 */
class ConvolveRequestTest {

	private static final String BASE = "image=cell.tif psf=psf.tif boundary=mirror background=1 photons=10 seed=3 offset=0";

	/** For every key of the table, a value other than the base line's. */
	private static final Map<String, String> OTHER = Map.of("image", "other.tif", "psf", "other-psf.tif", "boundary", "periodic", "normalize", "",
			"background", "4", "photons", "2.5", "seed", "4", "offset", "100", "recentre", "");

	private static ConvolveRequest read(final String options) {
		return ConvolveRequest.from(MacroOptions.parse(options));
	}

	@Test
	void everyKeyIsRead() {
		final ConvolveRequest base = read(BASE);
		assertEquals(ConvolveKeys.MAIN.names().size(), OTHER.size(), "a changed value for every key");
		for (final String key : ConvolveKeys.MAIN.names()) {
			final Map<String, String> changed = new LinkedHashMap<>(MacroOptions.parse(BASE));
			changed.put(key, OTHER.get(key));
			assertNotEquals(base, ConvolveRequest.from(changed), key + "= is read");
		}
		assertEquals(new ConvolveRequest("cell.tif", "psf.tif", new Acquisition.Options(Boundary.MIRROR, false, 1, 10, 3, 0)), base);
		assertEquals(Boundary.MIRROR, read("image=a psf=b").acquisition().boundary(), "the table's default");
	}

	@Test
	void theRecordLineReadsBackToTheSameRequest() {
		for (final String options : new String[] { BASE, BASE + " normalize recentre", "image=[my cell.tif] psf=psf.tif boundary=zero background=0.125 "
				+ "photons=0 seed=-2 offset=-7.5" }) {
			final ConvolveRequest r = read(options);
			assertEquals(r, read(r.macroOptions()), options);
		}
		assertEquals(1, read("image=a psf=b seed=1.75").acquisition().seed(), "a fractional seed is cut, as the dialog always did");
	}

	@Test
	void theSeedAndTheBackgroundChangeThePixels() {
		final Hyperstack object = Hyperstack.of(TestVolumes.random(4, 12, 10, 6));
		final Volume psf = TestVolumes.gaussianPsf(5, 5, 3, 1, 1, 0.8);
		for (int i = 0; i < psf.data().length; i++) psf.data()[i] *= 3; // sums to 3, so that normalize matters
		final float[] base = ConvolveRunner.run(read(BASE), object, psf, Monitor.NONE).image().first().data();
		assertTrue(Arrays.equals(base, ConvolveRunner.run(read(BASE), object, psf, Monitor.NONE).image().first().data()), "seeded: repeatable");
		for (final String key : new String[] { "seed", "background", "photons", "offset", "boundary", "normalize" }) {
			final Map<String, String> changed = new LinkedHashMap<>(MacroOptions.parse(BASE));
			changed.put(key, OTHER.get(key));
			assertFalse(Arrays.equals(base, ConvolveRunner.run(ConvolveRequest.from(changed), object, psf, Monitor.NONE).image().first().data()), key);
		}
	}

	@Test
	void aBadValueIsOneLineNamingItsKey() {
		for (final String key : new String[] { "background", "photons", "seed", "offset" }) {
			final Map<String, String> bad = new LinkedHashMap<>(MacroOptions.parse(BASE));
			bad.put(key, "lots");
			final String m = assertThrows(IllegalArgumentException.class, () -> ConvolveRequest.from(bad)).getMessage();
			assertTrue(m.contains("(" + key + "=)") && !m.contains("\n"), m);
		}
		for (final String[] bad : new String[][] { { "boundary", "reflect" }, { "background", "-1" }, { "photons", "-3" }, { "offset", "Infinity" },
				{ "seed", "NaN" } }) {
			final String m = assertThrows(IllegalArgumentException.class, () -> read(BASE + " " + bad[0] + "=" + bad[1])).getMessage();
			assertTrue(m.contains("(" + bad[0] + "=)") && !m.contains("\n"), m);
		}
	}
}
