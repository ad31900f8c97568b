package org.parfocal.deconv;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.concurrent.atomic.AtomicInteger;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.fft.RealFft;

class DeconvolutionTest {

	private static DeconvolutionOptions rl(final int iterations, final EdgeMode edges) {
		return DeconvolutionOptions.of(DeconvolutionMethod.RL, iterations).withEdges(edges);
	}

	/** Noisy recording of an invented cell: y = Poisson(s·(h ∗ x + b))/s + offset (the project's acquisition model). */
	private static Volume record(final Volume object, final Volume psf, final double background, final double photons, final double offset,
			final long seed) {
		return new Acquisition(psf, object.shape(), new Acquisition.Options(Boundary.ZERO, true, background, photons, seed, offset)).record(object,
				Monitor.NONE);
	}

	/**
	 * Golden files from scikit-image's {@code richardson_lucy(image, psf, num_iter=20, clip=False)} (Debian
	 * python3-skimage 0.19.3), written by tools/golden/gen_richardson_lucy.py. Its model is zero boundary without
	 * normalisation ({@link EdgeMode#ZERO}) started from 0.5; its eps = 1e-12 added to Hx is below float
	 * resolution at these intensities. Tolerance: max |ours − ref| ≤ 1e-4 · max |ref|.
	 */
	@Test
	void plainRlMatchesScikitImage() {
		int cases = 0;
		for (final String line : resourceLines("/golden/rl/manifest.tsv")) {
			if (line.startsWith("#") || line.isBlank()) continue;
			final String[] f = line.split("\t");
			final int iterations = Integer.parseInt(f[1]);
			final int[] n = { Integer.parseInt(f[2]), Integer.parseInt(f[3]), Integer.parseInt(f[4]) };
			final int[] k = { Integer.parseInt(f[5]), Integer.parseInt(f[6]), Integer.parseInt(f[7]) };
			final Volume image = Volume.wrap(readF32("/golden/rl/" + f[0] + ".image.f32"), n[0], n[1], n[2], null);
			final Volume psf = Volume.wrap(readF32("/golden/rl/" + f[0] + ".psf.f32"), k[0], k[1], k[2], null);
			final float[] ref = readF32("/golden/rl/" + f[0] + ".out.f32");
			final Volume start = Volume.zeros(n[0], n[1], n[2], null);
			Arrays.fill(start.data(), 0.5f);
			final DeconvolutionResult r = Deconvolution.run(image, psf, rl(iterations, EdgeMode.ZERO), start, Monitor.NONE, IterationListener.NONE);
			assertEquals(iterations, r.iterations());
			assertClose(ref, r.estimate().data(), 1e-4, "skimage " + f[0]);
			cases++;
		}
		assertEquals(2, cases, "2D and 3D golden cases");
	}

	/**
	 * Flux (a known RL property with a unit-sum PSF and b = 0): Σ_k x(k) = Σ y at every iteration for
	 * circulant H; for non-circulant H the data window of H x carries it, Σ_i (Hx)_i = Σ y.
	 */
	@Test
	void fluxIsKeptAtEveryIteration() {
		final Volume object = Synthetic.cell(3, 40, 36, 12, 5, 20);
		final Volume psf = Synthetic.gaussianPsf(7, 7, 5, 1.3, 1.3, 1.1);
		final Volume y = record(object, psf, 0, 20, 0, 4);
		final double sumY = y.sum();
		final List<IterationReport> periodic = new ArrayList<>(), extended = new ArrayList<>();
		Deconvolution.run(y, psf, rl(15, EdgeMode.PERIODIC), null, Monitor.NONE, (rep, v) -> periodic.add(rep));
		Deconvolution.run(y, psf, rl(15, EdgeMode.NON_CIRCULANT), null, Monitor.NONE, (rep, v) -> extended.add(rep));
		assertEquals(15, periodic.size());
		for (final IterationReport r : periodic) assertEquals(sumY, r.estimateSum(), 1e-4 * sumY, "periodic: sum x at iteration " + r.iteration());
		for (final IterationReport r : extended.subList(1, extended.size()))
			assertEquals(sumY, r.modelSum(), 1e-4 * sumY, "non-circulant: sum Hx of the iterate entering iteration " + r.iteration());
	}

	/** Dey et al. 2006: with λ = 0 the RL-TV update is the RL update. */
	@Test
	void tvWithZeroWeightEqualsRlExactly() {
		final Volume object = Synthetic.cell(5, 32, 30, 10, 4, 15);
		final Volume psf = Synthetic.gaussianPsf(5, 5, 5, 1.2, 1.2, 1.0);
		final Volume y = record(object, psf, 1, 30, 0, 6);
		final DeconvolutionOptions o = rl(8, EdgeMode.NON_CIRCULANT).withBackground(Level.of(1));
		final Volume a = Deconvolution.run(y, psf, o, Monitor.NONE).estimate();
		final Volume b = Deconvolution.run(y, psf, o.withMethod(DeconvolutionMethod.RL_TV).withRegularization(0), Monitor.NONE).estimate();
		assertArrayEquals(a.data(), b.data());
	}

	/** Total variation (Rudin, Osher & Fatemi 1992) of the RL-TV result is below that of plain RL. */
	@Test
	void tvWeightLowersTotalVariation() {
		final Volume object = Synthetic.cell(7, 40, 40, 12, 4, 25);
		final Volume psf = Synthetic.gaussianPsf(7, 7, 5, 1.4, 1.4, 1.2);
		final Volume y = record(object, psf, 2, 5, 0, 8);
		final DeconvolutionOptions o = rl(20, EdgeMode.NON_CIRCULANT).withBackground(Level.of(2));
		final double tvRl = Synthetic.totalVariation(Deconvolution.run(y, psf, o, Monitor.NONE).estimate());
		final double tv = Synthetic.totalVariation(
				Deconvolution.run(y, psf, o.withMethod(DeconvolutionMethod.RL_TV).withRegularization(0.01), Monitor.NONE).estimate());
		assertTrue(tv < 0.9 * tvRl, "TV of RL-TV " + tv + " should be below TV of RL " + tvRl);
	}

	/**
	 * Biggs & Andrews 1997: vector extrapolation reaches the log-likelihood that plain RL has after 50 iterations
	 * in at most 25.
	 */
	@Test
	void acceleratedRlReachesFiftyIterationLikelihoodInHalf() {
		final Volume object = Synthetic.cell(9, 48, 44, 14, 3, 30);
		final Volume psf = Synthetic.gaussianPsf(9, 9, 7, 1.6, 1.6, 1.4);
		final Volume y = record(object, psf, 1, 50, 0, 10);
		final DeconvolutionOptions o = rl(50, EdgeMode.NON_CIRCULANT).withBackground(Level.of(1));
		final double target = Deconvolution.run(y, psf, o, Monitor.NONE).logLikelihood();
		final DeconvolutionResult acc = Deconvolution.run(y, psf, o.withMethod(DeconvolutionMethod.RL_ACCELERATED).withIterations(25), Monitor.NONE);
		assertTrue(acc.logLikelihood() >= target, "accelerated 25: " + acc.logLikelihood() + " vs plain 50: " + target);
		final double plain25 = Deconvolution.run(y, psf, o.withIterations(25), Monitor.NONE).logLikelihood();
		assertTrue(plain25 < target, "the test must be able to fail: plain RL after 25 is below its value after 50");
	}

	/**
	 * On a noisy recording of a known object (project acquisition model: Gaussian PSF, background 2, 10
	 * photons per unit, camera offset 100), RL-TV with estimated offset and background gives a higher PSNR
	 * against the object than the offset- and background-corrected input. Measured: input 32.3 dB, RL-TV
	 * (λ = 0.002, 50 iterations) about 37 dB; we require a gain of at least 3 dB.
	 */
	@Test
	void rlTvImprovesPsnrOnASyntheticCell() {
		final Volume object = Synthetic.smoothCell(11, 64, 64, 16, 3, 40);
		final Volume psf = Synthetic.gaussianPsf(9, 9, 7, 1.5, 1.5, 1.3);
		final double background = 2, offset = 100;
		final Volume y = record(object, psf, background, 10, offset, 12);
		final float[] corrected = y.data().clone();
		for (int i = 0; i < corrected.length; i++) corrected[i] -= (float) (offset + background);
		final double before = Synthetic.psnr(object, corrected);
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, 50).withRegularization(0.002).withOffset(Level.of(offset))
				.withBackground(Level.of(background));
		final DeconvolutionResult r = Deconvolution.run(y, psf, o, Monitor.NONE);
		final double after = Synthetic.psnr(object, r.estimate().data());
		System.out.printf(java.util.Locale.ROOT, "RL-TV PSNR: input %.2f dB, result %.2f dB, gain %.2f dB%n", before, after, after - before);
		assertTrue(after - before >= 3, "PSNR gain " + (after - before) + " dB (input " + before + ", result " + after + ")");
	}

	/**
	 * Wiener with μ = 1e-7 on noise-free periodic data: within the band where |Ĥ|² ≥ 1e-3 the spectrum of the
	 * result equals the object's (definition of the inverse filter; oracle: the object's own spectrum via
	 * RealFft, itself checked against the DFT definition).
	 */
	@Test
	void wienerInvertsNoiseFreeBlurWithinTheBandLimit() {
		final int nx = 48, ny = 40, nz = 1;
		final Volume object = Synthetic.smoothCell(13, nx, ny, nz, 5, 25);
		final Volume psf = Synthetic.gaussianPsf(9, 9, 1, 1.2, 1.2, 1);
		final Volume y = ConvolutionOperator.create(psf, object, Boundary.PERIODIC).apply(object);
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.WIENER, 1).withRegularization(1e-7).withEdges(EdgeMode.PERIODIC);
		final Volume est = Deconvolution.run(y, psf, o, Monitor.NONE).estimate();
		final RealFft fft = new RealFft(nx, ny, nz);
		final float[] so = fft.newSpectrum(), se = fft.newSpectrum(), sh = fft.newSpectrum();
		fft.forward(object.data(), so);
		fft.forward(est.data(), se);
		final float[] kernel = new float[nx * ny];
		for (int j = 0; j < 9; j++)
			for (int i = 0; i < 9; i++) kernel[Math.floorMod(i - 4, nx) + nx * Math.floorMod(j - 4, ny)] = psf.get(i, j, 0);
		fft.forward(kernel, sh);
		double err = 0, norm = 0;
		int inBand = 0;
		for (int j = 0; j < so.length / 2; j++) {
			final double h2 = sh[2 * j] * sh[2 * j] + sh[2 * j + 1] * sh[2 * j + 1];
			if (h2 < 1e-3) continue;
			inBand++;
			err += Math.hypot(se[2 * j] - so[2 * j], se[2 * j + 1] - so[2 * j + 1]);
			norm += Math.hypot(so[2 * j], so[2 * j + 1]);
		}
		assertTrue(inBand > 100, "band has " + inBand + " frequencies");
		assertTrue(err / norm < 1e-3, "relative spectral error in band " + err / norm);
	}

	/** Every method gives the same result with 1 and 2 threads (within 1e-5 relative; in fact bitwise). */
	@Test
	void oneAndTwoThreadsAgree() {
		final Volume object = Synthetic.cell(15, 36, 34, 11, 3, 20);
		final Volume psf = Synthetic.gaussianPsf(7, 7, 5, 1.3, 1.3, 1.1);
		final Volume y = record(object, psf, 1, 20, 100, 16);
		for (final DeconvolutionMethod m : DeconvolutionMethod.values()) {
			final DeconvolutionOptions o = DeconvolutionOptions.of(m, 6).withOffset(Level.ESTIMATED).withBackground(Level.ESTIMATED);
			final DeconvolutionResult a = Parallelization.runSingleThreaded(() -> Deconvolution.run(y, psf, o, Monitor.NONE));
			final DeconvolutionResult b = Parallelization.runWithNumThreads(2, () -> Deconvolution.run(y, psf, o, Monitor.NONE));
			assertClose(a.estimate().data(), b.estimate().data(), 1e-5, m.key());
			if (m.isIterative()) assertEquals(a.logLikelihood(), b.logLikelihood(), 1e-9 * Math.abs(a.logLikelihood()), m.key());
		}
	}

	@Test
	void relativeChangeRuleStopsEarly() {
		final Volume object = Synthetic.cell(17, 32, 32, 8, 4, 10);
		final Volume psf = Synthetic.gaussianPsf(5, 5, 3, 1.1, 1.1, 0.9);
		final Volume y = record(object, psf, 0, 50, 0, 18);
		final DeconvolutionResult r = Deconvolution.run(y, psf, rl(500, EdgeMode.NON_CIRCULANT).withRelativeChangeStop(0.01), Monitor.NONE);
		assertTrue(r.converged() && r.iterations() < 500, "stopped after " + r.iterations());
		final List<IterationReport> h = r.history();
		assertTrue(h.get(h.size() - 1).relativeChange() < 0.01);
		for (int i = 0; i < h.size() - 1; i++) assertTrue(h.get(i).relativeChange() >= 0.01, "did not stop at the first small change");
	}

	/** The listener's view at the last iteration is the returned estimate, and the log-likelihood grows (EM property). */
	@Test
	void listenerSeesEveryIterate() {
		final Volume object = Synthetic.cell(19, 30, 28, 9, 4, 10);
		final Volume psf = Synthetic.gaussianPsf(5, 5, 3, 1.1, 1.1, 0.9);
		final Volume y = record(object, psf, 1, 30, 0, 20);
		final List<Volume> seen = new ArrayList<>();
		final List<Double> ll = new ArrayList<>();
		final DeconvolutionResult r = Deconvolution.run(y, psf, rl(7, EdgeMode.NON_CIRCULANT).withBackground(Level.of(1)), null, Monitor.NONE,
				(rep, v) -> {
					seen.add(v.toVolume());
					ll.add(rep.logLikelihood());
				});
		assertEquals(7, seen.size());
		assertArrayEquals(r.estimate().data(), seen.get(6).data());
		for (int i = 1; i < ll.size(); i++) assertTrue(ll.get(i) >= ll.get(i - 1), "log-likelihood decreased at iteration " + (i + 1));
		assertTrue(r.logLikelihood() >= ll.get(6));
	}

	@Test
	void cancellationStopsWithoutOutputAndLeavesInputUntouched() {
		final Volume object = Synthetic.cell(21, 30, 28, 9, 4, 10);
		final Volume psf = Synthetic.gaussianPsf(5, 5, 3, 1.1, 1.1, 0.9);
		final Volume y = record(object, psf, 1, 30, 0, 22);
		final Volume copy = y.copy(), psfCopy = psf.copy();
		final AtomicInteger iterations = new AtomicInteger();
		final Monitor m = new Monitor() {
			@Override
			public boolean isCancelled() { return iterations.get() >= 3; }
		};
		assertThrows(Monitor.CancelledException.class,
				() -> Deconvolution.run(y, psf, rl(50, EdgeMode.NON_CIRCULANT), null, m, (rep, v) -> iterations.incrementAndGet()));
		assertEquals(3, iterations.get());
		assertEquals(copy, y);
		assertEquals(psfCopy, psf);
		// an interrupt also cancels
		Thread.currentThread().interrupt();
		try {
			assertThrows(Monitor.CancelledException.class, () -> Deconvolution.run(y, psf, rl(5, EdgeMode.NON_CIRCULANT), Monitor.NONE));
		} finally {
			Thread.interrupted();
		}
	}

	@Test
	void offsetAndBackgroundEstimates() {
		final Volume object = Synthetic.cell(23, 64, 64, 8, 0, 30);
		final Volume psf = Synthetic.gaussianPsf(5, 5, 3, 1.1, 1.1, 0.9);
		final Volume y = record(object, psf, 12, 5, 0, 24);
		// Background of a sparse specimen: within 5 % of the true level (sigma-clipped median, from memory).
		assertEquals(12, Preprocessing.estimateBackground(y.data()), 0.6);
		// Offset: a dark border of zero-light voxels (a masked region) at offset 100 is found exactly.
		final Volume withOffset = y.copy();
		final float[] d = withOffset.data();
		for (int i = 0; i < d.length; i++) d[i] = (i % 64 < 4 ? 0 : d[i]) + 100;
		assertEquals(100, Preprocessing.estimateOffset(withOffset), 0);
		final DeconvolutionResult r = Deconvolution.run(withOffset, psf,
				rl(2, EdgeMode.NON_CIRCULANT).withOffset(Level.ESTIMATED).withBackground(Level.ESTIMATED), Monitor.NONE);
		assertEquals(100, r.offset(), 0);
		assertTrue(r.notes().stream().anyMatch(s -> s.startsWith("Camera offset estimated")), r.notes().toString());
		assertTrue(r.notes().stream().anyMatch(s -> s.startsWith("Background estimated")), r.notes().toString());
	}

	@Test
	void psfIsNormalisedAndClippedWithNotes() {
		final Volume object = Synthetic.cell(25, 24, 24, 6, 4, 10);
		final Volume psf = Synthetic.gaussianPsf(5, 5, 3, 1.1, 1.1, 0.9);
		final Volume y = record(object, psf, 0, 0, 0, 0);
		final Volume scaled = psf.copy();
		for (int i = 0; i < scaled.size(); i++) scaled.data()[i] *= 7;
		scaled.set(0, 0, 0, -0.01f);
		final Volume scaledCopy = scaled.copy();
		final DeconvolutionResult r = Deconvolution.run(y, scaled, rl(3, EdgeMode.PERIODIC), Monitor.NONE);
		assertEquals(scaledCopy, scaled, "PSF untouched");
		assertTrue(r.notes().stream().anyMatch(s -> s.contains("scaled to unit sum")), r.notes().toString());
		assertTrue(r.notes().stream().anyMatch(s -> s.contains("1 negative values")), r.notes().toString());
		final Volume psfZeroCorner = psf.copy();
		psfZeroCorner.set(0, 0, 0, 0);
		final DeconvolutionResult ref = Deconvolution.run(y, psfZeroCorner, rl(3, EdgeMode.PERIODIC), Monitor.NONE);
		assertClose(ref.estimate().data(), r.estimate().data(), 1e-5, "normalised PSF gives the same result");
	}

	@Test
	void badInputsGetOneLineMessages() {
		final Volume img = Synthetic.cell(27, 20, 20, 6, 4, 5), psf = Synthetic.gaussianPsf(5, 5, 3, 1, 1, 1);
		assertMessage("Iterations must be between 1 and 10000, got 0", () -> DeconvolutionOptions.of(DeconvolutionMethod.RL, 0));
		assertMessage("Iterations must be between 1 and 10000, got 10001", () -> DeconvolutionOptions.of(DeconvolutionMethod.RL, 10001));
		assertMessage("regularisation weight must be 0 or more", () -> DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, 5).withRegularization(-0.1));
		assertMessage("at most 0.1", () -> DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, 5).withRegularization(0.5));
		assertMessage("Wiener filter needs a regularisation weight above 0", () -> DeconvolutionOptions.of(DeconvolutionMethod.WIENER, 1).withRegularization(0));
		assertMessage("relative-change threshold", () -> DeconvolutionOptions.of(DeconvolutionMethod.RL, 5).withRelativeChangeStop(0));
		assertMessage("background must be 0 or more", () -> DeconvolutionOptions.of(DeconvolutionMethod.RL, 5).withBackground(Level.of(-1)));
		final DeconvolutionOptions o = rl(3, EdgeMode.NON_CIRCULANT);
		assertMessage("larger than the image", () -> Deconvolution.run(img, Synthetic.gaussianPsf(21, 5, 3, 1, 1, 1), o, Monitor.NONE));
		assertMessage("PSF is 2D but the image is 3D", () -> Deconvolution.run(img, Synthetic.gaussianPsf(5, 5, 1, 1, 1, 1), o, Monitor.NONE));
		assertMessage("image is all zero", () -> Deconvolution.run(Volume.zeros(20, 20, 6, null), psf, o, Monitor.NONE));
		final Volume nan = img.copy();
		nan.set(3, 4, 2, Float.NaN);
		final Volume nanCopy = nan.copy();
		assertMessage("non-finite value (NaN) at (3, 4, 2)", () -> Deconvolution.run(nan, psf, o, Monitor.NONE));
		assertArrayEquals(nanCopy.data(), nan.data(), "input untouched");
		assertMessage("PSF has no positive values", () -> Deconvolution.run(img, Volume.zeros(5, 5, 3, null), o, Monitor.NONE));
		assertMessage("at or below the camera offset", () -> Deconvolution.run(img, psf, o.withOffset(Level.of(1e6)), Monitor.NONE));
		assertMessage("background", () -> Deconvolution.run(img, psf, o.withBackground(Level.of(1e6)), Monitor.NONE));
		assertMessage("Unknown method 'magic'", () -> DeconvolutionMethod.parse("magic"));
	}

	// -- helpers --

	static void assertMessage(final String expected, final org.junit.jupiter.api.function.Executable call) {
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
		assertTrue(e.getMessage().contains(expected), () -> "message '" + e.getMessage() + "' should contain '" + expected + "'");
		assertFalse(e.getMessage().contains("\n"), "one line");
	}

	/** Max |ref − got| ≤ tol · max |ref|; the failure names the worst voxel. */
	static void assertClose(final float[] ref, final float[] got, final double tol, final String what) {
		assertEquals(ref.length, got.length, what + ": length");
		double scale = 0, err = 0;
		int worst = 0;
		for (int i = 0; i < ref.length; i++) {
			scale = Math.max(scale, Math.abs(ref[i]));
			final double e = Math.abs((double) ref[i] - got[i]);
			if (e > err) {
				err = e;
				worst = i;
			}
		}
		final double rel = err / scale;
		final int w = worst;
		assertTrue(rel <= tol, () -> what + ": relative error " + rel + " at index " + w + " (ref " + ref[w] + ", got " + got[w] + ")");
	}

	static float[] readF32(final String resource) {
		try (InputStream in = DeconvolutionTest.class.getResourceAsStream(resource)) {
			if (in == null) throw new IllegalStateException("missing test resource " + resource);
			final ByteBuffer bb = ByteBuffer.wrap(in.readAllBytes()).order(ByteOrder.LITTLE_ENDIAN);
			final float[] f = new float[bb.remaining() / 4];
			bb.asFloatBuffer().get(f);
			return f;
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
	}

	static List<String> resourceLines(final String resource) {
		try (InputStream in = DeconvolutionTest.class.getResourceAsStream(resource)) {
			if (in == null) throw new IllegalStateException("missing test resource " + resource);
			return List.of(new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n"));
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
	}
}
