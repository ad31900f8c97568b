package org.parfocal.psf;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.function.Executable;
import org.parfocal.core.VoxelSize;
import org.scijava.plugin.PluginIndex;
import org.scijava.plugin.PluginInfo;

/** Options, grids, registry, FWHM and Nyquist helpers. */
class InputsTest {

	static void rejects(final Executable e, final String... words) {
		final IllegalArgumentException x = assertThrows(IllegalArgumentException.class, e);
		final String m = x.getMessage();
		assertFalse(m.contains("\n"), "one line: " + m);
		for (final String w : words) assertTrue(m.contains(w), "'" + m + "' should mention '" + w + "'");
	}

	static Optics.Builder ok() {
		return Optics.builder().na(1.4).immersionIndex(1.518).emissionWavelength(0.52);
	}

	@Test
	void badOpticsAreRejectedWithOneLine() {
		rejects(() -> ok().na(1.6).build(), "NA 1.6", "immersion index 1.518");
		rejects(() -> ok().na(1.518).build(), "below the immersion index");
		rejects(() -> ok().na(0).build(), "NA must be positive");
		rejects(() -> ok().emissionWavelength(-0.5).build(), "emission wavelength must be positive", "-0.5");
		rejects(() -> ok().emissionWavelength(0).build(), "positive");
		rejects(() -> ok().emissionWavelength(520).build(), "520", "in µm");
		rejects(() -> Optics.builder().na(1.4).build(), "emission wavelength", "missing");
		rejects(() -> ok().modality(Modality.CONFOCAL).build(), "confocal", "excitation wavelength");
		rejects(() -> ok().modality(Modality.TWO_PHOTON).excitationWavelength(0.488).build(), "laser wavelength");
		rejects(() -> ok().modality(Modality.LIGHT_SHEET).build(), "thickness");
		rejects(() -> ok().modality(Modality.CONFOCAL).excitationWavelength(0.488).pinholeAiryUnits(-1).build(), "Pinhole");
		rejects(() -> ok().sampleIndex(0.5).build(), "sample index", "0.5");
		rejects(() -> ok().depth(-3).build(), "depth");
		rejects(() -> Modality.parse("spinning"), "spinning", "widefield");
		// a valid set-up passes and prints its values for provenance
		final Optics o = ok().sampleIndex(1.33).depth(12).build();
		assertTrue(o.toString().contains("NA 1.4") && o.toString().contains("depth 12 µm"), o.toString());
		assertEquals(1.518, o.immersionIndexDesign());
		assertEquals(o, o.toBuilder().build());
	}

	@Test
	void badGridsAreRejectedWithOneLine() {
		rejects(() -> new PsfGrid(64, 65, 33, 0.1, 0.1, 0.2), "odd", "64 x 65 x 33");
		rejects(() -> new PsfGrid(65, 65, 33, 0, 0.1, 0.2), "positive");
		rejects(() -> new PsfGrid(65, 65, 33, 65, 65, 200), "implausible", "µm");
		rejects(() -> new PsfGrid(4099, 65, 33, 0.1, 0.1, 0.2), "too large");
		rejects(() -> new PsfGrid(4097, 4097, 2049, 0.1, 0.1, 0.2), "too large");
		rejects(() -> PsfGrid.of(65, 65, 33, VoxelSize.UNCALIBRATED), "no voxel size", "1 pixel");
		rejects(() -> PsfGrid.of(65, 65, 33, new VoxelSize(1, 1, 1, "inch")), "inch");
		rejects(() -> new Sampling(-1, 1), "oversampling");
		rejects(() -> PsfModels.get("wavy"), "wavy", "gibson-lanni");
		assertEquals(0.065, PsfGrid.of(5, 5, 5, new VoxelSize(65, 65, 200, "nm")).dx(), 1e-12);
	}

	/**
	 * The one unit table ({@link PsfGrid#micronsPerUnit}) against the SI prefixes (BIPM, The International System
	 * of Units, 9th ed. 2019, Table 7: nano 10⁻⁹, micro 10⁻⁶, milli 10⁻³, so 10⁻³, 1 and 10³ µm). Until this table
	 * was the only one, {@code quality/Resampling} had its own, which refused "millimeters" and "millimetres".
	 */
	@Test
	void unitFactorsAreTheSiPrefixes() {
		final String[][] names = { { "nm", "NM", " nanometer ", "nanometre", "nanometers", "nanometres" },
				{ "\u00b5m", "\u03bcm", "um", "µM", "micron", "microns", "micrometer", "micrometre", "micrometers", "micrometres" },
				{ "mm", "millimeter", "millimetre", "millimeters", "millimetres", "MM" } };
		final double[] factor = { 1e-3, 1, 1e3 };
		for (int i = 0; i < names.length; i++)
			for (final String u : names[i]) {
				assertEquals(factor[i], PsfGrid.micronsPerUnit(u), 0, "'" + u + "'");
				assertEquals(0.02 * factor[i], PsfGrid.of(1, 1, 1, new VoxelSize(0.02, 0.02, 0.02, u)).dx(), 1e-15, "'" + u + "' through a calibration");
			}
		for (final String u : new String[] { "pixel", "pixels", "Pixel", "none", "", " ", null, "inch", "m", "cm", "µ", "px" })
			assertTrue(Double.isNaN(PsfGrid.micronsPerUnit(u)), "'" + u + "' is not a length Parfocal converts");
		rejects(() -> PsfGrid.micronsPer(new VoxelSize(1, 1, 1, "pixels")), "no voxel size");
		rejects(() -> PsfGrid.micronsPer(new VoxelSize(1, 1, 1, "none")), "'none'", "not a length");
	}

	@Test
	void gridFromOpticsHasOddSizesAndEnoughRings() {
		// At least 8 Airy rings: the 8th dark ring of the Airy pattern, zero of J1 at v = 26.6162 (Abramowitz &
		// Stegun table 9.5, from memory), must lie inside the half-width; axially at least ±6 zeros of the on-axis
		// intensity, spacing λ/(n(1 − cos α)) (Born & Wolf §8.8, non-paraxial form).
		final Optics o = ok().sampleIndex(1.33).depth(10).build();
		final PsfGrid g = PsfGrid.forOptics(o, 0.1, 0.1, 0.2);
		assertTrue(g.nx() % 2 == 1 && g.ny() % 2 == 1 && g.nz() % 2 == 1, g.toString());
		final double ring8 = 26.6162 / (2 * Math.PI * 1.4 / 0.52);
		assertTrue((g.nx() - 1) / 2 * 0.1 >= ring8, g + " vs ring " + ring8);
		final double zero = 0.52 / (1.518 * (1 - Math.cos(Math.asin(1.4 / 1.518))));
		assertTrue((g.nz() - 1) / 2 * 0.2 >= 6 * zero + 10 * (1.518 / 1.33 - 1), g.toString());
		// the PSF on that grid has fallen to < 1 % of the peak at the lateral edges of the focal plane
		final var v = new GibsonLanniModel().compute(o, g);
		final int[] p = Fwhm.peak(v);
		assertTrue(v.get(0, p[1], p[2]) < 0.01 * v.get(p[0], p[1], p[2]));
	}

	@Test
	void registryListsTheModelsAndSciJavaFindsThem() {
		assertArrayEquals(new String[] { "gaussian", "born-wolf", "gibson-lanni", "richards-wolf" }, PsfModels.keys());
		assertEquals(GibsonLanniModel.class, PsfModels.get("Gibson-Lanni").getClass());
		// the annotation index written at compile time: the discovery path used for third-party models
		final PluginIndex index = new PluginIndex();
		index.discover();
		final String[] found = index.getPlugins(PsfModel.class).stream().map(PluginInfo::getClassName).sorted().toArray(String[]::new);
		assertTrue(Arrays.asList(found).contains(RichardsWolfModel.class.getName()), Arrays.toString(found));
		assertEquals(4, found.length, Arrays.toString(found));
	}

	@Test
	void fwhmOfSampledProfiles() {
		// Gaussian: FWHM = 2√(2 ln 2)·σ (textbook); sampled every 0.05σ, linear interpolation.
		final double[] g = new double[401];
		for (int i = 0; i < g.length; i++) {
			final double x = (i - 200.3) * 0.05;
			g[i] = Math.exp(-0.5 * x * x);
		}
		assertEquals(2 * Math.sqrt(2 * Math.log(2)), Fwhm.of(g, 0.05), 1e-3);
		// triangle of half-width 5 samples: FWHM exactly 5 samples (linear interpolation is exact on it)
		final double[] t = { 0, 0.2, 0.4, 0.6, 0.8, 1, 0.8, 0.6, 0.4, 0.2, 0 };
		assertEquals(5 * 0.3, Fwhm.of(t, 0.3), 1e-12);
		assertTrue(Double.isNaN(Fwhm.of(new double[] { 1, 1, 1 }, 1)), "no half-maximum crossing: NaN");
	}

	@Test
	void nyquistSteps() {
		// λ/(4·NA) and λ/(2·n·(1 − cos α)) (common practice, from memory); worked numbers for 0.52 µm, NA 1.4, n 1.518:
		// 0.52/5.6 = 0.092857; cos α = √(1 − (1.4/1.518)²) = 0.386556, 0.52/(2·1.518·0.613444) = 0.279207.
		assertEquals(0.092857, Nyquist.lateral(0.52, 1.4), 1e-6);
		assertEquals(0.279207, Nyquist.axial(0.52, 1.518, 1.4), 1e-6);
		final Optics o = ok().build();
		assertNull(Nyquist.check(o, 0.09, 0.09, 0.25));
		final String m = Nyquist.check(o, 0.13, 0.13, 0.3);
		assertTrue(m.contains("0.13") && m.contains("0.0928571") && m.contains("0.3") && m.contains("0.279"), m);
	}
}
