package org.parfocal.psf;

import java.util.Locale;

import net.imglib2.parallel.Parallelization;

import org.parfocal.core.Volume;

/**
 * Times PSF generation (not a unit test; run with
 * {@code java -cp target/classes:target/test-classes:<deps> org.parfocal.psf.PsfBenchmark [threads]}).
 * Prints seconds for a 65×129×129 Gibson &amp; Lanni PSF and a 65×257×257 Born &amp; Wolf PSF, and their
 * ratio to the Gaussian model on the same grid measured in the same run (the baseline: a pure fill of the
 * volume). Invented set-up: 1.4 oil objective, 0.52 µm emission, 0.1 µm pixels, 0.2 µm steps, 10 µm deep
 * in an aqueous mounting medium.
 */
public final class PsfBenchmark {

	public static void main(final String[] args) {
		final int threads = args.length > 0 ? Integer.parseInt(args[0]) : Runtime.getRuntime().availableProcessors();
		final Optics o = Optics.builder().na(1.4).immersionIndex(1.518).sampleIndex(1.33).depth(10).emissionWavelength(0.52).build();
		final PsfGrid gl = new PsfGrid(129, 129, 65, 0.1, 0.1, 0.2), bw = new PsfGrid(257, 257, 65, 0.1, 0.1, 0.2);
		System.out.println("threads " + threads);
		for (int rep = 0; rep < 3; rep++) {
			final double g1 = time(threads, new GaussianModel(), o, gl), t1 = time(threads, new GibsonLanniModel(), o, gl);
			final double g2 = time(threads, new GaussianModel(), o, bw), t2 = time(threads, new BornWolfModel(), o, bw);
			System.out.println(String.format(Locale.ROOT, "run %d: Gibson & Lanni 65x129x129 %.3f s (%.0f x Gaussian %.4f s); Born & Wolf 65x257x257 %.3f s (%.0f x Gaussian %.4f s)",
					rep, t1, t1 / g1, g1, t2, t2 / g2, g2));
		}
	}

	private static double time(final int threads, final PsfModel m, final Optics o, final PsfGrid g) {
		final long t0 = System.nanoTime();
		final Volume v = Parallelization.runWithNumThreads(threads, () -> m.compute(o, g));
		final double s = (System.nanoTime() - t0) * 1e-9;
		if (!(Math.abs(v.sum() - 1) < 1e-5)) throw new IllegalStateException("PSF does not sum to 1");
		return s;
	}
}
