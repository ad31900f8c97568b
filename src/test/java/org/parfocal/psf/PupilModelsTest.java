package org.parfocal.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.special.BesselJ;
import org.junit.jupiter.api.Test;

/**
 * The unsampled pupil models against textbook optics. Invented set-up: an oil objective (n 1.518) at 0.52 µm
 * emission unless stated.
 */
class PupilModelsTest {

	static final double LAMBDA = 0.52, NI = 1.518;

	static Optics optics(final double na, final double ni) {
		return Optics.builder().na(na).immersionIndex(ni).emissionWavelength(LAMBDA).build();
	}

	static double[] range(final double from, final double step, final int n) {
		final double[] r = new double[n];
		for (int i = 0; i < n; i++) r[i] = from + i * step;
		return r;
	}

	/** Airy pattern (2·J1(v)/v)², J1 from Apache Commons Math BesselJ. */
	static double airy(final double v) {
		if (v == 0) return 1;
		final double a = 2 * BesselJ.value(1, v) / v;
		return a * a;
	}

	/** f on [0, ∞) sampled at r_i, mirrored into a symmetric profile for FWHM. */
	static double[] mirror(final double[] f) {
		final int n = f.length;
		final double[] g = new double[2 * n - 1];
		for (int i = 0; i < n; i++) g[n - 1 + i] = g[n - 1 - i] = f[i];
		return g;
	}

	@Test
	void inFocusBornWolfIsTheAiryPattern() {
		// Born & Wolf, Principles of Optics §8.5.2: I = (2·J1(v)/v)², v = 2π·NA·r/λ; J1: Apache Commons Math.
		for (final double na : new double[] { 0.3, 0.95, 1.4 }) {
			final double[] r = range(0, 0.004, 1501);
			final double[] i = new BornWolfModel().intensity(optics(na, NI), LAMBDA, new double[] { 0 }, r)[0];
			double err = 0;
			for (int j = 0; j < r.length; j++) err = Math.max(err, Math.abs(i[j] - airy(2 * Math.PI * na * r[j] / LAMBDA)));
			assertTrue(err <= 1e-3, "NA " + na + ": max |I − Airy| = " + err + " of peak");
		}
	}

	@Test
	void firstDarkRingAndLateralFwhm() {
		// Rayleigh: first zero at 0.61·λ/NA (Born & Wolf §8.5.2); FWHM ≈ 0.51·λ/NA (common practice, from memory).
		final double na = 1.3, step = 1e-4;
		final double[] r = range(0, step, 4001);
		final double[] i = new BornWolfModel().intensity(optics(na, NI), LAMBDA, new double[] { 0 }, r)[0];
		int j = 1;
		while (j < r.length - 1 && !(i[j] <= i[j - 1] && i[j] <= i[j + 1])) j++;
		final double ring = r[j], fwhm = Fwhm.of(mirror(i), step);
		assertEquals(0.61 * LAMBDA / na, ring, 0.02 * 0.61 * LAMBDA / na, "first dark ring");
		assertEquals(0.51 * LAMBDA / na, fwhm, 0.02 * 0.51 * LAMBDA / na, "lateral FWHM");
	}

	@Test
	void paraxialOnAxisIntensityIsSincSquared() {
		// Born & Wolf §8.8.1: on axis I(0, u) = (sin(u/4)/(u/4))², u = 2π·NA²·z/(n·λ); axial FWHM = 0.886·2·n·λ/NA²
		// (the half-maximum of sinc² at u/4 = 1.3916). Low NA so that the paraxial approximation holds.
		final double na = 0.2, n = 1.0, step = 0.01;
		final double[] z = range(-60, step, 12001);
		final double[][] i = new BornWolfModel().intensity(optics(na, n), LAMBDA, z, new double[] { 0 });
		final double[] f = new double[z.length];
		double err = 0;
		for (int k = 0; k < z.length; k++) {
			f[k] = i[k][0];
			final double u = 2 * Math.PI * na * na * z[k] / (n * LAMBDA), x = u / 4;
			final double s = x == 0 ? 1 : Math.sin(x) / x;
			err = Math.max(err, Math.abs(f[k] - s * s));
		}
		assertTrue(err < 0.02, "max |I − sinc²| = " + err);
		final double expected = 0.886 * 2 * n * LAMBDA / (na * na);
		assertEquals(expected, Fwhm.of(f, step), 0.03 * expected, "axial FWHM");
	}

	@Test
	void gibsonLanniAtDesignValuesEqualsBornWolf() {
		// Gibson & Lanni 1991: every optical path difference vanishes at design values, leaving pure defocus.
		final Optics o = Optics.builder().na(1.4).immersionIndex(NI).sampleIndex(NI).depth(0).emissionWavelength(LAMBDA).build();
		final double[] z = range(-3, 0.25, 25), r = range(0, 0.01, 301);
		final double[][] a = new GibsonLanniModel().intensity(o, LAMBDA, z, r), b = new BornWolfModel().intensity(o, LAMBDA, z, r);
		double err = 0;
		for (int k = 0; k < z.length; k++)
			for (int j = 0; j < r.length; j++) err = Math.max(err, Math.abs(a[k][j] - b[k][j]));
		assertTrue(err <= 1e-3, "max |GL − BW| = " + err);
		// and a matched sample at depth is still aberration-free (the depth terms cancel)
		final double[][] c = new GibsonLanniModel().intensity(o.toBuilder().depth(40).build(), LAMBDA, z, r);
		for (int k = 0; k < z.length; k++)
			for (int j = 0; j < r.length; j++) err = Math.max(err, Math.abs(c[k][j] - b[k][j]));
		assertTrue(err <= 1e-3, "max |GL(depth 40, matched) − BW| = " + err);
	}

	/** On-axis intensity of Gibson & Lanni on a fine z grid: {z of peak, left lobe/peak, right lobe/peak}. */
	static double[] axialShape(final double na, final double ns, final double depth) {
		final Optics o = Optics.builder().na(na).immersionIndex(NI).sampleIndex(ns).depth(depth).emissionWavelength(LAMBDA).build();
		final double[] z = range(-10, 0.01, 4001);
		final double[][] i = new GibsonLanniModel().intensity(o, LAMBDA, z, new double[] { 0 });
		int p = 0;
		for (int k = 1; k < z.length; k++) if (i[k][0] > i[p][0]) p = k;
		int l = p, r = p;
		while (l > 0 && i[l - 1][0] < i[l][0]) l--;
		while (r < z.length - 1 && i[r + 1][0] < i[r][0]) r++;
		double lobeL = 0, lobeR = 0;
		for (int k = 0; k < l; k++) lobeL = Math.max(lobeL, i[k][0]);
		for (int k = r + 1; k < z.length; k++) lobeR = Math.max(lobeR, i[k][0]);
		return new double[] { z[p], lobeL / i[p][0], lobeR / i[p][0] };
	}

	@Test
	void focalShiftIntoWaterFollowsTheIndexRatio() {
		// Oil objective focusing 20 µm into water: the focus lands at about n_s/n_i of the nominal depth
		// (paraxial estimate; Hell et al., J. Microsc. 169:391, 1993, from memory), so the PSF peak sits at a nominal
		// focus deeper than the emitter, z > 0. Moderate NA 0.8: the apparent factor within 15 % of n_s/n_i.
		final double ns = 1.33, d = 20;
		final double zPeak = axialShape(0.8, ns, d)[0];
		assertTrue(zPeak > 0, "peak at z = " + zPeak + " should be > 0");
		final double factor = d / (d + zPeak);
		assertEquals(ns / NI, factor, 0.15 * ns / NI, "apparent focal shift factor");
	}

	@Test
	void depthAberrationMakesTheAxialProfileAsymmetricTowardTheMarginalFocus() {
		// Geometric optics (Snell's law at the coverslip/water interface): a ray leaving the emitter at depth d at
		// angle θ_s appears to come from depth d·tanθ_s/tanθ_i, so it is in focus at nominal z(θ) =
		// d·(n_i/n_s·cosθ_i/cosθ_s − 1), which grows with θ. The best focus lies between the paraxial and marginal
		// values, and the spherical-aberration side lobes (Born & Wolf §9.4, from memory) fall on the marginal
		// (+z, deeper) side.
		final double na = 1.2, ns = 1.33, d = 20;
		final double[] s = axialShape(na, ns, d);
		final double sinI = na / NI, sinS = na / ns;
		final double zPar = d * (NI / ns - 1), zMarg = d * (NI / ns * Math.sqrt(1 - sinI * sinI) / Math.sqrt(1 - sinS * sinS) - 1);
		assertTrue(s[0] > zPar && s[0] < zMarg, "peak " + s[0] + " not between paraxial " + zPar + " and marginal " + zMarg + " foci");
		assertTrue(s[2] > 3 * s[1], "side lobes: −z " + s[1] + ", +z " + s[2]);
		// matched indices: symmetric (Born & Wolf §8.8: I(0, −u) = I(0, u))
		final double[] m = axialShape(na, NI, d);
		assertEquals(0, m[0], 0.011);
		assertEquals(m[1], m[2], 1e-3, "matched side lobes");
	}

	@Test
	void pupilQuadratureIsConvergedUnderStrongAberration() {
		// Self-consistency: the node count grows with the requested radius and defocus range; values at fixed
		// points must not depend on it. Oil NA 1.4 into water 6 µm deep (evanescent and kinked pupil phase).
		final Optics o = Optics.builder().na(1.4).immersionIndex(NI).sampleIndex(1.33).depth(6).emissionWavelength(LAMBDA).build();
		final double[] r = range(0, 0.1, 8);
		final double[] a = new GibsonLanniModel().intensity(o, LAMBDA, new double[] { 0.3 }, r)[0];
		final double[] rr = java.util.Arrays.copyOf(r, 9);
		rr[8] = 40;
		final double[] b = new GibsonLanniModel().intensity(o, LAMBDA, new double[] { 0.3, -20, 20 }, rr)[0];
		for (int j = 0; j < r.length; j++) assertEquals(b[j], a[j], 1e-6 * b[0], "r = " + r[j]);
	}

	@Test
	void scalarPlaneFluxIsTheSameAtEveryDefocus() {
		// Parseval for the Hankel transform: without evanescent parts the power through each plane,
		// ∫ I(r, z)·2πr dr, does not depend on z (energy conservation; from memory, standard Fourier optics).
		final Optics o = Optics.builder().na(1.0).immersionIndex(NI).sampleIndex(1.45).depth(15).emissionWavelength(LAMBDA).build();
		final double step = 0.002;
		final double[] r = range(0, step, 15001), z = { -2, 0, 1.5, 4 };
		final double[][] i = new GibsonLanniModel().intensity(o, LAMBDA, z, r);
		final double[] flux = new double[z.length];
		for (int k = 0; k < z.length; k++)
			for (int j = 0; j < r.length; j++) flux[k] += i[k][j] * 2 * Math.PI * r[j] * step * (j == 0 ? 0.5 : 1);
		for (int k = 1; k < z.length; k++) assertEquals(flux[0], flux[k], 0.01 * flux[0], "flux at z = " + z[k]);
	}

	@Test
	void vectorialModelAgreesWithScalarAtLowNaAndBroadensAtHighNa() {
		// At low NA the vectorial corrections (|I1|², |I2|², √cosθ) vanish (Richards & Wolf 1959). At NA 1.4 the
		// depolarised components widen the focal spot of unpolarised light by some per cent (from memory).
		final double[] r = range(0, 0.004, 501), z = { -1, 0, 1 };
		final Optics low = optics(0.3, 1.0);
		final double[][] v = new RichardsWolfModel().intensity(low, LAMBDA, z, r), s = new BornWolfModel().intensity(low, LAMBDA, z, r);
		double err = 0;
		for (int k = 0; k < z.length; k++)
			for (int j = 0; j < r.length; j++) err = Math.max(err, Math.abs(v[k][j] / v[1][0] - s[k][j] / s[1][0]));
		assertTrue(err < 0.01, "low NA: max difference " + err);
		final double[] rr = range(0, 0.001, 501);
		final double fv = Fwhm.of(mirror(new RichardsWolfModel().intensity(optics(1.4, NI), LAMBDA, new double[] { 0 }, rr)[0]), 0.001);
		final double fs = Fwhm.of(mirror(new BornWolfModel().intensity(optics(1.4, NI), LAMBDA, new double[] { 0 }, rr)[0]), 0.001);
		assertTrue(fv > 1.02 * fs && fv < 1.2 * fs, "vectorial FWHM " + fv + " vs scalar " + fs);
	}
}
