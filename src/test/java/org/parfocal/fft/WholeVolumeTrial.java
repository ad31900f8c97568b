package org.parfocal.fft;

import static org.bytedeco.fftw.global.fftw3.FFTW_MEASURE;
import static org.bytedeco.fftw.global.fftw3.fftwf_destroy_plan;
import static org.bytedeco.fftw.global.fftw3.fftwf_execute;
import static org.bytedeco.fftw.global.fftw3.fftwf_init_threads;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_c2r_3d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_r2c_3d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_with_nthreads;

import java.nio.FloatBuffer;
import java.util.Arrays;
import java.util.Locale;
import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.bytedeco.fftw.global.fftw3.fftwf_plan;
import org.bytedeco.javacpp.FloatPointer;
import org.parfocal.core.Parallel;

/**
 * Benchmark (not a unit test) answering one design question: is one RL iteration's transform work faster as
 * FFTW whole-volume 3D plans (FFTW's own threads) on a native copy of the grid, with the input rows copied in,
 * the product taken on the native spectrum and the output rows copied out, than as RealFft's fused, pruned
 * convolution ({@link RealFft#convolveInPlace}, slices and line blocks)? Both do the work of an RL iteration on
 * the padded grid of a 64×256×256 stack with a 33×65×65 PSF (96×320×320): a convolution from all rows to the
 * image's window rows, each output row followed by a ratio-like hook, then the adjoint from the window rows to
 * all rows. Wall seconds, medians of alternating rounds, with the bare bound of 4 whole-volume transforms.
 * {@code java -cp … org.parfocal.fft.WholeVolumeTrial [threads] [rounds]}.
 */
public final class WholeVolumeTrial {

	public static void main(final String[] args) {
		final int threads = args.length > 0 ? Integer.parseInt(args[0]) : 2, rounds = args.length > 1 ? Integer.parseInt(args[1]) : 7;
		final int nx = 320, ny = 320, nz = 96, wy = 32, wz = 16, my = 256, mz = 64;
		final RealFft f = new RealFft(nx, ny, nz, FftBackend.FFTW);
		final int h = nx / 2 + 1, rs = 2 * h;
		final float[] kernel = f.newGrid();
		final Random r = new Random(5);
		for (int z = 0; z < 5; z++) for (int y = 0; y < 5; y++) for (int x = 0; x < 5; x++) kernel[f.gridIndex(x, y, z)] = r.nextFloat();
		f.transferFunctionInPlace(kernel);
		final float[] transfer = kernel;
		final RealFft.LineTransfer lt = f.lineTransfer(transfer, f.newGrid());
		final float[] grid = f.newGrid(), data = new float[grid.length];
		for (int i = 0; i < grid.length; i++) {
			grid[i] = 1 + r.nextFloat();
			data[i] = 1 + r.nextFloat();
		}
		final RealFft.Rows all = f.allRows(), window = f.rows(wy, wy + my, wz, wz + mz);
		final RealFft.RowAction ratio = (row, o) -> {
			for (int x = 0; x < nx; x++) grid[o + x] = data[o + x] / Math.max(grid[o + x], 1e-6f);
		};
		final RealFft.RowAction update = (row, o) -> {
			for (int x = 0; x < nx; x++) grid[o + x] = Math.min(grid[o + x], 4f);
		};
		// whole-volume: native grid in FFTW's in-place layout (the same as RealFft's), 3D plans on `threads`
		final long n = (long) rs * ny * nz;
		final FloatPointer p = new FloatPointer(n);
		final fftwf_plan fw, bw;
		final long t0 = System.nanoTime();
		synchronized (FftwLibrary.class) {
			fftwf_init_threads();
			fftwf_plan_with_nthreads(threads);
			fw = fftwf_plan_dft_r2c_3d(nz, ny, nx, p, p, FFTW_MEASURE);
			bw = fftwf_plan_dft_c2r_3d(nz, ny, nx, p, p, FFTW_MEASURE);
			fftwf_plan_with_nthreads(1);
		}
		System.out.printf(Locale.ROOT, "grid %d x %d x %d, %d threads; whole-volume planning %.1f s%n", nx, ny, nz, threads, (System.nanoTime() - t0) / 1e9);
		final FloatBuffer fb = p.asBuffer();
		final float scale = 1f / nx; // RealFft's transfer functions carry 1/(ny·nz)
		final float[] zeros = new float[rs];
		final ThreadLocal<float[]> scratch = ThreadLocal.withInitial(() -> new float[rs]);
		final Runnable whole = () -> Parallelization.runWithNumThreads(threads, () -> {
			wholeConvolve(fb, fw, bw, grid, transfer, false, all, window, ratio, ny, nz, nx, rs, zeros, scratch, scale);
			wholeConvolve(fb, fw, bw, grid, transfer, true, window, all, update, ny, nz, nx, rs, zeros, scratch, scale);
		});
		final Runnable fused = () -> Parallelization.runWithNumThreads(threads, () -> {
			f.convolveInPlace(grid, lt, false, all, null, window, ratio);
			f.convolveInPlace(grid, lt, true, window, null, all, update);
		});
		final float[] g0 = grid.clone();
		fused.run();
		final float[] a = grid.clone();
		System.arraycopy(g0, 0, grid, 0, grid.length);
		whole.run();
		double worst = 0;
		for (int z = 0; z < nz; z++) for (int y = 0; y < ny; y++) for (int x = 0; x < nx; x++) {
			final int i = f.gridIndex(x, y, z);
			worst = Math.max(worst, Math.abs(a[i] - grid[i]) / Math.max(1e-3, Math.abs(a[i])));
		}
		System.out.printf(Locale.ROOT, "whole-volume vs fused, largest relative difference %.2e%n", worst);
		final double[] tw = new double[rounds], tf = new double[rounds];
		for (int k = 0; k < 2; k++) {
			whole.run();
			fused.run();
		}
		for (int k = 0; k < rounds; k++) {
			tf[k] = time(fused, 3);
			tw[k] = time(whole, 3);
		}
		final double[] bound = FftwBound.fourTransforms(nx, ny, nz, threads, true);
		Arrays.sort(tw);
		Arrays.sort(tf);
		System.out.printf(Locale.ROOT, "fused pruned (today)  %.4f s per iteration's transforms (%.4f … %.4f)%n", tf[rounds / 2], tf[0], tf[rounds - 1]);
		System.out.printf(Locale.ROOT, "whole-volume FFTW     %.4f s (%.4f … %.4f)%n", tw[rounds / 2], tw[0], tw[rounds - 1]);
		System.out.printf(Locale.ROOT, "bound (4 transforms)  %.4f s; fused / bound %.2f, whole / bound %.2f, whole / fused %.2f%n", bound[1],
				tf[rounds / 2] / bound[1], tw[rounds / 2] / bound[1], tw[rounds / 2] / tf[rounds / 2]);
		fftwf_destroy_plan(fw);
		fftwf_destroy_plan(bw);
		p.close();
	}

	private static double time(final Runnable run, final int reps) {
		final long s = System.nanoTime();
		for (int i = 0; i < reps; i++) run.run();
		return (System.nanoTime() - s) / 1e9 / reps;
	}

	/** Input rows → native (zeros elsewhere) → r2c → × t (conjugated if asked) → c2r → output rows (× scale), each followed by the hook. */
	private static void wholeConvolve(final FloatBuffer fb, final fftwf_plan fw, final fftwf_plan bw, final float[] grid, final float[] t, final boolean conj,
			final RealFft.Rows in, final RealFft.Rows out, final RealFft.RowAction after, final int ny, final int nz, final int nx, final int rs,
			final float[] zeros, final ThreadLocal<float[]> scratch, final float scale) {
		final int rows = ny * nz;
		Parallel.forRange(rows, row -> {
			final int y = row % ny, z = row / ny;
			final boolean inside = y >= in.y0() && y < in.y1() && z >= in.z0() && z < in.z1();
			fb.put(row * rs, inside ? grid : zeros, inside ? row * rs : 0, nx);
		});
		fftwf_execute(fw);
		final float sign = conj ? -1f : 1f;
		// the product on the native spectrum, one spectrum row at a time through a scratch row
		Parallel.forRange(rows, row -> {
			final float[] s = scratch.get();
			final int o = row * rs;
			fb.get(o, s, 0, rs);
			for (int i = 0; i < rs; i += 2) {
				final float ar = s[i], ai = s[i + 1], br = t[o + i], bi = sign * t[o + i + 1];
				s[i] = ar * br - ai * bi;
				s[i + 1] = ar * bi + ai * br;
			}
			fb.put(o, s, 0, rs);
		});
		fftwf_execute(bw);
		Parallel.forRange(rows, row -> {
			final int y = row % ny, z = row / ny;
			if (y < out.y0() || y >= out.y1() || z < out.z0() || z >= out.z1()) return;
			final int o = row * rs;
			fb.get(o, grid, o, nx);
			for (int x = 0; x < nx; x++) grid[o + x] *= scale;
			after.row(row, o);
		});
	}
}
