package org.parfocal.psf;

import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Parallel;
import org.parfocal.core.Sums;
import org.parfocal.core.Volume;

/**
 * Base of the models computed from pupil integrals (scalar Born &amp; Wolf, Gibson &amp; Lanni, vectorial
 * Richards &amp; Wolf). A subclass states its pupil: the number of integrals ("channels"), their Bessel orders,
 * amplitudes and weights, and the aberration W(ρ) added to the defocus term. With s = NA·ρ, ρ ∈ [0, 1], the
 * intensity of one path at wavelength λ, radius r and nominal defocus z (µm) is
 * <pre>  I(r, z) = Σ_c g_c · |∫₀¹ a_c(ρ) J_{n_c}(k·NA·r·ρ) exp(i·k·(W(ρ) − z·√(n_i² − s²))) dρ|²,  k = 2π/λ.</pre>
 * <p>
 * This class combines the paths into the {@link Modality}, samples like a camera and normalises:
 * <ol>
 * <li>radial profiles on a fine grid r<sub>j</sub> = j·h, h = 0.08/(k·NA) (≈ 0.013·λ/NA), once per (sub-)plane;</li>
 * <li>confocal: I<sub>ex</sub>·(I<sub>em</sub> ⊗ pinhole disk); two-photon: I<sub>ex</sub>²; light sheet:
 * I<sub>em</sub>·exp(−z²/2σ²), σ = FWHM/(2√(2 ln 2));</li>
 * <li>pixel-area averages from the profile ({@link RadialSampler}); planes run in parallel over z, each plane by
 * the same code, so any thread count gives the same bits;</li>
 * <li>division by the total (compensated sum).</li>
 * </ol>
 */
public abstract class PupilPsfModel implements PsfModel {

	/** Radial grid step in units of 1/(k·NA). */
	static final double RADIAL_STEP = 0.08;

	/** Number of pupil integrals. */
	protected int channels() { return 1; }

	/** Bessel order n<sub>c</sub> of channel c. */
	protected int besselOrder(final int c) { return 0; }

	/** Weight g<sub>c</sub> of channel c in the intensity. */
	protected double channelWeight(final int c) { return 1; }

	/** Amplitude a<sub>c</sub>(ρ) including the Jacobian (ρ for a uniform pupil: ∫ … ρ dρ). */
	protected double pupilAmplitude(final int c, final Optics o, final double rho) { return rho; }

	/**
	 * Aberration W(ρ) in µm, complex: {@code out[0]} is the optical path difference, {@code out[1] ≥ 0} an
	 * evanescent part (amplitude factor exp(−k·out[1])). Default: none.
	 */
	protected void aberration(final Optics o, final double rho, final double[] out) {
		out[0] = 0;
		out[1] = 0;
	}

	/** Pupil coordinates where W is not smooth (quadrature panel edges). Default: none. */
	protected double[] breakpoints(final Optics o) { return new double[0]; }

	/**
	 * Unsampled intensity of one path (no modality, no pinhole) at wavelength {@code lambda} (µm): {@code I[iz][ir]}
	 * at defocus {@code z[iz]} and radius {@code r[ir]} (µm), scaled so that the aberration-free focus has
	 * channel-0 intensity 1 on axis (for the scalar models: I(0, 0) = 1 without aberration).
	 */
	public double[][] intensity(final Optics o, final double lambda, final double[] z, final double[] r) {
		double zMin = 0, zMax = 0;
		for (final double v : z) {
			zMin = Math.min(zMin, v);
			zMax = Math.max(zMax, v);
		}
		final PupilTable t = new PupilTable(this, o, lambda, r, zMin, zMax);
		final double[][] out = new double[z.length][r.length];
		Parallel.forRange(z.length, iz -> t.intensity(z[iz], out[iz], new double[t.scratchSize()]));
		return out;
	}

	@Override
	public Volume compute(final Optics o, final PsfGrid g, final Sampling sampling) {
		if (o == null || g == null || sampling == null) throw new IllegalArgumentException("Optics, grid and sampling are required");
		MemoryBudget.require(4L * g.nx() * g.ny() * g.nz(), "the PSF");
		final Modality mod = o.modality();
		final double lambdaMin = Math.min(mod.usesEmission() ? o.emissionWavelength() : Double.POSITIVE_INFINITY,
				mod.usesExcitation() ? o.excitationWavelength() : Double.POSITIVE_INFINITY);
		final double h = RADIAL_STEP * lambdaMin / (2 * Math.PI * o.na());
		final int os = Math.max(sampling.lateralFor(g.dx(), lambdaMin / o.na()), sampling.lateralFor(g.dy(), lambdaMin / o.na()));
		final int cx = (g.nx() - 1) / 2, cy = (g.ny() - 1) / 2;
		final double rOut = Math.hypot((cx + 0.5) * g.dx(), (cy + 0.5) * g.dy());
		final int nOut = (int) Math.ceil(rOut / h) + 4;
		final double pin = mod == Modality.CONFOCAL ? o.pinholeRadius() : 0;
		final int nIn = pin > 0 ? (int) Math.ceil((rOut + pin) / h) + 4 : nOut;

		final int ax = sampling.axial();
		final double zMin = g.z(0) - 0.5 * g.dz(), zMax = g.z(g.nz() - 1) + 0.5 * g.dz();
		final PupilTable em = mod.usesEmission() ? new PupilTable(this, o, o.emissionWavelength(), grid(nIn, h), zMin, zMax) : null;
		final PupilTable ex = mod.usesExcitation() ? new PupilTable(this, o, o.excitationWavelength(), grid(nOut, h), zMin, zMax) : null;
		final PinholeKernel kernel = pin > 0 ? new PinholeKernel(pin, h, nOut, nIn) : null;
		final RadialSampler sampler = new RadialSampler(g, os, h, nOut);
		final double sheetSigma = mod == Modality.LIGHT_SHEET ? o.sheetThickness() / (2 * Math.sqrt(2 * Math.log(2))) : 0;

		final Volume v = Volume.zeros(g.nx(), g.ny(), g.nz(), g.voxelSize());
		final float[] data = v.data();
		final int plane = g.nx() * g.ny();
		Parallel.forRange(g.nz(), l -> {
			final double[] prof = new double[nOut], a = new double[nIn], b = new double[nOut], c = new double[nOut];
			final double[] scratch = new double[Math.max(em == null ? 0 : em.scratchSize(), ex == null ? 0 : ex.scratchSize())];
			for (int q = 0; q < ax; q++) {
				final double z = g.z(l) + ((q + 0.5) / ax - 0.5) * g.dz();
				switch (mod) {
				case WIDEFIELD:
					em.intensity(z, a, scratch);
					for (int j = 0; j < nOut; j++) prof[j] += a[j];
					break;
				case LIGHT_SHEET: {
					em.intensity(z, a, scratch);
					final double s = Math.exp(-0.5 * z * z / (sheetSigma * sheetSigma));
					for (int j = 0; j < nOut; j++) prof[j] += a[j] * s;
					break;
				}
				case TWO_PHOTON:
					ex.intensity(z, b, scratch);
					for (int j = 0; j < nOut; j++) prof[j] += b[j] * b[j];
					break;
				case CONFOCAL:
					em.intensity(z, a, scratch);
					ex.intensity(z, b, scratch);
					if (kernel != null) kernel.apply(a, c);
					else System.arraycopy(a, 0, c, 0, nOut);
					for (int j = 0; j < nOut; j++) prof[j] += b[j] * c[j];
					break;
				default:
					throw new IllegalStateException("unknown modality " + mod);
				}
			}
			for (int j = 0; j < nOut; j++) prof[j] /= ax;
			sampler.fill(prof, data, l * plane, g.nx());
		});
		final double s = Sums.sum(data);
		if (!(s > 0) || !Double.isFinite(s))
			throw new IllegalArgumentException("The PSF has no intensity on this grid (sum " + s + "): enlarge the grid or check the optics");
		for (int i = 0; i < data.length; i++) data[i] = (float) (data[i] / s);
		return v;
	}

	private static double[] grid(final int n, final double h) {
		final double[] r = new double[n];
		for (int j = 0; j < n; j++) r[j] = j * h;
		return r;
	}

	@Override
	public String toString() { return key(); }
}
