package org.parfocal.blind;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import net.imglib2.parallel.Parallelization;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.Level;
import org.parfocal.demo.SampleScene;
import org.parfocal.psf.Optics;

/**
 * Benchmark (not a unit test): seconds per outer iteration of blind deconvolution (defaults: one object and one
 * PSF update, band limit, centring) on a 64 × 256 × 256 recording of the invented sample scene, against one
 * non-blind RL-TV iteration with a PSF of the same box, measured in the same run (target ratio ≤ 2.5).
 * Per-iteration times are medians of the intervals between successive iterations (setup excluded).
 * <p>
 * {@code java -Xmx8g -cp target/classes:target/test-classes:<deps> org.parfocal.blind.BlindBenchmark [threads] [iterations]}
 */
public final class BlindBenchmark {

	private BlindBenchmark() {}

	public static void main(final String[] args) {
		final int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2, iterations = args.length > 1 ? Integer.parseInt(args[1]) : 8;
		System.out.printf(Locale.ROOT, "Parfocal blind benchmark: Java %s, %d threads, %d iterations, max heap %s%n", System.getProperty("java.version"),
				threads, iterations, org.parfocal.core.MemoryBudget.format(Runtime.getRuntime().maxMemory()));
		final Optics optics = Optics.builder().na(SampleScene.NA).immersionIndex(SampleScene.IMMERSION_INDEX).sampleIndex(SampleScene.SAMPLE_INDEX)
				.depth(SampleScene.DEPTH_UM).emissionWavelength(SampleScene.EMISSION_UM).build();
		final Volume truth = SampleScene.cell(256, 256, 64, 5);
		final BlindOptions blind = BlindOptions.of(PsfStart.model("gibson-lanni"), optics).withBackground(Level.of(3)).withIterations(iterations)
				.withSnapshotInterval(iterations);
		final int[] box = BlindDeconvolution.box(truth, blind);
		final Volume psf = BlindDeconvolution.startingPsf(truth, blind, new ArrayList<>());
		final Volume y = new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.ZERO, true, 3, 1, 9, 0)).record(truth, Monitor.NONE);
		System.out.printf(Locale.ROOT, "image 256 x 256 x 64, PSF box %d x %d x %d%n", box[0], box[1], box[2]);
		Parallelization.runWithNumThreads(threads, () -> {
			final List<Long> rl = new ArrayList<>(), bl = new ArrayList<>();
			final DeconvolutionOptions d = DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, iterations).withBackground(Level.of(3));
			for (int round = 0; round < 2; round++) { // the first round warms up the JIT
				rl.clear();
				bl.clear();
				Deconvolution.run(y, psf, d, null, Monitor.NONE, (rep, v) -> rl.add(System.nanoTime()));
				BlindDeconvolution.run(y, blind.withStart(PsfStart.gaussian(0.7 * 0.233, 0.7 * 0.65)), Monitor.NONE, (rep, x, h) -> bl.add(System.nanoTime()));
			}
			final double tRl = median(rl), tBlind = median(bl);
			System.out.printf(Locale.ROOT, "non-blind RL-TV iteration  %.3f s%n", tRl);
			System.out.printf(Locale.ROOT, "blind outer iteration      %.3f s  (1 object + 1 PSF update)%n", tBlind);
			System.out.printf(Locale.ROOT, "ratio                      %.2f  (target <= 2.5)%n", tBlind / tRl);
			// the refinement after a model fit: the same updates on the first half of a Poisson thinning, validated
			// on the second, inside the trust region (its block checks and the model fit are reported apart)
			final float[] data = y.data().clone();
			for (int i = 0; i < data.length; i++) data[i] = Math.max(0, data[i]);
			final float[][] halves = ModelFit.split(data, 1);
			final double[] um = { SampleScene.VOXEL.dx(), SampleScene.VOXEL.dy(), SampleScene.VOXEL.dz() };
			final PsfConstraints c = new PsfConstraints(box[0], box[1], box[2], um[0], um[1], um[2], OtfSupport.widefield(optics), false, true, psf.data());
			c.trustRegion(psf.data(), FitPlan.DEFAULT_TRUST_RADIUS);
			final BlindSolver r = new BlindSolver(psf, truth.shape(), org.parfocal.deconv.EdgeMode.NON_CIRCULANT, halves[0], 1.5, BlindOptions.DEFAULT_OBJECT_TV, 0, c);
			r.validateWith(halves[1]);
			final List<Long> rf = new ArrayList<>();
			for (int it = 0; it < iterations + 2; it++) {
				r.objectUpdate(() -> {});
				r.psfUpdate(() -> {});
				if (it >= 1) rf.add(System.nanoTime());
			}
			final double tRef = median(rf);
			System.out.printf(Locale.ROOT, "refinement outer iteration %.3f s  (1 object + 1 PSF update, validation half, trust region)%n", tRef);
			System.out.printf(Locale.ROOT, "ratio                      %.2f  (target <= 2.5)%n", tRef / tRl);
			return null;
		});
	}

	private static double median(final List<Long> stamps) {
		final double[] d = new double[stamps.size() - 1];
		for (int i = 1; i < stamps.size(); i++) d[i - 1] = (stamps.get(i) - stamps.get(i - 1)) * 1e-9;
		Arrays.sort(d);
		return d.length % 2 == 1 ? d[d.length / 2] : 0.5 * (d[d.length / 2 - 1] + d[d.length / 2]);
	}
}
