package org.parfocal.psf;

import org.apache.commons.math3.special.Erf;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Parallel;
import org.parfocal.core.Sums;
import org.parfocal.core.Volume;
import org.scijava.plugin.Plugin;

/**
 * Separable 3D Gaussian approximation, h ∝ exp(−(x² + y²)/2σ<sub>r</sub>² − z²/2σ<sub>z</sub>²), with the
 * closed forms of Zhang, Zerubia &amp; Olivo-Marin (Applied Optics 46(10):1819, 2007) for the widefield PSF
 * (non-paraxial, aperture angle α = asin(NA/n), k = 2π/λ, c = cos α; formulas from memory and re-derived here as
 * the Taylor match at the origin of the scalar PSF with pupil weight √cos θ):
 * <pre>  σ_r = (1/(n k)) · [(4 − 7c^{3/2} + 3c^{7/2}) / (7(1 − c^{3/2}))]^{−1/2}
 *  σ_z = 5√7 (1 − c^{3/2}) / (√6 · n k · [4c⁵ − 25c^{7/2} + 42c^{5/2} − 25c^{3/2} + 4]^{1/2})</pre>
 * whose paraxial limits are σ<sub>r</sub> = √2/(k·NA) and σ<sub>z</sub> = 2√6·n/(k·NA²). The modalities combine
 * Gaussians by the same Taylor rule (curvatures add for a product):
 * <ul>
 * <li>confocal: 1/σ² = 1/σ<sub>ex</sub>² + 1/σ<sub>em,p</sub>² per axis; laterally the emission Gaussian blurred by
 * the pinhole disk of radius R has σ<sub>em,p</sub>² = σ<sub>em</sub>²·(e<sup>a</sup> − 1)/a, a = R²/2σ<sub>em</sub>²
 * (curvature at the origin of Gaussian ⊗ disk, derived with the divergence theorem; Zhang et al. give their own
 * pinhole form, which we did not reproduce); axially the separable model keeps σ<sub>em</sub>;</li>
 * <li>two-photon: the excitation Gaussian squared, σ<sub>ex</sub>/√2;</li>
 * <li>light sheet: axially 1/σ<sub>z</sub>² = 1/σ<sub>em,z</sub>² + 1/σ<sub>sheet</sub>², σ<sub>sheet</sub> = FWHM/(2√(2 ln 2)).</li>
 * </ul>
 * n is the immersion index; depth aberration is not modelled. Pixels are exact area integrals (differences of
 * erf, Apache Commons Math), or point samples when {@link Sampling#lateral()} is 1; planes are point samples,
 * or exact averages over dz when {@link Sampling#axial()} &gt; 1.
 */
@Plugin(type = PsfModel.class, name = GaussianModel.KEY, priority = 400)
public class GaussianModel implements PsfModel {

	public static final String KEY = "gaussian";

	@Override
	public String key() { return KEY; }

	@Override
	public String description() { return "Gaussian approximation (Zhang, Zerubia & Olivo-Marin 2007)"; }

	/** Non-paraxial widefield {σ<sub>r</sub>, σ<sub>z</sub>} (µm) of Zhang et al. 2007. */
	public static double[] widefield(final double lambda, final double na, final double n) {
		// Zhang's forms factored with x = √cos α (the brackets have the roots (1 − x)² and (1 − x)⁴), so that they
		// do not cancel catastrophically at low NA; algebraically identical.
		final double k = 2 * Math.PI / lambda, alpha = Math.asin(na / n), x = Math.sqrt(Math.cos(alpha));
		final double s2 = Math.sin(0.5 * alpha), oneMinusX = 2 * s2 * s2 / (1 + x); // 1 − √c = (1 − c)/(1 + √c)
		final double x2 = x * x, x3 = x2 * x, x4 = x3 * x, x5 = x4 * x, x6 = x5 * x, q = 1 + x + x2;
		final double p5 = 3 * x5 + 6 * x4 + 9 * x3 + 12 * x2 + 8 * x + 4;
		final double p6 = 4 * x6 + 16 * x5 + 40 * x4 + 55 * x3 + 40 * x2 + 16 * x + 4;
		final double sr = 1 / (n * k) / Math.sqrt(oneMinusX * p5 / (7 * q));
		final double sz = 5 * Math.sqrt(7) * q / (Math.sqrt(6) * n * k * oneMinusX * Math.sqrt(p6));
		return new double[] { sr, sz };
	}

	/** Paraxial widefield {σ<sub>r</sub>, σ<sub>z</sub>} = {√2/(k·NA), 2√6·n/(k·NA²)} (µm), Zhang et al. 2007. */
	public static double[] widefieldParaxial(final double lambda, final double na, final double n) {
		final double k = 2 * Math.PI / lambda;
		return new double[] { Math.sqrt(2) / (k * na), 2 * Math.sqrt(6) * n / (k * na * na) };
	}

	/** {σ<sub>r</sub>, σ<sub>z</sub>} (µm) of the model for these optics. */
	public static double[] sigmas(final Optics o) {
		final double na = o.na(), n = o.immersionIndex();
		switch (o.modality()) {
		case WIDEFIELD:
			return widefield(o.emissionWavelength(), na, n);
		case TWO_PHOTON: {
			final double[] s = widefield(o.excitationWavelength(), na, n);
			return new double[] { s[0] / Math.sqrt(2), s[1] / Math.sqrt(2) };
		}
		case LIGHT_SHEET: {
			final double[] s = widefield(o.emissionWavelength(), na, n);
			final double sheet = o.sheetThickness() / (2 * Math.sqrt(2 * Math.log(2)));
			return new double[] { s[0], 1 / Math.sqrt(1 / (s[1] * s[1]) + 1 / (sheet * sheet)) };
		}
		case CONFOCAL: {
			final double[] em = widefield(o.emissionWavelength(), na, n), ex = widefield(o.excitationWavelength(), na, n);
			final double r = o.pinholeRadius(), a = r * r / (2 * em[0] * em[0]);
			final double grow = a < 1e-8 ? 1 + a / 2 : Math.expm1(a) / a;
			final double emr2 = em[0] * em[0] * grow;
			return new double[] { 1 / Math.sqrt(1 / (ex[0] * ex[0]) + 1 / emr2), 1 / Math.sqrt(1 / (ex[1] * ex[1]) + 1 / (em[1] * em[1])) };
		}
		default:
			throw new IllegalStateException("unknown modality " + o.modality());
		}
	}

	@Override
	public Volume compute(final Optics o, final PsfGrid g, final Sampling sampling) {
		if (o == null || g == null || sampling == null) throw new IllegalArgumentException("Optics, grid and sampling are required");
		MemoryBudget.require(4L * g.nx() * g.ny() * g.nz(), "the PSF");
		final double[] s = sigmas(o);
		final double[] fx = profile(g.nx(), g.dx(), s[0], sampling.lateral() != 1);
		final double[] fy = profile(g.ny(), g.dy(), s[0], sampling.lateral() != 1);
		final double[] fz = profile(g.nz(), g.dz(), s[1], sampling.axial() > 1);
		final Volume v = Volume.zeros(g.nx(), g.ny(), g.nz(), g.voxelSize());
		final float[] d = v.data();
		final int nx = g.nx(), ny = g.ny();
		Parallel.forRange(g.nz(), l -> {
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++) d[x + nx * (y + ny * l)] = (float) (fx[x] * fy[y] * fz[l]);
		});
		final double sum = Sums.sum(d);
		if (!(sum > 0)) throw new IllegalArgumentException("The PSF has no intensity on this grid: enlarge the grid");
		for (int i = 0; i < d.length; i++) d[i] = (float) (d[i] / sum);
		return v;
	}

	/** Values of exp(−t²/2σ²) at voxel centres, or its exact mean over each voxel (scaled by √(π/2)·σ/d). */
	private static double[] profile(final int n, final double d, final double sigma, final boolean integrate) {
		final double[] f = new double[n];
		final int c = (n - 1) / 2;
		final double k = 1 / (Math.sqrt(2) * sigma);
		for (int i = 0; i < n; i++) {
			final double t = (i - c) * d;
			f[i] = integrate ? Erf.erf((t - 0.5 * d) * k, (t + 0.5 * d) * k) : Math.exp(-0.5 * t * t / (sigma * sigma));
		}
		return f;
	}

	@Override
	public String toString() { return key(); }
}
