package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import org.junit.jupiter.api.Test;

/** Macro values of {@code edges=} are public API: the released value keeps working beside the new name. */
class EdgeModeKeyTest {

	@Test
	void theReleasedValueNonCirculantStillParsesToTheDefaultMode() {
		assertEquals(EdgeMode.NON_CIRCULANT, EdgeMode.parse("non-circulant"));
		assertEquals(EdgeMode.NON_CIRCULANT, EdgeMode.parse("extended"));
		assertArrayEquals(new String[] { "extended", "periodic", "zero" }, EdgeMode.keys());
		assertThrows(IllegalArgumentException.class, () -> EdgeMode.parse("circulant"));
	}
}
