package org.parfocal.fft;

import static org.bytedeco.fftw.global.fftw3.FFTW_BACKWARD;
import static org.bytedeco.fftw.global.fftw3.FFTW_FORWARD;
import static org.bytedeco.fftw.global.fftw3.FFTW_UNALIGNED;
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
 * <b>How.</b> The grid is split into <i>slices</i> along its last axis (z planes in 3D, rows in 2D). A call
 * borrows a native buffer of the grid's size and, slice by slice, copies the real rows into it (calling the
 * caller's per-row hook first, while the row is in cache) and transforms the slice with a single-threaded FFTW
 * r2c plan (2D in 3D, 1D in 2D); then the lines along the last axis, in blocks of adjacent columns, go forward,
 * are multiplied by the transfer function while in cache, and go back (FFTW "many" plans with the column
 * stride); then each output slice is transformed back with c2r and its rows are copied out, followed by the
 * caller's hook. Slices and blocks are spread over the threads of the {@code Parallelization} context (the
 * same plans executed on disjoint data, which FFTW allows), and blocks have a fixed size, so every value is
 * computed by the same operations whatever the thread count: 1 and N threads agree bitwise. Slices of rows
 * that are all zero on input are zeroed instead of transformed, and only output slices are transformed back
 * (the pruning of the pure-Java path, by slices).
 * <p>
 * Thread-safe: concurrent calls borrow separate buffers.
 */
final class FftwTransform {

	/** Floats of one block of line data (as in RealFft's column blocks): about 128 KB, within a core's L2 cache. */
	private static final int BLOCK_FLOATS = RealFft.BLOCK_FLOATS;

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
		int b = Math.max(8, (BLOCK_FLOATS / (2 * lines)) / 8 * 8);
		if (lines == 1) b = columns;
		this.block = Math.min(b, columns);
		this.key = ((long) nx * 1_000_003L + ny) * 1_000_003L + nz;
		this.zeros = new float[2 * h];
		this.scratch = ThreadLocal.withInitial(() -> new float[2 * block]);
	}

	private long gridFloats() { return 2L * h * ny * nz; }

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

	private Plans plan(final FftwLibrary.Buffer b) {
		final int flags = FftwLibrary.planFlags(gridFloats());
		// every slice must have the alignment of the one planned on, else the plans must not assume any
		final boolean aligned = slices == 1 || (8L * columns) % FftwLibrary.ALIGN == 0;
		final int sliceFlags = flags | (aligned ? 0 : FFTW_UNALIGNED);
		final FloatPointer p = b.at(0);
		final Plans plans = new Plans();
		try {
			if (threeD) {
				plans.sliceForward = fftwf_plan_dft_r2c_2d(ny, nx, p, p, sliceFlags);
				plans.sliceInverse = fftwf_plan_dft_c2r_2d(ny, nx, p, p, sliceFlags);
			} else {
				plans.sliceForward = fftwf_plan_dft_r2c_1d(nx, p, p, sliceFlags);
				plans.sliceInverse = fftwf_plan_dft_c2r_1d(nx, p, p, sliceFlags);
			}
			if (lines > 1) {
				// blocks start at multiples of 8 complex values (64 bytes), so they share the planning alignment
				plans.lineForward = many(p, block, FFTW_FORWARD, flags);
				plans.lineInverse = many(p, block, FFTW_BACKWARD, flags);
				final int tail = columns % block;
				if (tail > 0) {
					plans.tailForward = many(p, tail, FFTW_FORWARD, flags);
					plans.tailInverse = many(p, tail, FFTW_BACKWARD, flags);
				}
			}
			for (final fftwf_plan q : new fftwf_plan[] { plans.sliceForward, plans.sliceInverse })
				if (q == null || q.isNull()) throw new IllegalStateException("FFTW could not plan a transform of " + nx + " x " + ny + " x " + nz);
			if (lines > 1 && (plans.lineForward == null || plans.lineForward.isNull() || plans.lineInverse.isNull()))
				throw new IllegalStateException("FFTW could not plan a transform of " + nx + " x " + ny + " x " + nz);
			return plans;
		} catch (final RuntimeException e) {
			plans.destroy();
			throw e;
		}
	}

	private fftwf_plan many(final FloatPointer p, final int howMany, final int sign, final int flags) {
		try (IntPointer n = new IntPointer(new int[] { lines })) {
			return fftwf_plan_many_dft(1, n, howMany, p, null, columns, 1, p, null, columns, 1, sign, flags);
		}
	}

	/** What the line pass does between slices. */
	private enum LineMode { FORWARD, INVERSE, CONVOLVE }

	/** The work of one call: a borrowed buffer and the plans, given back by {@link #close}. */
	private final class Call implements AutoCloseable {
		final FftwLibrary.Buffer buffer = FftwLibrary.borrow(gridFloats());
		final Plans plans;

		Call() {
			Plans p = null;
			try {
				p = FftwLibrary.use(key, buffer, FftwTransform.this::plan);
			} finally {
				if (p == null) FftwLibrary.giveBack(buffer);
			}
			plans = p;
		}

		@Override
		public void close() {
			FftwLibrary.unuse(plans);
			FftwLibrary.giveBack(buffer);
		}
	}

	// -- the operations of RealFft --

	/** Forward transform of the rows in {@code in} of src (row stride srcStride) into spec; other rows read as 0. */
	void forward(final float[] src, final int srcStride, final Rows in, final float[] spec) {
		try (Call c = new Call()) {
			forwardSlices(c, src, srcStride, in, null);
			linePass(c, LineMode.FORWARD, spec, null, false, false);
		}
	}

	/** Inverse transform of spec (unchanged) into the rows in {@code out} of dst, divided by nx·ny·nz. */
	void inverse(final float[] spec, final float[] dst, final int dstStride, final Rows out) {
		try (Call c = new Call()) {
			linePass(c, LineMode.INVERSE, spec, null, false, false);
			inverseSlices(c, dst, dstStride, out, (float) (1.0 / ((double) nx * ny * nz)), null);
		}
	}

	/**
	 * RealFft's fused convolution: rows in {@code in} of src → spectrum × t (× 1/nx, the part of the normalisation
	 * that RealFft's transfer functions leave to the x pass) → rows in {@code out} of src.
	 */
	void convolve(final float[] src, final int stride, final float[] t, final boolean tLines, final boolean conj, final Rows in, final RowAction before,
			final Rows out, final RowAction after) {
		try (Call c = new Call()) {
			forwardSlices(c, src, stride, in, before);
			linePass(c, LineMode.CONVOLVE, null, t, tLines, conj);
			inverseSlices(c, src, stride, out, 1f, after);
		}
	}

	// -- passes --

	private int sliceStart(final Rows b) { return threeD ? b.z0() : ny > 1 ? b.y0() : 0; }

	private int sliceEnd(final Rows b) { return threeD ? b.z1() : ny > 1 ? b.y1() : 1; }

	private boolean inBox(final Rows b, final int r) {
		final int y = r % ny, z = r / ny;
		return y >= b.y0() && y < b.y1() && z >= b.z0() && z < b.z1();
	}

	/** Copies the rows of every slice into the buffer (zero outside {@code in}) and transforms the slices. */
	private void forwardSlices(final Call c, final float[] src, final int srcStride, final Rows in, final RowAction before) {
		final FloatBuffer fb = c.buffer.floats;
		final int s0 = sliceStart(in), s1 = sliceEnd(in);
		Parallel.forRange(slices, s -> {
			final long base = (long) s * 2 * columns;
			if (s < s0 || s >= s1) {
				for (int j = 0; j < rowsPerSlice; j++) fb.put((int) (base + 2L * h * j), zeros, 0, 2 * h);
				return;
			}
			for (int j = 0; j < rowsPerSlice; j++) {
				final int r = s * rowsPerSlice + j;
				final int o = (int) (base + 2L * h * j);
				if (inBox(in, r)) {
					if (before != null) before.row(r, r * srcStride);
					fb.put(o, src, r * srcStride, nx);
				} else {
					fb.put(o, zeros, 0, nx);
				}
			}
			final FloatPointer p = c.buffer.at(base);
			fftwf_execute_dft_r2c(c.plans.sliceForward, p, p);
		});
	}

	/** Transforms the output slices back and copies their rows in {@code out} to dst (× scale), then the hook. */
	private void inverseSlices(final Call c, final float[] dst, final int dstStride, final Rows out, final float scale, final RowAction after) {
		final FloatBuffer fb = c.buffer.floats;
		final int s0 = sliceStart(out), s1 = sliceEnd(out);
		Parallel.forRange(s1 - s0, i -> {
			final int s = s0 + i;
			final long base = (long) s * 2 * columns;
			final FloatPointer p = c.buffer.at(base);
			fftwf_execute_dft_c2r(c.plans.sliceInverse, p, p);
			for (int j = 0; j < rowsPerSlice; j++) {
				final int r = s * rowsPerSlice + j;
				if (!inBox(out, r)) continue;
				final int o = r * dstStride;
				fb.get((int) (base + 2L * h * j), dst, o, nx);
				if (scale != 1f) for (int x = 0; x < nx; x++) dst[o + x] *= scale;
				if (after != null) after.row(r, o);
			}
		});
	}

	/**
	 * The last-axis pass, block by block of columns: FORWARD transforms and copies the spectrum out to
	 * {@code spec}; INVERSE copies {@code spec} in and transforms back; CONVOLVE transforms, multiplies by t and
	 * transforms back. In 1D (no last axis) only the copies and the product.
	 */
	private void linePass(final Call c, final LineMode mode, final float[] spec, final float[] t, final boolean tLines, final boolean conj) {
		final FloatBuffer fb = c.buffer.floats;
		final int blocks = (columns + block - 1) / block;
		final float scale = 1f / nx;
		Parallel.forRange(blocks, k -> {
			final int c0 = k * block, nb = Math.min(block, columns - c0);
			final FloatPointer p = lines > 1 ? c.buffer.at(2L * c0) : null;
			final fftwf_plan forward = nb == block ? c.plans.lineForward : c.plans.tailForward;
			final fftwf_plan inverse = nb == block ? c.plans.lineInverse : c.plans.tailInverse;
			if (mode == LineMode.INVERSE) {
				for (int kz = 0; kz < lines; kz++) {
					final int o = 2 * (kz * columns + c0);
					fb.put(o, spec, o, 2 * nb);
				}
			} else if (lines > 1) {
				fftwf_execute_dft(forward, p, p);
			}
			if (mode == LineMode.FORWARD) {
				for (int kz = 0; kz < lines; kz++) {
					final int o = 2 * (kz * columns + c0);
					fb.get(o, spec, o, 2 * nb);
				}
			} else if (mode == LineMode.CONVOLVE) {
				final float[] run = scratch.get();
				final float sign = conj ? -1f : 1f;
				for (int kz = 0; kz < lines; kz++) {
					final int o = 2 * (kz * columns + c0);
					fb.get(o, run, 0, 2 * nb);
					for (int i = 0; i < nb; i++) {
						// transfer value of column c0 + i at kz: spectrum layout, or RealFft's line layout
						final int q = tLines ? 2 * (lines * (c0 + i) + kz) : o + 2 * i;
						final float ar = run[2 * i], ai = run[2 * i + 1];
						final float br = t[q] * scale, bi = sign * t[q + 1] * scale;
						run[2 * i] = ar * br - ai * bi;
						run[2 * i + 1] = ar * bi + ai * br;
					}
					fb.put(o, run, 0, 2 * nb);
				}
			}
			if (mode != LineMode.FORWARD && lines > 1) fftwf_execute_dft(inverse, p, p);
		});
	}
}
