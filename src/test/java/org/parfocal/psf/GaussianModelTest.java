package org.parfocal.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.apache.commons.math3.analysis.integration.IterativeLegendreGaussIntegrator;
import org.apache.commons.math3.special.BesselJ;
import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;

class GaussianModelTest {

	static final double LAMBDA = 0.52;

	static double integrate(final org.apache.commons.math3.analysis.UnivariateFunction f, final double a, final double b) {
		return new IterativeLegendreGaussIntegrator(16, 1e-14, 1e-14).integrate(100000, f, a, b);
	}

	@Test
	void paraxialSigmasMatchTheCurvatureOfTheAiryPattern() {
		// Zhang, Zerubia & Olivo-Marin 2007 (paraxial widefield, from memory): σ_r = √2/(k·NA), σ_z = 2√6·n/(k·NA²),
		// the Gaussians with the same curvature at the origin as (2·J1(v)/v)² (J1: Apache Commons Math) and
		// sinc²(u/4) (Born & Wolf §8.8). Curvatures by central differences here.
		final double na = 0.5, n = 1.33, k = 2 * Math.PI / LAMBDA;
		final double[] s = GaussianModel.widefieldParaxial(LAMBDA, na, n);
		final double h = 1e-3;
		final double airy = Math.pow(2 * BesselJ.value(1, k * na * h) / (k * na * h), 2);
		final double curvR = 2 * (airy - 1) / (h * h); // I(h) ≈ 1 + I''·h²/2
		assertEquals(1 / Math.sqrt(-curvR), s[0], 1e-5 * s[0], "σ_r");
		final double u = 2 * Math.PI * na * na * h / (n * LAMBDA), x = u / 4;
		final double curvZ = 2 * (Math.pow(Math.sin(x) / x, 2) - 1) / (h * h);
		assertEquals(1 / Math.sqrt(-curvZ), s[1], 1e-5 * s[1], "σ_z");
		// the usual figures: σ_r ≈ 0.225·λ/NA, σ_z ≈ 0.78·n·λ/NA²
		assertEquals(0.225 * LAMBDA / na, s[0], 0.002 * LAMBDA / na);
		assertEquals(0.78 * n * LAMBDA / (na * na), s[1], 0.005 * n * LAMBDA / (na * na));
	}

	@Test
	void nonParaxialSigmasMatchTheirDefiningIntegrals() {
		// Zhang et al. 2007 derive σ_r, σ_z as Taylor matches of the scalar PSF with pupil weight √cosθ:
		// σ_r = (1/(nk))·(A2/A0)^(−1/2), A0 = ∫√c·sinθ dθ, A2 = ∫√c·sin³θ dθ; σ_z = 1/(nk·√(2·Var u)) with u = cosθ
		// weighted by √u on [cos α, 1]. Integrals by Apache Commons Math Gauss–Legendre quadrature.
		for (final double na : new double[] { 0.3, 0.9, 1.2, 1.45 }) {
			final double n = 1.518, k = 2 * Math.PI / LAMBDA, alpha = Math.asin(na / n);
			final double a0 = integrate(t -> Math.sqrt(Math.cos(t)) * Math.sin(t), 0, alpha);
			final double a2 = integrate(t -> Math.sqrt(Math.cos(t)) * Math.pow(Math.sin(t), 3), 0, alpha);
			final double c = Math.cos(alpha);
			final double m0 = integrate(Math::sqrt, c, 1), m1 = integrate(v -> Math.sqrt(v) * v, c, 1), m2 = integrate(v -> Math.sqrt(v) * v * v, c, 1);
			final double var = m2 / m0 - (m1 / m0) * (m1 / m0);
			final double[] s = GaussianModel.widefield(LAMBDA, na, n);
			assertEquals(1 / (n * k) / Math.sqrt(a2 / a0), s[0], 1e-9 * s[0], "σ_r at NA " + na);
			assertEquals(1 / (n * k * Math.sqrt(2 * var)), s[1], 1e-6 * s[1], "σ_z at NA " + na);
		}
		// and the non-paraxial forms tend to the paraxial ones at low NA (Zhang et al. 2007)
		final double[] np = GaussianModel.widefield(LAMBDA, 0.02, 1.0), p = GaussianModel.widefieldParaxial(LAMBDA, 0.02, 1.0);
		assertEquals(p[0], np[0], 1e-3 * p[0]);
		assertEquals(p[1], np[1], 1e-3 * p[1]);
	}

	@Test
	void sampledVolumeHasTheGaussianFwhmAndUnitSum() {
		// FWHM of a Gaussian = 2√(2 ln 2)·σ (textbook); point samples on a fine grid.
		final Optics o = Optics.builder().na(1.2).immersionIndex(1.33).emissionWavelength(LAMBDA).build();
		final double[] s = GaussianModel.sigmas(o);
		final Volume v = new GaussianModel().compute(o, new PsfGrid(101, 101, 101, 0.01, 0.01, 0.03), Sampling.POINT);
		final double c = 2 * Math.sqrt(2 * Math.log(2));
		assertEquals(c * s[0], Fwhm.lateral(v), 0.002 * c * s[0]);
		assertEquals(c * s[1], Fwhm.axial(v), 0.002 * c * s[1]);
		assertEquals(1, v.sum(), 1e-6);
		// area integration: a pixel's value is ∫ over the pixel (erf differences); check one against quadrature
		final PsfGrid g = new PsfGrid(9, 9, 1, 0.2, 0.2, 0.2);
		final Volume a = new GaussianModel().compute(o, g, Sampling.AUTO);
		final double ratio = a.get(6, 4, 0) / a.get(4, 4, 0);
		final double num = integrate(x -> Math.exp(-x * x / (2 * s[0] * s[0])), 0.3, 0.5), den = integrate(x -> Math.exp(-x * x / (2 * s[0] * s[0])), -0.1, 0.1);
		assertEquals(num / den, ratio, 1e-5);
	}

	@Test
	void confocalModalities() {
		// Closed pinhole, equal wavelengths: the product of two equal Gaussians has σ/√2 (the ~1/√2 rule,
		// common practice). A pinhole only widens the lateral σ (Gaussian ⊗ disk, derived in GaussianModel).
		final Optics wf = Optics.builder().na(1.4).emissionWavelength(LAMBDA).build();
		final Optics cf = wf.toBuilder().modality(Modality.CONFOCAL).excitationWavelength(LAMBDA).pinholeAiryUnits(0).build();
		final double[] w = GaussianModel.sigmas(wf), c0 = GaussianModel.sigmas(cf);
		assertEquals(w[0] / Math.sqrt(2), c0[0], 1e-12);
		assertEquals(w[1] / Math.sqrt(2), c0[1], 1e-12);
		final double[] c1 = GaussianModel.sigmas(cf.toBuilder().pinholeAiryUnits(1).build()), c5 = GaussianModel.sigmas(cf.toBuilder().pinholeAiryUnits(5).build());
		assertTrue(c0[0] < c1[0] && c1[0] < c5[0] && c5[0] < w[0], c0[0] + " < " + c1[0] + " < " + c5[0] + " < " + w[0]);
		// Gaussian ⊗ disk curvature: check σ_em,p against a numeric 2D convolution of exp(−r²/2σ²) with the disk
		final double se = w[0], rad = cf.toBuilder().pinholeAiryUnits(1).build().pinholeRadius(), hh = 1e-3;
		final double at0 = diskMean(se, rad, 0), atH = diskMean(se, rad, hh);
		final double sEff = Math.sqrt(-hh * hh / (2 * Math.log(atH / at0)));
		final double sc = 1 / Math.sqrt(1 / (c0[0] * c0[0] * 2) + 1 / (sEff * sEff)); // ex σ = w[0] = c0·√2
		assertEquals(sc, c1[0], 2e-3 * sc, "confocal σ_r with a 1 AU pinhole");
		// two-photon: excitation squared, σ/√2 of the widefield σ at the laser wavelength
		final Optics tp = Optics.builder().modality(Modality.TWO_PHOTON).na(1.0).immersionIndex(1.33).excitationWavelength(0.9).build();
		assertEquals(GaussianModel.widefield(0.9, 1.0, 1.33)[0] / Math.sqrt(2), GaussianModel.sigmas(tp)[0], 1e-12);
	}

	/** ∫ over the disk of radius R of exp(−|p − s|²/2σ²), p = (x, 0), by polar midpoint sums. */
	static double diskMean(final double sigma, final double radius, final double x) {
		final int nr = 2000, nt = 2000;
		double s = 0;
		for (int i = 0; i < nr; i++) {
			final double r = (i + 0.5) * radius / nr;
			for (int j = 0; j < nt; j++) {
				final double t = (j + 0.5) * 2 * Math.PI / nt, dx = r * Math.cos(t) - x, dy = r * Math.sin(t);
				s += Math.exp(-(dx * dx + dy * dy) / (2 * sigma * sigma)) * r;
			}
		}
		return s;
	}
}
