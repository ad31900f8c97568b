package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import ij.Prefs;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.parfocal.fft.FftBackend;
import org.parfocal.provenance.Provenance;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/** The options command selects the FFT library for later runs, and a run's provenance names it. */
class ParfocalOptionsCommandTest {

	private String property, pref;

	@BeforeEach
	void remember() {
		property = System.getProperty(FftBackend.PROPERTY);
		pref = Prefs.get(ParfocalOptions.PREF_FFT, null);
	}

	@AfterEach
	void restore() {
		if (property == null) System.clearProperty(FftBackend.PROPERTY);
		else System.setProperty(FftBackend.PROPERTY, property);
		Prefs.set(ParfocalOptions.PREF_FFT, pref);
	}

	@Test
	void fftLibraryKeySelectsTheBackendAndTheProvenanceNamesIt() {
		ImageJHarness.run(null, "Parfocal Options...", "fft_library=java");
		assertEquals("java", System.getProperty(FftBackend.PROPERTY));
		assertEquals("java", Prefs.get(ParfocalOptions.PREF_FFT, null));
		assertEquals(FftBackend.JAVA, FftBackend.selected());
		final Provenance p = Provenance.of("Deconvolve", "iterations=1").versions("0", "1.54p", "17").build();
		assertEquals(FftBackend.JAVA.description(), p.fft());
		assertTrue(p.toInfoText().contains("FFT JTransforms"), p.toInfoText());
		assertEquals(p.fft(), Provenance.fromJson(p.toJson()).fft());
		if (FftBackend.FFTW.available()) {
			ImageJHarness.run(null, "Parfocal Options...", "fft_library=fftw");
			assertEquals(FftBackend.FFTW, FftBackend.selected());
			assertTrue(Provenance.of("Deconvolve", "").versions("0", "1", "17").build().fft().startsWith("FFTW 3.3.10"));
		}
	}

	@Test
	void unknownLibraryIsRefusedInOneLine() {
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(null, "Parfocal Options...", "fft_library=cuda"));
		assertTrue(e.getMessage().contains("not a valid FFT library"), e.getMessage());
	}
}
