package org.parfocal.blind;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import net.imglib2.parallel.Parallelization;

import org.parfocal.conv.Acquisition;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.Level;
import org.parfocal.demo.SampleScene;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Benchmark of the goals of the model fit (not a unit test): on simulations made with the project's own
 * Gibson &amp; Lanni model (so not independent data), the object's PSNR gain of blind deconvolution with a model
 * fit (and with the refinement) against non-blind RL with the true PSF at the same iterations, the final PSF's
 * FWHM against the true PSF's, and the fit's cost. Scenes: the invented cell of {@link SampleScene},
 * {@code nz × nxy × nxy}, background 3, Poisson noise.
 * <ol>
 * <li>the sample optics (water 1.2, n<sub>s</sub> 1.38 at 4 µm), Gaussian starts 30 % too narrow and too wide;</li>
 * <li>the same objective, n<sub>s</sub> 1.45 at 6 µm simulated, nominal optics with n<sub>s</sub> 1.33 assumed.</li>
 * </ol>
 * {@code bin/parfocal-bench blind-fit [nz] [nxy] [iterations] [threads]}
 */
public final class BlindFitBenchmark {

	private BlindFitBenchmark() {}

	static final VoxelSize V = SampleScene.VOXEL;

	public static void main(final String[] a) {
		final int nz = a.length > 0 ? Integer.parseInt(a[0]) : 24, nxy = a.length > 1 ? Integer.parseInt(a[1]) : 80;
		final int iters = a.length > 2 ? Integer.parseInt(a[2]) : 40, threads = a.length > 3 ? Integer.parseInt(a[3]) : 2;
		System.out.printf(Locale.ROOT, "Parfocal blind model-fit benchmark: %d x %d x %d, %d iterations, %d threads (simulated with Parfocal's own Gibson & Lanni model)%n",
				nxy, nxy, nz, iters, threads);
		final Optics sample = Optics.builder().na(SampleScene.NA).immersionIndex(SampleScene.IMMERSION_INDEX).sampleIndex(SampleScene.SAMPLE_INDEX)
				.depth(SampleScene.DEPTH_UM).emissionWavelength(SampleScene.EMISSION_UM).build();
		final Optics deep = sample.toBuilder().sampleIndex(1.45).depth(6).build();
		final Optics nominal = deep.toBuilder().sampleIndex(1.33).build();
		Parallelization.runWithNumThreads(threads, () -> {
			final Scene s1 = scene(sample, nz, nxy);
			final double fx = Fwhm.lateral(s1.psf), fz = Fwhm.axial(s1.psf);
			System.out.printf(Locale.ROOT, "scene 1 true PSF FWHM %.4f x %.4f um%n", fx, fz);
			for (final double f : new double[] { 0.7, 1.3 })
				for (final boolean refine : new boolean[] { false, true })
					report("scene 1, Gaussian start x" + f + (refine ? ", refined" : ", model"), s1, iters,
							BlindOptions.of(PsfStart.gaussian(f * fx, f * fz), null).withBackground(Level.of(3)).withRegularization(0, 0), refine ? FitPlan.refined() : FitPlan.model());
			final Scene s2 = scene(deep, nz, nxy);
			System.out.printf(Locale.ROOT, "scene 2 true PSF FWHM %.4f x %.4f um%n", Fwhm.lateral(s2.psf), Fwhm.axial(s2.psf));
			final BlindOptions bo = BlindOptions.of(PsfStart.model("gibson-lanni"), nominal).withBackground(Level.of(3)).withRegularization(0, 0)
					.withConstraints(false, false, true);
			// non-blind with the nominal optics on the same box rule
			final Volume nominalPsf = PsfModels.get("gibson-lanni").compute(nominal, new PsfGrid(s2.psf.nx(), s2.psf.ny(), s2.psf.nz(), V.dx(), V.dy(), V.dz()));
			final double nom = gain(s2, Deconvolution.run(s2.recorded, nominalPsf, DeconvolutionOptions.of(DeconvolutionMethod.RL, iters).withBackground(Level.of(3)), Monitor.NONE).estimate());
			System.out.printf(Locale.ROOT, "scene 2 non-blind RL with the nominal optics (ns 1.33): gain %+.2f dB%n", nom);
			for (final boolean refine : new boolean[] { false, true })
				report("scene 2, nominal optics ns 1.33" + (refine ? ", refined" : ", model"), s2, iters, bo, refine ? FitPlan.refined() : FitPlan.model());
			return null;
		});
	}

	record Scene(Volume truth, Volume psf, Volume recorded, double trueGain) {}

	static Scene scene(final Optics o, final int nz, final int nxy) {
		final int kz = nz % 2 == 1 ? nz : nz - 1, kxy = Math.min(nxy % 2 == 1 ? nxy : nxy - 1, 61);
		final Volume psf = PsfModels.get("gibson-lanni").compute(o, new PsfGrid(kxy, kxy, kz, V.dx(), V.dy(), V.dz()));
		final Volume truth = SampleScene.cell(nxy, nxy, nz, 7);
		final Volume y = new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.ZERO, true, 3, 1, 11, 0)).record(truth, Monitor.NONE);
		return new Scene(truth, psf, y, Double.NaN);
	}

	static void report(final String name, final Scene s, final int iters, final BlindOptions o, final FitPlan plan) {
		final long t0 = System.nanoTime();
		final BlindResult r = BlindDeconvolution.run(s.recorded, o.withIterations(iters).withSnapshotInterval(iters), plan, Monitor.NONE, BlindListener.NONE);
		final double secs = (System.nanoTime() - t0) * 1e-9;
		final int[] k = r.psf().shape();
		final long t1 = System.nanoTime();
		final Volume trueOnBox = Psfs.normalized(Psfs.resizeCentered(s.psf, k[0], k[1], k[2]));
		final double gTrue = gain(s, Deconvolution.run(s.recorded, trueOnBox, DeconvolutionOptions.of(DeconvolutionMethod.RL, iters).withBackground(Level.of(3)), Monitor.NONE).estimate());
		final double tNb = (System.nanoTime() - t1) * 1e-9;
		final double gFull = gain(s, Deconvolution.run(s.recorded, s.psf, DeconvolutionOptions.of(DeconvolutionMethod.RL, iters).withBackground(Level.of(3)), Monitor.NONE).estimate());
		final double g = gain(s, r.estimate());
		final double lx = Fwhm.lateral(r.psf()) / Fwhm.lateral(s.psf) - 1, lz = Fwhm.axial(r.psf()) / Fwhm.axial(s.psf) - 1;
		System.out.printf(Locale.ROOT, "%s: box %dx%dx%d; %s%n", name, k[0], k[1], k[2], r.fit().summary());
		System.out.printf(Locale.ROOT, "   gain %+.2f dB vs non-blind true PSF on the same box %+.2f dB (full true PSF %+.2f): %+.2f dB; FWHM %+.1f %% lateral, %+.1f %% axial; "
				+ "%d candidates, fit %.1f s, whole run %.1f s = %.1f non-blind runs%n", g, gTrue, gFull, g - gTrue, 100 * lx, 100 * lz, r.fit().evaluations(), r.fit().seconds(), secs, secs / tNb);
		if (!r.refinement().isEmpty()) {
			final long kept = r.refinement().stream().filter(RefineStep::accepted).count();
			System.out.printf(Locale.ROOT, "   refinement: %d of %d steps kept; last: %s%n", kept, r.refinement().size(), r.refinement().get(r.refinement().size() - 1).reason());
		}
		for (final String n : r.notes()) if (n.contains("shallow") || n.contains("bound") || n.contains("cap") || n.contains("curved")) System.out.println("   note: " + n);
	}

	/** PSNR(truth, estimate) − PSNR(truth, recording − background), dB. */
	static double gain(final Scene s, final Volume est) {
		final Volume base = s.recorded.copy();
		final float[] b = base.data();
		for (int i = 0; i < b.length; i++) b[i] -= 3;
		return BlindScenes.psnr(s.truth, est) - BlindScenes.psnr(s.truth, base);
	}
}
