package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.testing.TestVolumes;

/** Percentiles, normalisation and resampling, the steps before any distance. */
class PreparationTest {

	/** Source: numpy.percentile(x, q), method "linear" (NumPy 1.24.2), golden file by gen_wasserstein.py. */
	@Test
	void percentilesEqualNumpy() {
		for (final GoldenCases.Case c : GoldenCases.read("percentile.txt")) {
			final double[] x = c.field("x");
			final float[] f = new float[x.length];
			for (int i = 0; i < x.length; i++) f[i] = (float) x[i];
			final double[] got = org.parfocal.core.RobustStats.percentiles(f, c.field("q")), ref = c.field("numpy_percentile");
			for (int k = 0; k < ref.length; k++)
				assertEquals(ref[k], got[k], 1e-9 * Math.max(1, Math.abs(ref[k])), c.name() + " q=" + c.field("q")[k]);
		}
	}

	/**
	 * Source: scipy.ndimage.map_coordinates(order=1, mode="nearest") at the centre-aligned coordinates, after
	 * scipy.ndimage.gaussian_filter1d anti-aliasing along shrinking axes (one case shrinks 4×), golden file.
	 */
	@Test
	void resamplingEqualsScipyLinearInterpolation() {
		for (final GoldenCases.Case c : GoldenCases.read("resample.txt")) {
			final double[] img = c.field("image");
			final float[] f = new float[img.length];
			for (int i = 0; i < f.length; i++) f[i] = (float) img[i];
			final Volume v = Volume.wrap(f, c.integer("nx"), c.integer("ny"), c.integer("nz"), VoxelSize.microns(c.number("dx"), c.number("dy"), c.number("dz")));
			final Volume before = v.copy();
			final Volume out = Resampling.toVoxelSize(v, VoxelSize.microns(c.number("tx"), c.number("ty"), c.number("tz")));
			assertArrayEquals(new int[] { c.integer("ox"), c.integer("oy"), c.integer("oz") }, out.shape(), c.name());
			TestVolumes.assertClose(c.field("scipy_map_coordinates"), out.data(), 1e-6, c.name());
			assertEquals(before, v, "input unchanged");
		}
	}

	/** Units: 100 nm voxels resampled to 0.1 µm is the identity. */
	@Test
	void resamplingConvertsUnits() {
		final Volume v = TestVolumes.random(1, 9, 8, 1).withVoxelSize(new VoxelSize(100, 100, 300, "nm"));
		final Volume out = Resampling.toVoxelSize(v, VoxelSize.microns(0.1, 0.1, 0.3));
		assertArrayEquals(v.data(), out.data());
		TestVolumes.assertMessage("not a length unit", () -> Resampling.toVoxelSize(v.withVoxelSize(new VoxelSize(1, 1, 1, "parsec-ish")), VoxelSize.microns(1, 1, 1)));
	}

	/**
	 * Source: the SI prefixes (1 nm = 10⁻³ µm, 1 mm = 10³ µm; BIPM SI Brochure, 9th ed., 2019), in the spellings
	 * ImageJ users write. The resampler and the PSF grid read one table ({@code PsfGrid.micronsPerUnit}): they agree
	 * on every unit, and an unknown or pixel unit is no length.
	 */
	@Test
	void unitFactorsAreTheSiPrefixesAndAgreeWithThePsfGrid() {
		final String[] units = { "nm", "nanometre", "µm", "μm", "um", "micron", "microns", "micrometer", "mm", "millimetre", " UM " };
		final double[] factor = { 1e-3, 1e-3, 1, 1, 1, 1, 1, 1, 1e3, 1e3, 1 };
		for (int i = 0; i < units.length; i++) {
			assertEquals(factor[i], Resampling.micronsPerUnit(units[i]), 0, units[i]);
			assertEquals(factor[i], org.parfocal.psf.PsfGrid.micronsPer(new VoxelSize(1, 1, 1, units[i])), 0, units[i]);
		}
		for (final String u : new String[] { "pixel", "pixels", "inch", "parsec-ish" }) assertTrue(Double.isNaN(Resampling.micronsPerUnit(u)), u);
		assertArrayEquals(new double[] { 0.25, 0.25, 1.5 }, Resampling.microns(new VoxelSize(250, 250, 1500, "nm"), "The image"), 1e-12);
	}

	/** Definition: (v − P1)/(P99.5 − P1) maps the two percentiles to 0 and 1; affine changes of the input cancel. */
	@Test
	void normalisationIsAffineInvariant() {
		final Volume v = TestVolumes.random(2, 40, 30, 3);
		final Volume w = v.copy();
		for (int i = 0; i < w.size(); i++) w.data()[i] = 500 + 37 * w.data()[i];
		final Volume nv = Normalization.robust(v, 1, 99.5, "A"), nw = Normalization.robust(w, 1, 99.5, "B");
		final double[] q = org.parfocal.core.RobustStats.percentiles(nv.data(), 1, 99.5);
		assertEquals(0, q[0], 1e-6);
		assertEquals(1, q[1], 1e-6);
		TestVolumes.assertClose(TestVolumes.toDouble(nv.data()), nw.data(), 1e-4, "affine invariance");
	}

	@Test
	void constantImageIsRejected() {
		final Volume c = Volume.zeros(20, 20, 1, null);
		java.util.Arrays.fill(c.data(), 7f);
		TestVolumes.assertMessage("Reference 3 is constant", () -> Normalization.robust(c, 1, 99.5, "Reference 3"));
		c.data()[5] = Float.NaN;
		TestVolumes.assertMessage("non-finite", () -> Normalization.robust(c, 1, 99.5, "Reference 3"));
	}

	/** Patch features: mean removed per scale, contrast normalisation gives rms ≤ 1, the dimension is as documented. */
	@Test
	void patchFeaturesAreMeanRemovedAndSized() {
		final Volume v = TestVolumes.random(3, 64, 48, 1);
		final PatchOptions o = new PatchOptions(5, 1, 2, false, true);
		final PointSet p = Patches.sample(java.util.List.of(v), java.util.List.of("A"), o, 100, 4);
		assertEquals(50, p.dim());
		for (int i = 0; i < p.count(); i++)
			for (int s = 0; s < 2; s++) {
				double m = 0;
				for (int k = 0; k < 25; k++) m += p.get(i, s * 25 + k);
				assertEquals(0, m, 1e-9);
			}
		final PointSet q = Patches.sample(java.util.List.of(v), java.util.List.of("A"), new PatchOptions(5, 1, 2, true, true), 100, 4);
		for (int i = 0; i < q.count(); i++) {
			double ms = 0;
			for (int k = 0; k < q.dim(); k++) ms += q.get(i, k) * q.get(i, k);
			assertTrue(ms / q.dim() < 1 && ms / q.dim() > 0.5, "rms after contrast normalisation " + ms / q.dim());
		}
		final Volume stack = TestVolumes.random(3, 30, 30, 6);
		assertEquals(5 * 5 * 3, Patches.sample(java.util.List.of(stack), java.util.List.of("S"), new PatchOptions(5, 3, 1, false, true), 10, 1).dim());
		assertEquals(25, Patches.sample(java.util.List.of(stack), java.util.List.of("S"), new PatchOptions(5, 3, 1, false, false), 10, 1).dim());
		TestVolumes.assertMessage("The result (30 x 30 x 6 voxels on the common grid) is smaller than the patch", () -> Patches.sample(java.util.List.of(stack),
				java.util.List.of("The result"), new PatchOptions(9, 3, 3, false, true), 10, 1));
	}
}
