package org.parfocal.blind;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.parfocal.testing.TestVolumes.assertClose;
import static org.parfocal.testing.TestVolumes.assertMessage;
import static org.parfocal.testing.TestVolumes.toDouble;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.concurrent.atomic.AtomicInteger;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.psf.Fwhm;

/**
 * Blind deconvolution on synthetic data of our own ({@link BlindScenes}: the project's optics model and
 * acquisition model). References: the true PSF's FWHM (measured with {@link Fwhm} like the estimate), the
 * non-blind engine run with the true PSF, the Richardson–Lucy flux identity, and the definition of the
 * widefield OTF support.
 */
class BlindDeconvolutionTest {

	/** The test budget: the defaults' 30 outer iterations of one object and one PSF update. */
	private static final int ITERATIONS = BlindOptions.DEFAULT_ITERATIONS;

	private static BlindOptions options(final PsfStart start) {
		return BlindOptions.of(start, BlindScenes.optics()).withBackground(Level.of(BlindScenes.BACKGROUND));
	}

	private static final double TRUE_FWHM_XY = Fwhm.lateral(BlindScenes.TRUE_PSF), TRUE_FWHM_Z = Fwhm.axial(BlindScenes.TRUE_PSF);

	private static double reference = Double.NaN;

	/** Non-blind RL-TV (same weight, same 30 object updates) with the true PSF on the blind run's support box. */
	private static synchronized double nonBlindPsnr() {
		if (!Double.isNaN(reference)) return reference;
		final int[] box = BlindDeconvolution.box(BlindScenes.RECORDED, options(PsfStart.model("gibson-lanni")));
		final Volume est = Deconvolution.run(BlindScenes.RECORDED, BlindScenes.truePsfOn(box), DeconvolutionOptions.of(DeconvolutionMethod.RL_TV,
				ITERATIONS).withRegularization(BlindOptions.DEFAULT_OBJECT_TV).withBackground(Level.of(BlindScenes.BACKGROUND)), Monitor.NONE).estimate();
		reference = BlindScenes.psnr(BlindScenes.TRUTH, est);
		return reference;
	}

	/**
	 * Starts 30 % too narrow and 30 % too wide, as the Gibson &amp; Lanni model at 0.7 λ and 1.3 λ (every width of
	 * the PSF scales with λ; the depth-induced focal shift, which is geometric, stays): the final lateral and
	 * axial FWHM are within 10 % of the true PSF's, the deblurred PSNR within 1 dB of non-blind RL-TV with the
	 * true PSF, and no snapshot collapses or spreads.
	 */
	@Test
	void recoversTheWidthFromModelStartsThirtyPercentOff() {
		final double reference = nonBlindPsnr();
		for (final double f : new double[] { 0.7, 1.3 }) {
			final int[] box = BlindDeconvolution.box(BlindScenes.RECORDED, options(PsfStart.model("gibson-lanni")));
			final Volume start = BlindScenes.psf(BlindScenes.optics(f * BlindScenes.optics().emissionWavelength()), box[0], box[2]);
			checkRecovery("model x" + f, options(PsfStart.given(start)), reference);
		}
	}

	/** The same with separable Gaussian starts of 0.7 and 1.3 times the true FWHMs (centred on the box). */
	@Test
	void recoversTheWidthFromGaussianStartsThirtyPercentOff() {
		final double reference = nonBlindPsnr();
		for (final double f : new double[] { 0.7, 1.3 })
			checkRecovery("Gaussian x" + f, options(PsfStart.gaussian(f * TRUE_FWHM_XY, f * TRUE_FWHM_Z)), reference);
	}

	private static void checkRecovery(final String what, final BlindOptions o, final double reference) {
		final BlindResult r = BlindDeconvolution.run(BlindScenes.RECORDED, o, Monitor.NONE);
		final PsfSnapshot last = r.snapshots().get(r.snapshots().size() - 1);
		final double psnr = BlindScenes.psnr(BlindScenes.TRUTH, r.estimate());
		System.out.printf(Locale.ROOT, "blind %s: FWHM %.3f / %.3f µm (true %.3f / %.3f), PSNR %.2f dB (non-blind %.2f)%n", what, last.fwhmLateral(),
				last.fwhmAxial(), TRUE_FWHM_XY, TRUE_FWHM_Z, psnr, reference);
		assertEquals(ITERATIONS, last.iteration());
		assertEquals(TRUE_FWHM_XY, last.fwhmLateral(), 0.1 * TRUE_FWHM_XY, what + ": lateral FWHM");
		assertEquals(TRUE_FWHM_Z, last.fwhmAxial(), 0.1 * TRUE_FWHM_Z, what + ": axial FWHM");
		assertTrue(psnr >= reference - 1, what + ": PSNR " + psnr + " dB more than 1 dB below non-blind " + reference);
		assertEquals(ITERATIONS / BlindOptions.DEFAULT_SNAPSHOT_INTERVAL + 1, r.snapshots().size(), "snapshots at 0, 5, ..., 30");
		final double truePeak = BlindScenes.max(BlindScenes.TRUE_PSF);
		for (final PsfSnapshot s : r.snapshots()) {
			assertEquals(1, s.sum(), 1e-5, what + ": PSF sum at snapshot " + s.iteration());
			assertEquals(1, s.psf().sum(), 1e-5, what + ": PSF voxels sum at snapshot " + s.iteration());
			// no delta (FWHM below half the truth, one bright voxel) and no spreading (FWHM beyond 1.5 times the truth)
			for (final double[] w : new double[][] { { s.fwhmLateral(), TRUE_FWHM_XY }, { s.fwhmAxial(), TRUE_FWHM_Z } })
				assertTrue(w[0] > 0.5 * w[1] && w[0] < 1.5 * w[1], what + ": FWHM " + w[0] + " at snapshot " + s.iteration() + " vs true " + w[1]);
			if (s.iteration() > 0) assertTrue(BlindScenes.max(s.psf()) < 5 * truePeak, what + ": peak " + BlindScenes.max(s.psf()) + " at snapshot " + s.iteration());
		}
	}

	/** With the true PSF as start and no PSF updates, the result is the non-blind engine's, bit for bit (RL and RL-TV). */
	@Test
	void frozenPsfEqualsTheNonBlindEngineExactly() {
		final Volume psf = BlindScenes.truePsfOn(new int[] { 21, 21, 13 });
		for (final double tv : new double[] { 0, 0.002 }) {
			final BlindOptions o = options(PsfStart.given(psf)).withSchedule(2, 0).withIterations(6).withRegularization(tv, 0);
			final Volume blind = BlindDeconvolution.run(BlindScenes.RECORDED, o, Monitor.NONE).estimate();
			final DeconvolutionOptions d = DeconvolutionOptions.of(tv > 0 ? DeconvolutionMethod.RL_TV : DeconvolutionMethod.RL, 12).withRegularization(tv)
					.withBackground(Level.of(BlindScenes.BACKGROUND));
			final Volume ref = Deconvolution.run(BlindScenes.RECORDED, psf, d, Monitor.NONE).estimate();
			assertArrayEquals(ref.data(), blind.data(), "TV weight " + tv);
		}
	}

	/**
	 * Richardson–Lucy keeps the flux (with a unit-sum PSF and b = 0, Σ_i (Hx)_i = Σ y after every object
	 * update; for periodic edges Σ x = Σ y). The PSF updates, which are renormalised to unit sum, must not break it.
	 */
	@Test
	void objectFluxIsKeptAsInNonBlindRl() {
		final Volume y = BlindScenes.RECORDED;
		final double sumY = y.sum();
		final BlindOptions o = options(PsfStart.gaussian(0.8 * TRUE_FWHM_XY, 0.8 * TRUE_FWHM_Z)).withBackground(Level.NONE).withRegularization(0, 0)
				.withIterations(10);
		final List<BlindReport> periodic = new ArrayList<>(), extended = new ArrayList<>();
		final BlindResult p = BlindDeconvolution.run(y, o.withEdges(EdgeMode.PERIODIC), Monitor.NONE, (rep, x, h) -> periodic.add(rep));
		BlindDeconvolution.run(y, o, Monitor.NONE, (rep, x, h) -> extended.add(rep));
		assertEquals(10, periodic.size());
		for (final BlindReport r : periodic) assertEquals(sumY, r.estimateSum(), 1e-4 * sumY, "periodic: Σx after iteration " + r.iteration());
		assertEquals(sumY, p.estimate().sum(), 1e-4 * sumY, "periodic: Σ of the output");
		for (final BlindReport r : extended)
			assertEquals(sumY, r.modelSum(), 1e-4 * sumY, "non-circulant: Σ Hx after the object update of iteration " + r.iteration());
	}

	/** 1 and 2 threads agree within 1e-5 relative (the project rule). */
	@Test
	void oneAndTwoThreadsAgree() {
		final BlindOptions o = options(PsfStart.gaussian(1.2 * TRUE_FWHM_XY, 1.2 * TRUE_FWHM_Z)).withIterations(6).withRegularization(0.002, 0.001)
				.withConstraints(true, true, true);
		final BlindResult one = Parallelization.runWithNumThreads(1, () -> BlindDeconvolution.run(BlindScenes.RECORDED, o, Monitor.NONE));
		final BlindResult two = Parallelization.runWithNumThreads(2, () -> BlindDeconvolution.run(BlindScenes.RECORDED, o, Monitor.NONE));
		assertClose(toDouble(one.estimate().data()), two.estimate().data(), 1e-5, "object");
		assertClose(toDouble(one.psf().data()), two.psf().data(), 1e-5, "PSF");
	}

	/** Cylindrical symmetry: the estimate equals its own 90° rotation and mirror images (symmetry of a ring average). */
	@Test
	void symmetricPsfIsInvariantUnderRotation() {
		final BlindOptions o = options(PsfStart.gaussian(TRUE_FWHM_XY, TRUE_FWHM_Z)).withIterations(3).withConstraints(true, true, false);
		final Volume h = BlindDeconvolution.run(BlindScenes.RECORDED, o, Monitor.NONE).psf();
		final int k = h.nx();
		for (int z = 0; z < h.nz(); z++)
			for (int y = 0; y < k; y++)
				for (int x = 0; x < k; x++) {
					assertEquals(h.get(x, y, z), h.get(y, x, z), 1e-6 * BlindScenes.max(h), "transpose");
					assertEquals(h.get(x, y, z), h.get(k - 1 - x, y, z), 1e-6 * BlindScenes.max(h), "mirror");
				}
	}

	/**
	 * The band limit against its definition (McCutchen, J. Opt. Soc. Am. 54, 1964: the OTF is the
	 * autocorrelation of the pupil cap of radius n/λ and half-angle α): differences of random cap points never
	 * leave the kept region, and near the rim of the outer boundary they reach it. Lateral cutoff 2·NA/λ (the
	 * textbook incoherent cutoff).
	 */
	@Test
	void bandLimitMatchesTheAutocorrelationOfThePupilCap() {
		final OtfSupport s = OtfSupport.widefield(BlindScenes.optics());
		final double na = 1.2, lambda = 0.52, n = 1.333, rho = n / lambda, alpha = Math.asin(na / n);
		assertEquals(2 * na / lambda, s.lateralCutoff(), 1e-12);
		assertEquals(n * (1 - Math.cos(alpha)) / lambda, s.axialCutoff(), 1e-12);
		final java.util.Random r = new java.util.Random(3);
		final int bins = 40;
		final double[] reach = new double[bins];
		for (int i = 0; i < 400_000; i++) {
			final double t1 = alpha * Math.sqrt(r.nextDouble()), t2 = alpha * Math.sqrt(r.nextDouble());
			final double p1 = 2 * Math.PI * r.nextDouble(), p2 = 2 * Math.PI * r.nextDouble();
			final double kx = rho * (Math.sin(t1) * Math.cos(p1) - Math.sin(t2) * Math.cos(p2));
			final double ky = rho * (Math.sin(t1) * Math.sin(p1) - Math.sin(t2) * Math.sin(p2));
			final double kz = rho * (Math.cos(t1) - Math.cos(t2)), kr = Math.hypot(kx, ky);
			assertTrue(s.contains(kr, kz), "difference (" + kr + ", " + kz + ") outside the kept region");
			final int b = (int) (kr / s.lateralCutoff() * bins);
			if (b < bins) reach[b] = Math.max(reach[b], Math.abs(kz));
		}
		for (int b = bins / 2 + 1; b < bins - 1; b++) {
			final double kr = (b + 1.0) / bins * s.lateralCutoff();
			assertTrue(reach[b] > 0.9 * s.axialBound(kr), "bin " + b + ": sampled reach " + reach[b] + " vs bound " + s.axialBound(kr));
		}
		assertTrue(!s.contains(1.0001 * s.lateralCutoff(), 0), "beyond the lateral cutoff");
	}

	/** Progress once per outer iteration; cancelling ends the run with CancelledException and no result. */
	@Test
	void cancelStopsWithoutResultAndListenerSeesEveryIteration() {
		final AtomicInteger calls = new AtomicInteger();
		final BlindOptions o = options(PsfStart.gaussian(TRUE_FWHM_XY, TRUE_FWHM_Z)).withIterations(10);
		final Monitor cancelAfterTwo = new Monitor() {
			@Override
			public void progress(final int done, final int total, final String status) {
				calls.incrementAndGet();
			}

			@Override
			public boolean isCancelled() { return calls.get() > 2; }
		};
		final AtomicInteger seen = new AtomicInteger();
		assertThrows(Monitor.CancelledException.class, () -> BlindDeconvolution.run(BlindScenes.RECORDED, o, cancelAfterTwo, (rep, x, h) -> seen.incrementAndGet()));
		assertTrue(seen.get() <= 2, "no iteration after the cancel: " + seen.get());
		final List<Integer> iterations = new ArrayList<>();
		final BlindResult r = BlindDeconvolution.run(BlindScenes.RECORDED, o.withIterations(4).withSnapshotInterval(3), Monitor.NONE, (rep, x, h) -> {
			iterations.add(rep.iteration());
			assertEquals(BlindScenes.NX, x.nx());
			assertEquals(1, h.toVolume().sum(), 1e-5);
		});
		assertEquals(List.of(1, 2, 3, 4), iterations);
		assertEquals(List.of(0, 3, 4), r.snapshots().stream().map(PsfSnapshot::iteration).toList(), "start, every 3rd, last");
		assertEquals(0, r.snapshots().get(0).distanceToStart(), 0);
	}

	@Test
	void badInputsGiveOneLineMessagesAndNothingIsModified() {
		final Volume y = BlindScenes.RECORDED;
		final BlindOptions o = options(PsfStart.gaussian(TRUE_FWHM_XY, TRUE_FWHM_Z));
		assertMessage("larger than the image", () -> BlindDeconvolution.run(y, o.withSupport(new SupportBox(21, 21, 17)), Monitor.NONE));
		assertMessage("snapshot interval (40) is larger than the number of iterations (30)", () -> o.withSnapshotInterval(40));
		final Volume psf2d = Volume.zeros(9, 9, 1, VoxelSize.microns(0.08, 0.08, 0.2));
		psf2d.set(4, 4, 0, 1);
		assertMessage("The starting PSF is 2D but the image is 3D", () -> BlindDeconvolution.run(y, o.withStart(PsfStart.given(psf2d)), Monitor.NONE));
		final Volume uncalibrated = y.copy().withVoxelSize(VoxelSize.UNCALIBRATED);
		final Volume psf = BlindScenes.truePsfOn(new int[] { 11, 11, 7 });
		assertMessage("band-limit constraint needs the voxel size", () -> BlindDeconvolution.run(uncalibrated, o.withStart(PsfStart.given(psf)), Monitor.NONE));
		assertMessage("needs the optics", () -> new BlindOptions(1, 1, 1, 0, 0, PsfStart.given(psf), null, true, false, false, null, 1, null, null, null));
		assertMessage("between 0 and 0.1", () -> o.withRegularization(0.2, 0));
		assertMessage("odd sizes", () -> new SupportBox(4, 5, 5));
		// the inputs are untouched by a run
		final Volume yCopy = y.copy(), psfCopy = psf.copy();
		BlindDeconvolution.run(y, o.withStart(PsfStart.given(psf)).withIterations(2).withSnapshotInterval(1), Monitor.NONE);
		assertArrayEquals(yCopy.data(), y.data(), "image unchanged");
		assertArrayEquals(psfCopy.data(), psf.data(), "given PSF unchanged");
	}
}
