package org.parfocal.fft;

import static org.bytedeco.fftw.global.fftw3.FFTW_ESTIMATE;
import static org.bytedeco.fftw.global.fftw3.FFTW_MEASURE;
import static org.bytedeco.fftw.global.fftw3.fftwf_destroy_plan;
import static org.bytedeco.fftw.global.fftw3.fftwf_execute;
import static org.bytedeco.fftw.global.fftw3.fftwf_init_threads;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_c2r_3d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_r2c_3d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_with_nthreads;

import java.util.Arrays;

import org.bytedeco.fftw.global.fftw3.fftwf_plan;
import org.bytedeco.javacpp.FloatPointer;

/**
 * For benchmarks: the physical floor of one RL iteration, FFTW's own whole-volume 3D r2c + c2r plans (FFTW's
 * threads) on a native in-place grid, 2 forward + 2 inverse, no copies and no pointwise work. The same
 * figure as {@code tools/bench/fftw_twin.py} measures through pyfftw.
 */
public final class FftwBound {

	private FftwBound() {}

	/** {planning seconds, median wall seconds of 4 transforms, median CPU seconds of the calling thread} for an nx × ny × nz grid; null if FFTW does not load. */
	public static double[] fourTransforms(final int nx, final int ny, final int nz, final int threads, final boolean measure) {
		if (!FftBackend.FFTW.available()) return null;
		final long n = 2L * (nx / 2 + 1) * ny * nz;
		try (FloatPointer p = new FloatPointer(n)) {
			final long t0 = System.nanoTime();
			final fftwf_plan f, b;
			synchronized (FftwLibrary.class) {
				fftwf_init_threads();
				fftwf_plan_with_nthreads(threads);
				f = fftwf_plan_dft_r2c_3d(nz, ny, nx, p, p, measure ? FFTW_MEASURE : FFTW_ESTIMATE);
				b = fftwf_plan_dft_c2r_3d(nz, ny, nx, p, p, measure ? FFTW_MEASURE : FFTW_ESTIMATE);
				fftwf_plan_with_nthreads(1);
			}
			final double planning = (System.nanoTime() - t0) / 1e9;
			final java.nio.FloatBuffer fb = p.asBuffer();
			final java.util.Random r = new java.util.Random(3);
			for (int i = 0; i < n; i++) fb.put(i, r.nextFloat());
			final double[] t = new double[6], c = new double[6];
			final java.lang.management.ThreadMXBean tb = java.lang.management.ManagementFactory.getThreadMXBean();
			for (int rep = 0; rep < t.length; rep++) {
				final long s = System.nanoTime(), c0 = tb.getCurrentThreadCpuTime();
				for (int k = 0; k < 2; k++) {
					fftwf_execute(f);
					fftwf_execute(b);
				}
				t[rep] = (System.nanoTime() - s) / 1e9;
				c[rep] = (tb.getCurrentThreadCpuTime() - c0) / 1e9;
			}
			fftwf_destroy_plan(f);
			fftwf_destroy_plan(b);
			final double[] u = Arrays.copyOfRange(t, 1, t.length), v = Arrays.copyOfRange(c, 1, c.length);
			Arrays.sort(u);
			Arrays.sort(v);
			return new double[] { planning, u[u.length / 2], v[v.length / 2] };
		}
	}
}
