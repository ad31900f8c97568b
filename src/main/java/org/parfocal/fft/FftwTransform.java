package org.parfocal.fft;

import static org.bytedeco.fftw.global.fftw3.FFTW_BACKWARD;
import static org.bytedeco.fftw.global.fftw3.FFTW_FORWARD;
import static org.bytedeco.fftw.global.fftw3.fftwf_execute_dft;
import static org.bytedeco.fftw.global.fftw3.fftwf_execute_dft_c2r;
import static org.bytedeco.fftw.global.fftw3.fftwf_execute_dft_r2c;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_c2r_1d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_c2r_2d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_r2c_1d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_dft_r2c_2d;
import static org.bytedeco.fftw.global.fftw3.fftwf_plan_many_dft;

import java.nio.FloatBuffer;

import org.bytedeco.fftw.global.fftw3.fftwf_plan;
import org.bytedeco.javacpp.FloatPointer;
import org.bytedeco.javacpp.IntPointer;
import org.parfocal.core.Parallel;
import org.parfocal.fft.RealFft.RowAction;
import org.parfocal.fft.RealFft.Rows;

/**
 * {@link RealFft}'s transforms computed by FFTW, on the same arrays, layouts and normalisation (the half
 * spectrum of RealFft is FFTW's r2c layout, and its in-place grid FFTW's padded in-place layout).
 * <p>
 * <b>How.</b> The grid is split into <i>slices</i> along its last axis (z planes in 3D, rows in 2D). Each slice
 * in turn is copied into a small native buffer (its rows produced first by the caller's per-row hook, while in
 * cache), transformed out of place by a single-threaded FFTW r2c plan (2D in 3D, 1D in 2D) into a second buffer
 * and copied back as its half spectrum. Then the lines along the last axis, a block of adjacent columns at a
 * time, are gathered into a native block buffer (about 512 KB, in cache), go forward, are multiplied by the transfer function, go back, and
 * are scattered to the grid (FFTW "many" plans). Then each output slice is copied in, transformed back with
 * c2r, and its rows are copied out, each followed by the caller's hook. So the data stays in the caller's
 * array: native memory is a few cache-sized buffers per thread (no second grid), and the traffic to main
 * memory is that of one pass per axis, as on the pure-Java path. Slices and blocks are spread over the
 * threads of the {@code Parallelization} context (the same plans executed on disjoint buffers, which FFTW
 * allows), and blocks have a fixed size, so every value is computed by the same operations whatever the
 * thread count: 1 and N threads agree bitwise. Slices that are all zero on input are not transformed (their
 * lines are gathered as zeros), and only output slices are transformed back (the pruning of the pure-Java
 * path, by slices).
 * <p>
 * Measured against FFTW's own whole-volume plans (one 3D r2c + c2r over the grid in native memory, which
 * would also need a native copy of the grid and a separate pass for the product): on the 96×320×320 grid of
 * the deconvolution benchmark the two fused convolutions of an RL iteration took 0.8–1.2× the time of the
 * four bare whole-volume transforms ({@code bin/parfocal-bench fftw}), so the fused slice-and-line path is kept.
 * <p>
 * Thread-safe: concurrent calls borrow separate buffers.
 */
final class FftwTransform {

	/**
	 * Floats of one block of line data: about 512 KB, within a core's L2 cache. Measured (fused convolutions of a
	 * 96×320×320 grid, 2 threads, same session): 4× the pure-Java path's block ({@link RealFft#BLOCK_FLOATS}) made
	 * the line pass about 10 % faster; no change at 96×576×576.
	 */
	static final int BLOCK_FLOATS = Integer.getInteger("parfocal.fftw.blockFloats", 1 << 17);

	private final int nx, ny, nz, h;
	/** 3D (slices are z planes) or not (slices are rows). */
	private final boolean threeD;
	/** Number of slices, rows per slice, length of the last-axis lines, complex values per slice, columns per block. */
	private final int slices, rowsPerSlice, lines, columns, block;
	private final long key;
	private final float[] zeros;
	private final ThreadLocal<float[]> scratch;

	FftwTransform(final int nx, final int ny, final int nz) {
		this.nx = nx;
		this.ny = ny;
		this.nz = nz;
		this.h = nx / 2 + 1;
		this.threeD = nz > 1;
		this.slices = threeD ? nz : ny;
		this.rowsPerSlice = threeD ? ny : 1;
		this.lines = threeD ? nz : ny;
		this.columns = threeD ? h * ny : h;
		this.block = lines == 1 ? columns : Math.min(columns, Math.max(8, (BLOCK_FLOATS / (2 * lines)) / 8 * 8));
		this.key = ((long) nx * 1_000_003L + ny) * 1_000_003L + nz;
		this.zeros = new float[2 * Math.max(h, block)];
		this.scratch = ThreadLocal.withInitial(() -> new float[2 * block]);
	}

	/** Floats of a slice's half spectrum, and of its real values (rows packed, nx apart). */
	private long sliceFloats() { return 2L * columns; }

	private long realSliceFloats() { return (long) nx * rowsPerSlice; }

	private long blockFloats() { return 2L * block * lines; }

	/** The FFTW plans of one size: slice r2c/c2r, and line transforms of a full block and of the last, shorter block. */
	static final class Plans {
		fftwf_plan sliceForward, sliceInverse, lineForward, lineInverse, tailForward, tailInverse;
		/** Calls using the plans now (guarded by the library's planner lock). */
		int users;

		void destroy() {
			for (final fftwf_plan p : new fftwf_plan[] { sliceForward, sliceInverse, lineForward, lineInverse, tailForward, tailInverse })
				FftwLibrary.destroy(p);
			sliceForward = sliceInverse = lineForward = lineInverse = tailForward = tailInverse = null;
		}
	}

	/** Plans made on buffers of the sizes (and so the alignment) that calls borrow. */
	private Plans plan() {
		final int flags = FftwLibrary.planFlags(2L * h * ny * nz);
		final Plans plans = new Plans();
		final FftwLibrary.Buffer slice = FftwLibrary.borrow(sliceFloats()), real = FftwLibrary.borrow(realSliceFloats());
		final FftwLibrary.Buffer lineBuffer = lines > 1 ? FftwLibrary.borrow(blockFloats()) : null;
		try {
			// out of place (real slice ↔ half spectrum): on the 96×320×320 grid, 2 threads, the slice passes were
			// about 10 % faster than FFTW's in-place transforms of the padded slice; no change at 96×576×576
			final FloatPointer p = slice.pointer, r = real.pointer;
			if (threeD) {
				plans.sliceForward = fftwf_plan_dft_r2c_2d(ny, nx, r, p, flags);
				plans.sliceInverse = fftwf_plan_dft_c2r_2d(ny, nx, p, r, flags);
			} else {
				plans.sliceForward = fftwf_plan_dft_r2c_1d(nx, r, p, flags);
				plans.sliceInverse = fftwf_plan_dft_c2r_1d(nx, p, r, flags);
			}
			if (lines > 1) {
				final FloatPointer q = lineBuffer.pointer;
				plans.lineForward = many(q, block, FFTW_FORWARD, flags);
				plans.lineInverse = many(q, block, FFTW_BACKWARD, flags);
				final int tail = columns % block;
				if (tail > 0) {
					plans.tailForward = many(q, tail, FFTW_FORWARD, flags);
					plans.tailInverse = many(q, tail, FFTW_BACKWARD, flags);
				}
			}
			for (final fftwf_plan q : new fftwf_plan[] { plans.sliceForward, plans.sliceInverse, plans.lineForward, plans.lineInverse })
				if ((q == null || q.isNull()) && (q == plans.sliceForward || q == plans.sliceInverse || lines > 1))
					throw new IllegalStateException("FFTW could not plan a transform of " + nx + " x " + ny + " x " + nz);
			return plans;
		} catch (final RuntimeException e) {
			plans.destroy();
			throw e;
		} finally {
			FftwLibrary.giveBack(slice);
			FftwLibrary.giveBack(real);
			if (lineBuffer != null) FftwLibrary.giveBack(lineBuffer);
		}
	}

	/** Lines of length {@code lines} for {@code howMany} columns stored one after the other per line entry. */
	private fftwf_plan many(final FloatPointer p, final int howMany, final int sign, final int flags) {
		try (IntPointer n = new IntPointer(new int[] { lines })) {
			return fftwf_plan_many_dft(1, n, howMany, p, null, howMany, 1, p, null, howMany, 1, sign, flags);
		}
	}

	/** What the line pass does. */
	private enum LineMode { FORWARD, INVERSE, CONVOLVE }

	/** The plans of this size for one call, given back by {@link #close}. */
	private final class Call implements AutoCloseable {
		final Plans plans = FftwLibrary.use(key, 2L * h * ny * nz, FftwTransform.this::plan);

		@Override
		public void close() {
			FftwLibrary.unuse(plans);
		}
	}

	// -- the operations of RealFft --

	/** Forward transform of the rows in {@code in} of src (row stride srcStride) into spec; other rows read as 0. */
	void forward(final float[] src, final int srcStride, final Rows in, final float[] spec) {
		try (Call c = new Call()) {
			forwardSlices(c, src, srcStride, in, null, spec);
			linePass(c, LineMode.FORWARD, spec, sliceStart(in), sliceEnd(in), 0, slices, null, false, false);
		}
	}

	/** Inverse transform of spec (destroyed) into the rows in {@code out} of dst, divided by nx·ny·nz. */
	void inverse(final float[] spec, final float[] dst, final int dstStride, final Rows out) {
		try (Call c = new Call()) {
			linePass(c, LineMode.INVERSE, spec, 0, slices, sliceStart(out), sliceEnd(out), null, false, false);
			inverseSlices(c, spec, dst, dstStride, out, (float) (1.0 / ((double) nx * ny * nz)), null);
		}
	}

	/**
	 * RealFft's fused convolution on an in-place grid: rows in {@code in} → spectrum × t (× 1/nx, the part of
	 * the normalisation that RealFft's transfer functions leave to the x pass) → rows in {@code out}.
	 * {@code src} is either the grid ({@code stride} = 2h) or a plain real array (stride nx) with {@code grid} a
	 * spectrum-sized work array.
	 */
	void convolve(final float[] src, final int stride, final float[] grid, final float[] t, final boolean tLines, final boolean conj, final Rows in,
			final RowAction before, final Rows out, final RowAction after) {
		try (Call c = new Call()) {
			forwardSlices(c, src, stride, in, before, grid);
			linePass(c, LineMode.CONVOLVE, grid, sliceStart(in), sliceEnd(in), sliceStart(out), sliceEnd(out), t, tLines, conj);
			inverseSlices(c, grid, src, stride, out, 1f, after);
		}
	}

	// -- passes --

	private int sliceStart(final Rows b) { return threeD ? b.z0() : ny > 1 ? b.y0() : 0; }

	private int sliceEnd(final Rows b) { return threeD ? b.z1() : ny > 1 ? b.y1() : 1; }

	private boolean inBox(final Rows b, final int r) {
		final int y = r % ny, z = r / ny;
		return y >= b.y0() && y < b.y1() && z >= b.z0() && z < b.z1();
	}

	/** Slices of the rows in {@code in} of src → r2c → their half spectra in spec (slices without input rows untouched). */
	private void forwardSlices(final Call c, final float[] src, final int srcStride, final Rows in, final RowAction before, final float[] spec) {
		final int s0 = sliceStart(in), s1 = sliceEnd(in);
		Parallel.forRange(s1 - s0, i -> {
			final int s = s0 + i;
			final FftwLibrary.Buffer buf = FftwLibrary.borrow(sliceFloats()), real = FftwLibrary.borrow(realSliceFloats());
			try {
				final FloatBuffer fr = real.floats;
				for (int j = 0; j < rowsPerSlice; j++) {
					final int r = s * rowsPerSlice + j;
					if (inBox(in, r)) {
						if (before != null) before.row(r, r * srcStride);
						fr.put(nx * j, src, r * srcStride, nx);
					} else {
						fr.put(nx * j, zeros, 0, nx);
					}
				}
				fftwf_execute_dft_r2c(c.plans.sliceForward, real.pointer, buf.pointer);
				buf.floats.get(0, spec, (int) (s * sliceFloats()), (int) sliceFloats());
			} finally {
				FftwLibrary.giveBack(buf);
				FftwLibrary.giveBack(real);
			}
		});
	}

	/** Output slices of spec → c2r → their rows in {@code out} to dst (× scale), each followed by the hook. */
	private void inverseSlices(final Call c, final float[] spec, final float[] dst, final int dstStride, final Rows out, final float scale,
			final RowAction after) {
		final int s0 = sliceStart(out), s1 = sliceEnd(out);
		Parallel.forRange(s1 - s0, i -> {
			final int s = s0 + i;
			final FftwLibrary.Buffer buf = FftwLibrary.borrow(sliceFloats()), real = FftwLibrary.borrow(realSliceFloats());
			try {
				buf.floats.put(0, spec, (int) (s * sliceFloats()), (int) sliceFloats());
				fftwf_execute_dft_c2r(c.plans.sliceInverse, buf.pointer, real.pointer);
				final FloatBuffer fr = real.floats;
				for (int j = 0; j < rowsPerSlice; j++) {
					final int r = s * rowsPerSlice + j;
					if (!inBox(out, r)) continue;
					final int o = r * dstStride;
					fr.get(nx * j, dst, o, nx);
					if (scale != 1f) for (int x = 0; x < nx; x++) dst[o + x] *= scale;
					if (after != null) after.row(r, o);
				}
			} finally {
				FftwLibrary.giveBack(buf);
				FftwLibrary.giveBack(real);
			}
		});
	}

	/**
	 * The last-axis pass over the half spectrum in spec, block by block of columns: entries of slices [r0, r1)
	 * are read (others taken as zero), entries of slices [w0, w1) are written back. FORWARD and INVERSE
	 * transform; CONVOLVE transforms, multiplies by t and transforms back. In 1D (no last axis) only the product.
	 */
	private void linePass(final Call c, final LineMode mode, final float[] spec, final int r0, final int r1, final int w0, final int w1, final float[] t,
			final boolean tLines, final boolean conj) {
		final float scale = 1f / nx, sign = conj ? -1f : 1f;
		if (lines == 1) {
			if (mode == LineMode.CONVOLVE) multiply(spec, 0, 0, columns, t, tLines, scale, sign);
			return;
		}
		final int blocks = (columns + block - 1) / block;
		Parallel.forRange(blocks, k -> {
			final int c0 = k * block, nb = Math.min(block, columns - c0);
			final FftwLibrary.Buffer buf = FftwLibrary.borrow(blockFloats());
			try {
				final FloatBuffer fb = buf.floats;
				for (int kz = 0; kz < lines; kz++) {
					if (kz >= r0 && kz < r1) fb.put(2 * kz * nb, spec, 2 * (kz * columns + c0), 2 * nb);
					else fb.put(2 * kz * nb, zeros, 0, 2 * nb);
				}
				if (mode != LineMode.INVERSE) fftwf_execute_dft(nb == block ? c.plans.lineForward : c.plans.tailForward, buf.pointer, buf.pointer);
				if (mode == LineMode.CONVOLVE) {
					final float[] run = scratch.get();
					for (int kz = 0; kz < lines; kz++) {
						fb.get(2 * kz * nb, run, 0, 2 * nb);
						multiply(run, kz, c0, nb, t, tLines, scale, sign);
						fb.put(2 * kz * nb, run, 0, 2 * nb);
					}
				}
				if (mode != LineMode.FORWARD) fftwf_execute_dft(nb == block ? c.plans.lineInverse : c.plans.tailInverse, buf.pointer, buf.pointer);
				for (int kz = w0; kz < w1; kz++) fb.get(2 * kz * nb, spec, 2 * (kz * columns + c0), 2 * nb);
			} finally {
				FftwLibrary.giveBack(buf);
			}
		});
	}

	/**
	 * run[2i] ← run[2i] · t · scale (complex; t conjugated if sign is −1) for the nb columns from c0 at last-axis
	 * index kz; t in spectrum layout, or in RealFft's line layout. In 1D run is the spectrum itself (kz = 0).
	 */
	private void multiply(final float[] run, final int kz, final int c0, final int nb, final float[] t, final boolean tLines, final float scale,
			final float sign) {
		final int o = 2 * (kz * columns + c0);
		for (int i = 0; i < nb; i++) {
			final int q = tLines ? 2 * (lines * (c0 + i) + kz) : o + 2 * i;
			final float ar = run[2 * i], ai = run[2 * i + 1];
			final float br = t[q] * scale, bi = sign * t[q + 1] * scale;
			run[2 * i] = ar * br - ai * bi;
			run[2 * i + 1] = ar * bi + ai * br;
		}
	}
}
