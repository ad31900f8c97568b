package org.parfocal.psf;

import org.apache.commons.math3.analysis.integration.gauss.GaussIntegrator;
import org.apache.commons.math3.analysis.integration.gauss.GaussIntegratorFactory;
import org.apache.commons.math3.special.BesselJ;
import org.parfocal.core.Parallel;

/**
 * The pupil integrals of a {@link PupilPsfModel} at one wavelength, prepared for many defocus values at fixed
 * radii. For channel c the amplitude is
 * <pre>  U_c(r, z) = Σ_m w_m · a_c(ρ_m) · J_{n_c}(k·NA·r·ρ_m) · exp(i·k·(W(ρ_m) − z·√(n_i² − NA²ρ_m²)))</pre>
 * over composite Gauss–Legendre nodes ρ_m in [0, 1] (W is the model's aberration, complex for evanescent
 * parts). The Bessel factors do not depend on z: they are tabulated once (Apache Commons Math {@link BesselJ}),
 * so each plane costs one real matrix–vector product per channel instead of fresh Bessel evaluations. This
 * plays the role of the Bessel-series speed-up of Li, Xue &amp; Blu (JOSA A 34(6) 2017) for our use, many
 * planes at the same radii, without its fitting step.
 * <p>
 * The pupil is split where W has a square-root kink (ρ = n/NA for each layer index n below the NA); on such
 * segments the substitution ρ = a + (b − a)·t²(3 − 2t) removes the kink. Each segment gets one 8-point
 * Gauss–Legendre panel per 0.75π of its phase budget: the total variation of k·(W − z·√…) at the ends of the z
 * range, of the log-amplitude, and of the Bessel phase k·NA·r<sub>max</sub>·ρ.
 */
final class PupilTable {

	/** Gauss–Legendre order of one panel. */
	private static final int ORDER = 8;

	/**
	 * Phase budget of one panel, in units of π: 0.75π gives ~6e-8 relative error on a strongly aberrated
	 * pupil (oil NA 1.4 into water at 6 µm), 1.5π only ~3e-4 (measured against 0.25π).
	 */
	private static final double PANEL_PHASE = 0.75;

	final int nr, nrho, channels;
	private final double k;
	private final double[] slope, phase0, amp0, chanWeight;
	private final double[][] b;
	private final double scale;

	PupilTable(final PupilPsfModel model, final Optics o, final double lambda, final double[] radii, final double zMin, final double zMax) {
		k = 2 * Math.PI / lambda;
		nr = radii.length;
		channels = model.channels();
		final double na = o.na(), ni = o.immersionIndex();
		double rMax = 0;
		for (final double r : radii) rMax = Math.max(rMax, Math.abs(r));

		// segment edges at the kinks of W
		final double[] kinks = model.breakpoints(o).clone();
		java.util.Arrays.sort(kinks);
		final double[] edges = new double[kinks.length + 2];
		int ne = 0;
		edges[ne++] = 0;
		for (final double kk : kinks)
			if (kk > 1e-9 && kk < 1 - 1e-9 && kk > edges[ne - 1]) edges[ne++] = kk;
		edges[ne++] = 1;
		final int segments = ne - 1;

		// per segment: total variation of the phase (and of the log-amplitude) at both ends of the z range, in the
		// substituted coordinate, plus the Bessel phase k·NA·r_max·length; one 8-point panel per 0.75π of it
		final double[] w = new double[2];
		final int trial = 400;
		final int[] panels = new int[segments];
		final boolean[] warp = new boolean[segments];
		int total = 0;
		for (int sg = 0; sg < segments; sg++) {
			final double a = edges[sg], b = edges[sg + 1];
			warp[sg] = segments > 1; // a kink at one end at least: cluster nodes at both ends
			double tv0 = 0, tv1 = 0, prev0 = 0, prev1 = 0, prevLog = 0;
			for (int i = 0; i <= trial; i++) {
				final double rho = a + (b - a) * map(i / (double) trial, warp[sg]);
				model.aberration(o, rho, w);
				final double q = Math.sqrt(Math.max(0, ni * ni - na * na * rho * rho));
				final double p0 = k * (w[0] - zMin * q), p1 = k * (w[0] - zMax * q), l = k * w[1];
				if (i > 0) {
					tv0 += Math.abs(p0 - prev0) + Math.abs(l - prevLog);
					tv1 += Math.abs(p1 - prev1) + Math.abs(l - prevLog);
				}
				prev0 = p0;
				prev1 = p1;
				prevLog = l;
			}
			final double phi = Math.max(tv0, tv1) + k * na * rMax * (b - a) * (warp[sg] ? 1.5 : 1);
			panels[sg] = (int) Math.ceil(phi / (PANEL_PHASE * Math.PI)) + 1;
			total += panels[sg];
		}
		nrho = total * ORDER;
		final double[] rho = new double[nrho], wt = new double[nrho];
		final GaussIntegrator gl = new GaussIntegratorFactory().legendre(ORDER);
		int m = 0;
		for (int sg = 0; sg < segments; sg++) {
			final double a = edges[sg], span = edges[sg + 1] - a, len = 1.0 / panels[sg];
			for (int p = 0; p < panels[sg]; p++)
				for (int i = 0; i < ORDER; i++) {
					final double t = (p + 0.5 * (gl.getPoint(i) + 1)) * len;
					rho[m] = a + span * map(t, warp[sg]);
					wt[m++] = 0.5 * len * gl.getWeight(i) * span * (warp[sg] ? 6 * t * (1 - t) : 1);
				}
		}

		slope = new double[nrho];
		phase0 = new double[nrho];
		amp0 = new double[nrho];
		for (int i = 0; i < nrho; i++) {
			model.aberration(o, rho[i], w);
			slope[i] = -k * Math.sqrt(ni * ni - na * na * rho[i] * rho[i]);
			phase0[i] = k * w[0];
			amp0[i] = Math.exp(-k * w[1]);
		}
		chanWeight = new double[channels];
		final int[] order = new int[channels];
		final double[][] a = new double[channels][nrho];
		int maxOrder = 0;
		for (int c = 0; c < channels; c++) {
			chanWeight[c] = model.channelWeight(c);
			order[c] = model.besselOrder(c);
			maxOrder = Math.max(maxOrder, order[c]);
			for (int i = 0; i < nrho; i++) a[c][i] = wt[i] * model.pupilAmplitude(c, o, rho[i]);
		}
		b = new double[channels][nr * nrho];
		final int nb = maxOrder + 1;
		final double kna = k * na;
		Parallel.forRange(nr, j -> {
			for (int i = 0; i < nrho; i++) {
				final double x = kna * Math.abs(radii[j]) * rho[i];
				if (nb == 1) {
					b[0][j * nrho + i] = a[0][i] * (x == 0 ? 1 : BesselJ.value(0, x));
				} else {
					final double[] jv = x == 0 ? null : BesselJ.rjBesl(x, 0, nb).getVals();
					for (int c = 0; c < channels; c++) {
						final double jn = jv == null ? (order[c] == 0 ? 1 : 0) : jv[order[c]];
						b[c][j * nrho + i] = a[c][i] * jn;
					}
				}
			}
		});
		// aberration-free focal value of channel 0 sets the scale
		double s0 = 0;
		for (int i = 0; i < nrho; i++) s0 += a[0][i];
		scale = 1 / (s0 * s0);
	}

	/** ρ-coordinate map on a segment: identity, or t²(3 − 2t) which makes √(distance to an end) smooth in t. */
	private static double map(final double t, final boolean warp) {
		return warp ? t * t * (3 - 2 * t) : t;
	}

	/** Number of double scratch values {@link #intensity} needs. */
	int scratchSize() { return 2 * nrho; }

	/**
	 * Intensity at every radius for defocus z, into {@code out[0..nr)}: Σ_c weight_c·|U_c|², scaled so that an
	 * aberration-free focus has channel-0 intensity 1 on axis.
	 */
	void intensity(final double z, final double[] out, final double[] scratch) {
		final int n = nrho;
		for (int i = 0; i < n; i++) {
			final double ph = phase0[i] + z * slope[i];
			scratch[i] = amp0[i] * Math.cos(ph);
			scratch[n + i] = amp0[i] * Math.sin(ph);
		}
		for (int j = 0; j < nr; j++) {
			double v = 0;
			for (int c = 0; c < channels; c++) {
				final double[] bc = b[c];
				final int o = j * n;
				double re = 0, im = 0;
				for (int i = 0; i < n; i++) {
					final double bb = bc[o + i];
					re += bb * scratch[i];
					im += bb * scratch[n + i];
				}
				v += chanWeight[c] * (re * re + im * im);
			}
			out[j] = v * scale;
		}
	}
}
