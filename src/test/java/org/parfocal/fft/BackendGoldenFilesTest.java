package org.parfocal.fft;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.util.Arrays;
import java.util.function.Supplier;

import org.junit.jupiter.api.Test;
import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.IterationListener;
import org.parfocal.testing.TestVolumes;

/**
 * The two FFT backends on the project's golden files, through the engines: SciPy's {@code fftconvolve}
 * (tools/golden/gen_fftconvolve.py) through {@link ConvolutionOperator}, and scikit-image's
 * {@code richardson_lucy} (tools/golden/gen_richardson_lucy.py, 20 iterations) through {@link Deconvolution}.
 * The backends agree within 1e-5 of the largest value, and each matches the reference as the engines' own
 * tests require.
 */
class BackendGoldenFilesTest {

	private static <T> T on(final FftBackend b, final Supplier<T> work) {
		final String old = System.getProperty(FftBackend.PROPERTY);
		System.setProperty(FftBackend.PROPERTY, b.key());
		try {
			return work.get();
		} finally {
			if (old == null) System.clearProperty(FftBackend.PROPERTY);
			else System.setProperty(FftBackend.PROPERTY, old);
		}
	}

	private static double[] doubles(final float[] a) {
		final double[] d = new double[a.length];
		for (int i = 0; i < a.length; i++) d[i] = a[i];
		return d;
	}

	@Test
	void scipyFftconvolveCasesAgreeOnBothBackends() {
		assumeTrue(FftBackend.FFTW.available());
		int cases = 0;
		for (final String line : TestVolumes.resourceLines("/golden/fftconvolve/manifest.tsv")) {
			if (line.startsWith("#") || line.isBlank()) continue;
			final String[] f = line.split("\t");
			final int[] n = { Integer.parseInt(f[2]), Integer.parseInt(f[3]), Integer.parseInt(f[4]) };
			final int[] k = { Integer.parseInt(f[5]), Integer.parseInt(f[6]), Integer.parseInt(f[7]) };
			final Volume x = Volume.wrap(TestVolumes.readF32("/golden/fftconvolve/" + f[0] + ".image.f32"), n[0], n[1], n[2], null);
			final Volume h = Volume.wrap(TestVolumes.readF32("/golden/fftconvolve/" + f[0] + ".psf.f32"), k[0], k[1], k[2], null);
			final double[] ref = doubles(TestVolumes.readF32("/golden/fftconvolve/" + f[0] + ".out.f32"));
			final Volume java = on(FftBackend.JAVA, () -> ConvolutionOperator.create(h, x, Boundary.parse(f[1])).apply(x));
			final Volume fftw = on(FftBackend.FFTW, () -> ConvolutionOperator.create(h, x, Boundary.parse(f[1])).apply(x));
			final Volume fftwAdjoint = on(FftBackend.FFTW, () -> ConvolutionOperator.create(h, x, Boundary.parse(f[1])).adjoint(x));
			final Volume javaAdjoint = on(FftBackend.JAVA, () -> ConvolutionOperator.create(h, x, Boundary.parse(f[1])).adjoint(x));
			TestVolumes.assertClose(ref, fftw.data(), 1e-5, "FFTW vs SciPy, " + f[0]);
			TestVolumes.assertClose(doubles(java.data()), fftw.data(), 1e-5, "FFTW vs JTransforms, " + f[0]);
			TestVolumes.assertClose(doubles(javaAdjoint.data()), fftwAdjoint.data(), 1e-5, "adjoint, FFTW vs JTransforms, " + f[0]);
			cases++;
		}
		assertEquals(15, cases, "every golden case must be checked");
	}

	@Test
	void scikitImageRichardsonLucyCasesAgreeOnBothBackends() {
		assumeTrue(FftBackend.FFTW.available());
		int cases = 0;
		for (final String line : TestVolumes.resourceLines("/golden/rl/manifest.tsv")) {
			if (line.startsWith("#") || line.isBlank()) continue;
			final String[] f = line.split("\t");
			final int iterations = Integer.parseInt(f[1]);
			final int[] n = { Integer.parseInt(f[2]), Integer.parseInt(f[3]), Integer.parseInt(f[4]) };
			final int[] k = { Integer.parseInt(f[5]), Integer.parseInt(f[6]), Integer.parseInt(f[7]) };
			final Volume image = Volume.wrap(TestVolumes.readF32("/golden/rl/" + f[0] + ".image.f32"), n[0], n[1], n[2], null);
			final Volume psf = Volume.wrap(TestVolumes.readF32("/golden/rl/" + f[0] + ".psf.f32"), k[0], k[1], k[2], null);
			final double[] ref = doubles(TestVolumes.readF32("/golden/rl/" + f[0] + ".out.f32"));
			final Volume start = Volume.zeros(n[0], n[1], n[2], null);
			Arrays.fill(start.data(), 0.5f);
			final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, iterations).withEdges(EdgeMode.ZERO);
			final Volume java = on(FftBackend.JAVA, () -> Deconvolution.run(image, psf, o, start, Monitor.NONE, IterationListener.NONE).estimate());
			final Volume fftw = on(FftBackend.FFTW, () -> Deconvolution.run(image, psf, o, start, Monitor.NONE, IterationListener.NONE).estimate());
			TestVolumes.assertClose(ref, fftw.data(), 1e-4, "FFTW vs scikit-image, " + f[0]);
			TestVolumes.assertClose(doubles(java.data()), fftw.data(), 1e-5, "FFTW vs JTransforms, " + f[0]);
			// the default edges (non-circulant) too, where the pruned paths and row hooks differ most
			final DeconvolutionOptions nc = DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, iterations).withRegularization(0.002);
			final Volume javaNc = on(FftBackend.JAVA, () -> Deconvolution.run(image, psf, nc, Monitor.NONE).estimate());
			final Volume fftwNc = on(FftBackend.FFTW, () -> Deconvolution.run(image, psf, nc, Monitor.NONE).estimate());
			TestVolumes.assertClose(doubles(javaNc.data()), fftwNc.data(), 1e-5, "RL-TV non-circulant, FFTW vs JTransforms, " + f[0]);
			cases++;
		}
		assertEquals(2, cases, "2D and 3D golden cases");
	}
}
