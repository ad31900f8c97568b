package org.parfocal.fft;

import java.util.Arrays;

import net.imglib2.parallel.Parallelization;
import net.imglib2.parallel.TaskExecutor;

import org.jtransforms.fft.FloatFFT_1D;
import org.parfocal.core.Parallel;

/**
 * Discrete Fourier transform of real 1D, 2D and 3D data of any size, X(k) = Σ_n x(n)·exp(−2πi k·n/N).
 * <p>
 * <b>Backends.</b> Each instance computes on the {@link FftBackend} selected when it is made: FFTW
 * ({@link FftwTransform}, natives, when installed) or JTransforms (pure Java, below). Both give the same layouts,
 * normalisation, pruning and row hooks, and results that agree within float rounding; the paragraphs below
 * describe the pure-Java path.
 * <p>
 * <b>Why composed from 1D transforms.</b> JTransforms' 2D and 3D {@code realForward} accept only
 * power-of-two sizes, and {@code realForwardFull} costs twice the time and memory. This class composes the
 * real transform from JTransforms' 1D plans, which take any length: a real transform along x, then complex
 * transforms along y and z over the half spectrum only.
 * <p>
 * <b>Spectrum layout</b> (the "half spectrum"): {@code h = nx/2 + 1} complex values per row, interleaved
 * (re, im), rows ordered by y then z: the value for frequency (kx, ky, kz) with 0 ≤ kx < h sits at
 * {@code 2 * (kx + h * (ky + ny * kz))}. Frequencies kx ≥ h follow from Hermitian symmetry. A spectrum array
 * has {@link #spectrumLength()} floats.
 * <p>
 * <b>Threads.</b> Work is split over lines (in 3D, over z planes for the x and y transforms, which are done
 * one plane after the other so that a plane is fetched from memory once for both) with the
 * {@link TaskExecutor} of the calling thread's {@link Parallelization} context. Every line is transformed by the same sequence of operations whatever the
 * number of threads, so results are bitwise identical for 1 and N threads. Each worker thread keeps its own
 * JTransforms plans and line buffers (plans hold state), and JTransforms' global thread setting is left
 * alone: lines shorter than its 1D threshold (8192) are transformed single-threaded inside.
 * <p>
 * <b>Lengths 3^a·5^b·2^k</b> (most padded sizes) go through hand-written radix-3 and radix-5 steps on top of
 * JTransforms' power-of-two plans ({@link SplitFft}, and {@link SplitRealFft} for real rows of twice such a
 * length), faster than its mixed-radix path (figures in SplitFft); {@code -Dparfocal.fft.noSplit=true}
 * turns this off (for comparisons).
 * <p>
 * <b>In-place layout and pruning.</b> {@link #convolveInPlace}, {@link #forwardInPlace} and
 * {@link #inverseInPlace} work on one array whose rows are {@link #rowStride()} = 2·h floats long, so that a
 * row holds either nx real values or its h complex values: the padded real array and the spectrum are the
 * same array (one volume less than {@link #convolve} with its scratch). They take boxes of rows ({@link Rows}):
 * transforms of rows known to be zero on input, and of rows nobody reads on output, are skipped. Every line
 * that is computed goes through the same operations as in the plain path, so the results are the same.
 * <p>
 * Instances are thread-safe: any number of threads may call {@link #forward}, {@link #inverse},
 * {@link #convolve} and the in-place methods at once on different arrays.
 */
public final class RealFft {

	/**
	 * Floats of the line buffers of one block of columns (per axis and thread): columns are gathered together
	 * along y and z in blocks that fill about this much, so that each row of the spectrum is read in long
	 * runs (the memory system prefetches them) while the block stays in a core's L2 cache. Measured on the
	 * deconvolution benchmark: blocks of 8 columns (one cache line per row) cost 4 % (1 thread) to 10 %
	 * (2 threads) more per iteration.
	 */
	static final int BLOCK_FLOATS = Integer.getInteger("parfocal.fft.blockFloats", 1 << 15);
	/**
	 * Whether lines of 3^a·5^b·2^k (real rows of twice that) go through {@link SplitFft} / {@link SplitRealFft}
	 * (a switch for comparisons).
	 */
	static final boolean SPLIT = !Boolean.getBoolean("parfocal.fft.noSplit");
	/** Fewest columns in a block: one cache line of complex floats. */
	private static final int MIN_BLOCK = 8;

	private final int nx, ny, nz, h;
	/** Columns per block along y and along z. */
	private final int blockY, blockZ;
	private final ThreadLocal<Lines> lines;
	private final Rows all;
	private final FftBackend backend;
	/** The FFTW implementation of the operations, or null on the pure-Java path. */
	private final FftwTransform fftw;

	/**
	 * Plan for a real array of nx × ny × nz (use 1 for absent dimensions), on the backend selected now
	 * ({@link FftBackend#selected}).
	 *
	 * @throws IllegalArgumentException for sizes below 1 or too large, or if the selection names an FFTW that does not load
	 */
	public RealFft(final int nx, final int ny, final int nz) {
		this(nx, ny, nz, FftBackend.selected());
	}

	/**
	 * Plan for a real array of nx × ny × nz on a given backend (for comparisons).
	 *
	 * @throws IllegalArgumentException if the backend cannot run here
	 */
	public RealFft(final int nx, final int ny, final int nz, final FftBackend backend) {
		if (nx < 1 || ny < 1 || nz < 1)
			throw new IllegalArgumentException("Transform sizes must be at least 1, got " + nx + " x " + ny + " x " + nz);
		if ((long) 2 * (nx / 2 + 1) * ny * nz > Integer.MAX_VALUE - 8)
			throw new IllegalArgumentException("Transform of " + nx + " x " + ny + " x " + nz + " is too large for one block");
		this.nx = nx;
		this.ny = ny;
		this.nz = nz;
		this.h = nx / 2 + 1;
		this.blockY = blockSize(ny, nz);
		this.blockZ = blockSize(nz, ny);
		this.lines = ThreadLocal.withInitial(Lines::new);
		this.all = new Rows(0, ny, 0, nz);
		if (!backend.available()) throw new IllegalArgumentException("FFT backend " + backend.key() + " cannot be used: " + backend.unavailableReason());
		this.backend = backend;
		this.fftw = backend == FftBackend.FFTW ? new FftwTransform(nx, ny, nz) : null;
	}

	/** The library computing this instance's transforms. */
	public FftBackend backend() { return backend; }

	/**
	 * Columns per block for lines of n values with {@code outer} lines per column: about BLOCK_FLOATS of
	 * buffer, at least MIN_BLOCK columns, and small enough to leave at least 64 blocks to share among threads
	 * (the block size never depends on the thread count, so neither do the results).
	 */
	private int blockSize(final int n, final int outer) {
		int b = Math.max(MIN_BLOCK, Math.min(h, BLOCK_FLOATS / (2 * n)));
		while (b > MIN_BLOCK && (long) outer * ((h + b - 1) / b) < 64) b = Math.max(MIN_BLOCK, b / 2);
		return b;
	}

	public int nx() { return nx; }

	public int ny() { return ny; }

	public int nz() { return nz; }

	/** Number of voxels of the real array. */
	public int realLength() { return nx * ny * nz; }

	/** Number of floats of a half spectrum: {@code 2 * (nx/2 + 1) * ny * nz}. */
	public int spectrumLength() { return 2 * h * ny * nz; }

	/** A new zeroed array that can hold a half spectrum. */
	public float[] newSpectrum() { return new float[spectrumLength()]; }

	/** Forward transform of {@code real} (unchanged) into {@code spectrum} (overwritten). */
	public void forward(final float[] real, final float[] spectrum) {
		checkLengths(real, spectrum);
		if (fftw != null) fftw.forward(real, nx, all, spectrum);
		else forwardRows(real, nx, spectrum, all);
	}

	/**
	 * Inverse transform of {@code spectrum} (destroyed) into {@code real}, divided by nx·ny·nz, so that
	 * {@code inverse(forward(x)) == x}.
	 */
	public void inverse(final float[] spectrum, final float[] real) {
		checkLengths(real, spectrum);
		if (fftw != null) fftw.inverse(spectrum, real, nx, all);
		else inverseRows(spectrum, real, nx, all);
	}

	/**
	 * Circular convolution (or correlation) with a transfer function, in place on {@code real}:
	 * real ← F⁻¹(F(real) · t), or F⁻¹(F(real) · conj(t)) when {@code conjugate}, with {@code transfer} from
	 * {@link #transferFunction} (the y and z parts of the 1/(nx·ny·nz) normalisation are folded into it).
	 * <p>
	 * The product is taken while each line of the last axis is in a line buffer, between its forward and
	 * inverse transforms, which saves two passes over the spectrum compared with forward, multiply, inverse.
	 *
	 * @param work a spectrum-sized scratch array (contents overwritten)
	 */
	public void convolve(final float[] real, final float[] transfer, final boolean conjugate, final float[] work) {
		checkLengths(real, work);
		checkTransfer(transfer);
		if (fftw != null) fftw.convolve(real, nx, work, transfer, false, conjugate, all, null, all, null);
		else convolveRows(real, nx, work, transfer, false, conjugate, all, null, all, null);
	}

	/**
	 * Transfer function for {@link #convolve}: the spectrum of {@code kernel} (real, full size, origin at
	 * index 0 with wrap-around) divided by ny·nz. (The x pass always scales its inverse by 1/nx: JTransforms'
	 * unscaled 1D real inverse is not a plain multiple of the data for every length.)
	 */
	public float[] transferFunction(final float[] kernel) {
		final float[] t = newSpectrum();
		forward(kernel, t);
		scaleTransfer(t);
		return t;
	}

	// -- in-place layout and pruned transforms --

	/**
	 * Floats per row of the in-place layout, {@code 2 * (nx/2 + 1)}: a row holds nx real values followed by
	 * one or two spare floats, so that the same array can hold the row's half spectrum (the layout of FFTW's
	 * in-place real transforms). Row r = y + ny·z starts at {@code r * rowStride()}.
	 */
	public int rowStride() { return 2 * h; }

	/** Floats of an in-place grid: {@code rowStride() * ny * nz}, the same as {@link #spectrumLength()}. */
	public int gridLength() { return spectrumLength(); }

	/** A new zeroed in-place grid. */
	public float[] newGrid() { return new float[gridLength()]; }

	/** Index of real voxel (x, y, z) in an in-place grid. */
	public int gridIndex(final int x, final int y, final int z) { return x + 2 * h * (y + ny * z); }

	/** Every row of the grid. */
	public Rows allRows() { return all; }

	/**
	 * A box of rows, y in [y0, y1) and z in [z0, z1), non-empty and inside the grid.
	 *
	 * @throws IllegalArgumentException if the box is empty or leaves the grid
	 */
	public Rows rows(final int y0, final int y1, final int z0, final int z1) {
		if (y0 < 0 || y1 > ny || y0 >= y1 || z0 < 0 || z1 > nz || z0 >= z1)
			throw new IllegalArgumentException("Row box y [" + y0 + ", " + y1 + ") z [" + z0 + ", " + z1 + ") is empty or outside the " + ny + " x " + nz
					+ " rows of the transform");
		return new Rows(y0, y1, z0, z1);
	}

	/**
	 * Forward transform of an in-place grid: the real values of the rows in {@code input} become the half
	 * spectrum of the whole grid. Rows outside {@code input} are read as zero whatever they hold (their
	 * transforms are skipped, the "pruned" transform), and every other row's transform is computed exactly as
	 * by {@link #forward}, so the result equals {@code forward} of the grid with those rows zeroed.
	 */
	public void forwardInPlace(final float[] grid, final Rows input) {
		checkGrid(grid);
		if (fftw != null) {
			checkRows(input);
			fftw.forward(grid, 2 * h, input, grid);
		} else {
			forwardRows(grid, 2 * h, grid, input);
		}
	}

	/**
	 * Inverse of {@link #forwardInPlace}, divided by nx·ny·nz: only the rows in {@code output} receive real
	 * values (transforms that feed only other rows are skipped); other rows are left with unspecified values.
	 */
	public void inverseInPlace(final float[] grid, final Rows output) {
		checkGrid(grid);
		if (fftw != null) {
			checkRows(output);
			fftw.inverse(grid, grid, 2 * h, output);
		} else {
			inverseRows(grid, grid, 2 * h, output);
		}
	}

	/**
	 * Transfer function for {@link #convolveInPlace} from a kernel given in an in-place grid (origin at voxel
	 * 0, wrapping around), computed in place: the grid becomes the transfer function, identical to
	 * {@link #transferFunction} of the same kernel, without a second array.
	 */
	public void transferFunctionInPlace(final float[] grid) {
		forwardInPlace(grid, all);
		scaleTransfer(grid);
	}

	/**
	 * {@link #convolve} on an in-place grid, pruned to the rows that matter: the real rows in {@code input} are
	 * the data (rows outside it are read as zero, whatever they hold) and only the rows in {@code output}
	 * receive the result (other rows are left with unspecified values). No scratch array is needed. For the
	 * rows in {@code output} the result is the same as {@code convolve} of the grid with the rows outside
	 * {@code input} zeroed: each line transform is computed by the same operations, only transforms of
	 * all-zero lines and of lines no output row depends on are skipped.
	 * <p>
	 * {@code after}, if not null, is called once for every output row as soon as its real values are ready,
	 * on the thread that computed them (while the row is in cache): a place for per-row work on the result.
	 * It must touch only that row of the grid (and its own data).
	 */
	public void convolveInPlace(final float[] grid, final float[] transfer, final boolean conjugate, final Rows input, final Rows output,
			final RowAction after) {
		convolveInPlace(grid, transfer, conjugate, input, null, output, after);
	}

	/**
	 * {@link #convolveInPlace(float[], float[], boolean, Rows, Rows, RowAction)} with, in addition,
	 * {@code before} (if not null) called once for every input row just before its forward transform, on the
	 * thread that transforms it: a place to produce the row (it must write only that row of the grid).
	 */
	public void convolveInPlace(final float[] grid, final float[] transfer, final boolean conjugate, final Rows input, final RowAction before,
			final Rows output, final RowAction after) {
		checkGrid(grid);
		checkTransfer(transfer);
		checkRows(input);
		checkRows(output);
		if (fftw != null) fftw.convolve(grid, 2 * h, grid, transfer, false, conjugate, input, before, output, after);
		else convolveRows(grid, 2 * h, grid, transfer, false, conjugate, input, before, output, after);
	}

	/**
	 * A transfer function rearranged for {@link #convolveInPlace(float[], LineTransfer, boolean, Rows, RowAction, Rows, RowAction)}:
	 * the values along the last axis of the transform (z in 3D, y in 2D) stored one line after the other, in
	 * the order the fused product reads them, rather than one plane apart. The product then reads the
	 * transfer function sequentially instead of with a stride of a plane (a cache line and often a page per
	 * value), which is most of its cost on large grids. The same values as the spectrum it came from.
	 */
	public static final class LineTransfer {
		private final float[] data;
		private final RealFft owner;
		/** Whether data is in line layout (the pure-Java path) or still in spectrum layout (FFTW reads whole runs of a plane). */
		private final boolean lines;

		private LineTransfer(final float[] data, final RealFft owner, final boolean lines) {
			this.data = data;
			this.owner = owner;
			this.lines = lines;
		}
	}

	/**
	 * {@code transfer} (a spectrum-layout transfer function from {@link #transferFunction} or
	 * {@link #transferFunctionInPlace}, unchanged) rearranged into {@code dst} (a spectrum-sized array, not
	 * {@code transfer}) for faster fused products.
	 */
	public LineTransfer lineTransfer(final float[] transfer, final float[] dst) {
		checkTransfer(transfer);
		checkTransfer(dst);
		if (dst == transfer) throw new IllegalArgumentException("The rearranged transfer function needs its own array");
		if (fftw != null) {
			// FFTW's product reads runs of adjacent columns of each plane: the spectrum layout is already sequential
			System.arraycopy(transfer, 0, dst, 0, transfer.length);
			return new LineTransfer(dst, this, false);
		}
		final int n = nz > 1 ? nz : ny > 1 ? ny : 1, outerCount = nz > 1 ? ny : 1, stride = nz > 1 ? 2 * h * ny : 2 * h;
		if (n == 1) {
			System.arraycopy(transfer, 0, dst, 0, transfer.length);
		} else {
			// one outer index at a time: spectrum rows are read whole, and the lines written (h·n complex values)
			// stay in cache until complete
			Parallel.forRange(outerCount, outer -> {
				for (int i = 0; i < n; i++) {
					final int src = 2 * h * outer + i * stride;
					for (int kx = 0, o = 2 * (n * h * outer + i); kx < h; kx++, o += 2 * n) {
						dst[o] = transfer[src + 2 * kx];
						dst[o + 1] = transfer[src + 2 * kx + 1];
					}
				}
			});
		}
		return new LineTransfer(dst, this, n > 1);
	}

	/** {@link #convolveInPlace(float[], float[], boolean, Rows, RowAction, Rows, RowAction)} with a rearranged transfer function: the same results. */
	public void convolveInPlace(final float[] grid, final LineTransfer transfer, final boolean conjugate, final Rows input, final RowAction before,
			final Rows output, final RowAction after) {
		checkGrid(grid);
		if (transfer.owner != this && !sameShape(transfer.owner))
			throw new IllegalArgumentException("The transfer function was made for another transform size");
		checkRows(input);
		checkRows(output);
		if (fftw != null) fftw.convolve(grid, 2 * h, grid, transfer.data, transfer.lines, conjugate, input, before, output, after);
		else convolveRows(grid, 2 * h, grid, transfer.data, transfer.lines, conjugate, input, before, output, after);
	}

	private boolean sameShape(final RealFft o) {
		return o.nx == nx && o.ny == ny && o.nz == nz;
	}

	/** Per-row work on the result of {@link #convolveInPlace}. */
	@FunctionalInterface
	public interface RowAction {
		/** Row {@code row} = y + ny·z, whose real values start at {@code offset} of the grid. */
		void row(int row, int offset);
	}

	/** A box of grid rows, y in [y0, y1) and z in [z0, z1); made by {@link #rows} or {@link #allRows}. */
	public record Rows(int y0, int y1, int z0, int z1) {
		/** Number of rows in the box. */
		public int count() { return (y1 - y0) * (z1 - z0); }

		/** Row index y + ny·z of the i-th row of the box (y fastest). */
		int row(final int i, final int ny) {
			final int w = y1 - y0;
			return y0 + i % w + ny * (z0 + i / w);
		}
	}

	// -- passes --

	private void checkLengths(final float[] real, final float[] spectrum) {
		if (real.length != realLength())
			throw new IllegalArgumentException("Real array has " + real.length + " floats, expected " + realLength());
		if (spectrum.length != spectrumLength())
			throw new IllegalArgumentException("Spectrum array has " + spectrum.length + " floats, expected " + spectrumLength());
	}

	private void checkGrid(final float[] grid) {
		if (grid.length != gridLength()) throw new IllegalArgumentException("Grid array has " + grid.length + " floats, expected " + gridLength());
	}

	private void checkTransfer(final float[] transfer) {
		if (transfer.length != spectrumLength())
			throw new IllegalArgumentException("Transfer function has " + transfer.length + " floats, expected " + spectrumLength());
	}

	private void checkRows(final Rows b) {
		rows(b.y0, b.y1, b.z0, b.z1);
	}

	private void scaleTransfer(final float[] t) {
		final float s = (float) (1.0 / ((double) ny * nz));
		for (int i = 0; i < t.length; i++) t[i] *= s;
	}

	/** Forward transform of the rows in {@code in} of src (row stride srcStride) into spec; other rows read as 0. */
	private void forwardRows(final float[] src, final int srcStride, final float[] spec, final Rows in) {
		checkRows(in);
		if (nz > 1 && ny > 1) {
			forwardPlanes(src, srcStride, spec, in, null);
		} else {
			forwardX(src, srcStride, spec, in, null);
			if (ny > 1) passAxis(spec, 1, true, false, null, false, false, in.z0, in.z1, in.y0, in.y1, 0, ny);
		}
		if (nz > 1) passAxis(spec, 2, true, false, null, false, false, 0, ny, in.z0, in.z1, 0, nz);
	}

	/** Inverse transform of spec (destroyed) into the rows in {@code out} of dst (row stride dstStride). */
	private void inverseRows(final float[] spec, final float[] dst, final int dstStride, final Rows out) {
		checkRows(out);
		if (nz > 1) passAxis(spec, 2, false, true, null, false, false, 0, ny, 0, nz, out.z0, out.z1);
		if (nz > 1 && ny > 1) {
			inversePlanes(spec, dst, dstStride, out, true, null);
		} else {
			if (ny > 1) passAxis(spec, 1, false, true, null, false, false, out.z0, out.z1, 0, ny, out.y0, out.y1);
			inverseX(spec, dst, dstStride, out, null);
		}
	}

	/** Pruned fused convolution: rows in of src → spec → rows out of src (src may be spec). */
	private void convolveRows(final float[] src, final int srcStride, final float[] spec, final float[] t, final boolean tLines, final boolean conj,
			final Rows in, final RowAction before, final Rows out, final RowAction after) {
		checkRows(in);
		checkRows(out);
		if (nz > 1 && ny > 1) {
			forwardPlanes(src, srcStride, spec, in, before);
			passAxis(spec, 2, true, false, t, tLines, conj, 0, ny, in.z0, in.z1, out.z0, out.z1);
			inversePlanes(spec, src, srcStride, out, false, after);
			return;
		}
		forwardX(src, srcStride, spec, in, before);
		if (nz > 1) {
			passAxis(spec, 2, true, false, t, tLines, conj, 0, 1, in.z0, in.z1, out.z0, out.z1);
		} else if (ny > 1) {
			passAxis(spec, 1, true, false, t, tLines, conj, 0, 1, in.y0, in.y1, out.y0, out.y1);
		} else {
			multiply(spec, 0, t, 0, h, conj);
		}
		inverseX(spec, src, srcStride, out, after);
	}

	/**
	 * 3D: x and y transforms of one z plane after the other, so that the plane (nx·ny floats, well within a
	 * core's cache for the sizes used) is read from memory once for both; planes are spread over the threads.
	 */
	private void forwardPlanes(final float[] src, final int srcStride, final float[] spec, final Rows in, final RowAction before) {
		final int blocks = (h + blockY - 1) / blockY;
		Parallel.forRange(in.z1 - in.z0, zi -> {
			final int z = in.z0 + zi;
			for (int y = in.y0; y < in.y1; y++) forwardRow(src, srcStride, spec, y + ny * z, before);
			for (int b = 0; b < blocks; b++) lineBlock(spec, 1, true, false, null, false, false, z, b, in.y0, in.y1, 0, ny);
		});
	}

	/** 3D: inverse y then x transforms of one output plane after the other (see {@link #forwardPlanes}). */
	private void inversePlanes(final float[] spec, final float[] dst, final int dstStride, final Rows out, final boolean scale,
			final RowAction after) {
		final int blocks = (h + blockY - 1) / blockY;
		Parallel.forRange(out.z1 - out.z0, zi -> {
			final int z = out.z0 + zi;
			for (int b = 0; b < blocks; b++) lineBlock(spec, 1, false, scale, null, false, false, z, b, 0, ny, out.y0, out.y1);
			for (int y = out.y0; y < out.y1; y++) inverseRow(spec, dst, dstStride, y + ny * z, after);
		});
	}

	/** Real transforms of the x rows in {@code in}. */
	private void forwardX(final float[] src, final int srcStride, final float[] spec, final Rows in, final RowAction before) {
		Parallel.forRange(in.count(), i -> forwardRow(src, srcStride, spec, in.row(i, ny), before));
	}

	/** Real transform of row r into h complex values: by the split plan, or by JTransforms and unpacked from its packed layout. */
	private void forwardRow(final float[] src, final int srcStride, final float[] spec, final int r, final RowAction before) {
		final int stride = 2 * h, o = r * stride;
		if (before != null) before.row(r, r * srcStride);
		if (src != spec || srcStride != stride) System.arraycopy(src, r * srcStride, spec, o, nx);
		if (nx == 1) {
			spec[o + 1] = 0;
			return;
		}
		final Lines l = lines.get();
		if (l.xSplit != null) {
			l.xSplit.forward(spec, o);
			return;
		}
		l.x.realForward(spec, o);
		// JTransforms packs the last real-valued (even nx) or the last imaginary part (odd nx) into a[1].
		final float packed = spec[o + 1];
		spec[o + 1] = 0;
		if ((nx & 1) == 0) {
			spec[o + nx] = packed;
			spec[o + nx + 1] = 0;
		} else {
			spec[o + nx] = packed;
		}
	}

	private void inverseX(final float[] spec, final float[] dst, final int dstStride, final Rows out, final RowAction after) {
		Parallel.forRange(out.count(), i -> inverseRow(spec, dst, dstStride, out.row(i, ny), after));
	}

	private void inverseRow(final float[] spec, final float[] dst, final int dstStride, final int r, final RowAction after) {
		final int stride = 2 * h, o = r * stride;
		if (nx == 1) {
			dst[r * dstStride] = spec[o];
		} else {
			final Lines l = lines.get();
			if (l.xSplit != null) {
				l.xSplit.inverse(spec, o);
			} else {
				spec[o + 1] = spec[o + nx];
				l.x.realInverse(spec, o, true);
			}
			if (dst != spec || dstStride != stride) System.arraycopy(spec, o, dst, r * dstStride, nx);
		}
		if (after != null) after.row(r, r * dstStride);
	}

	/**
	 * Complex transforms along y (axis 1) or z (axis 2) of the lines of the half spectrum, a block of adjacent
	 * columns at a time. Forward, inverse, or — with a transfer function t — forward, product, inverse.
	 * Lines are taken for the outer index (z for axis 1, y for axis 2) in [o0, o1); line entries in [r0, r1)
	 * are read and the others taken as zero; entries in [w0, w1) are written back.
	 */
	private void passAxis(final float[] spec, final int axis, final boolean forward, final boolean scale, final float[] t, final boolean tLines,
			final boolean conj, final int o0, final int o1, final int r0, final int r1, final int w0, final int w1) {
		final int bs = axis == 1 ? blockY : blockZ, blocks = (h + bs - 1) / bs;
		Parallel.forRange((o1 - o0) * blocks,
				task -> lineBlock(spec, axis, forward, scale, t, tLines, conj, o0 + task / blocks, task % blocks, r0, r1, w0, w1));
	}

	/** The lines of block {@code block} (the columns from kx = block size · block) at outer index {@code outer}; see {@link #passAxis}. */
	private void lineBlock(final float[] spec, final int axis, final boolean forward, final boolean scale, final float[] t, final boolean tLines,
			final boolean conj, final int outer, final int block, final int r0, final int r1, final int w0, final int w1) {
		final int rowStride = 2 * h, planeStride = rowStride * ny;
		final int n = axis == 1 ? ny : nz, stride = axis == 1 ? rowStride : planeStride;
		final int outerStride = axis == 1 ? planeStride : rowStride;
		final int bs = axis == 1 ? blockY : blockZ, kx0 = block * bs, nb = Math.min(bs, h - kx0);
		final int base = outer * outerStride + 2 * kx0;
		final Lines l = lines.get();
		final FloatFFT_1D plan = axis == 1 ? l.y : l.z;
		final float[][] buf = axis == 1 ? l.yBuf : l.zBuf;
		final SplitFft split = axis == 1 ? l.ySplit : l.zSplit;
		gather(spec, base, stride, n, nb, buf, r0, r1, split == null ? null : split.position);
		for (int b = 0; b < nb; b++) {
			if (forward || t != null) {
				if (split != null) split.forward(buf[b]);
				else plan.complexForward(buf[b]);
			}
			if (t != null) {
				if (tLines && split != null) {
					split.multiplyDeinterleave(buf[b], t, 2 * n * (outer * h + kx0 + b), conj);
				} else {
					if (tLines) multiply(buf[b], 0, t, 2 * n * (outer * h + kx0 + b), n, conj);
					else multiplyStrided(buf[b], t, base + 2 * b, stride, n, conj);
					if (split != null) split.deinterleave(buf[b]);
				}
			}
			if (!forward || t != null) {
				if (split != null) split.inverse(buf[b], scale);
				else plan.complexInverse(buf[b], scale);
			}
		}
		scatter(buf, spec, base, stride, nb, w0, w1);
	}

	/**
	 * Lines of buf ← entries [r0, r1) of nb adjacent columns, zero elsewhere; entry i goes to complex position
	 * {@code position[i]} of its line if {@code position} is not null (the de-interleaved layout of
	 * {@link SplitFft}), to position i otherwise.
	 */
	private static void gather(final float[] spec, final int base, final int stride, final int n, final int nb, final float[][] buf, final int r0,
			final int r1, final int[] position) {
		if (r0 > 0 || r1 < n)
			for (int b = 0; b < nb; b++) {
				if (position != null) {
					Arrays.fill(buf[b], 0, 2 * n, 0f);
				} else {
					Arrays.fill(buf[b], 0, 2 * r0, 0f);
					Arrays.fill(buf[b], 2 * r1, 2 * n, 0f);
				}
			}
		for (int i = r0, o = base + r0 * stride; i < r1; i++, o += stride) {
			final int p = 2 * (position == null ? i : position[i]);
			for (int b = 0; b < nb; b++) {
				buf[b][p] = spec[o + 2 * b];
				buf[b][p + 1] = spec[o + 2 * b + 1];
			}
		}
	}

	/** Entries [w0, w1) of nb adjacent columns ← lines of buf. */
	private static void scatter(final float[][] buf, final float[] spec, final int base, final int stride, final int nb, final int w0, final int w1) {
		for (int i = w0, o = base + w0 * stride; i < w1; i++, o += stride)
			for (int b = 0; b < nb; b++) {
				spec[o + 2 * b] = buf[b][2 * i];
				spec[o + 2 * b + 1] = buf[b][2 * i + 1];
			}
	}

	/** line[i] ← line[i] · t[base + i·stride] (complex), conjugating t if asked. */
	private static void multiplyStrided(final float[] line, final float[] t, final int base, final int stride, final int n, final boolean conj) {
		final float sign = conj ? -1f : 1f;
		for (int i = 0, o = base; i < n; i++, o += stride) {
			final float ar = line[2 * i], ai = line[2 * i + 1];
			final float br = t[o], bi = sign * t[o + 1];
			line[2 * i] = ar * br - ai * bi;
			line[2 * i + 1] = ar * bi + ai * br;
		}
	}

	/** a[ao + 2i] ← a · t (complex) for n values. */
	static void multiply(final float[] a, final int ao, final float[] t, final int to, final int n, final boolean conj) {
		final float sign = conj ? -1f : 1f;
		for (int i = 0; i < n; i++) {
			final int p = ao + 2 * i, q = to + 2 * i;
			final float ar = a[p], ai = a[p + 1];
			final float br = t[q], bi = sign * t[q + 1];
			a[p] = ar * br - ai * bi;
			a[p + 1] = ar * bi + ai * br;
		}
	}

	/** Per-thread plans and line buffers: along each axis a split plan or, for other lengths, a JTransforms plan. */
	private final class Lines {
		/** Split plans for lengths 3^a·5^b·2^k (real rows: twice that), faster than JTransforms' mixed-radix path (see {@link SplitFft}). */
		final SplitRealFft xSplit = nx > 1 && SPLIT ? SplitRealFft.forLength(nx) : null;
		final SplitFft ySplit = ny > 1 && SPLIT ? SplitFft.forLength(ny) : null;
		final SplitFft zSplit = nz > 1 && SPLIT ? SplitFft.forLength(nz) : null;
		final FloatFFT_1D x = nx > 1 && xSplit == null ? new FloatFFT_1D(nx) : null;
		final FloatFFT_1D y = ny > 1 && ySplit == null ? new FloatFFT_1D(ny) : null;
		final FloatFFT_1D z = nz > 1 && zSplit == null ? new FloatFFT_1D(nz) : null;
		final float[][] yBuf = ny > 1 ? new float[blockY][2 * ny] : null;
		final float[][] zBuf = nz > 1 ? new float[blockZ][2 * nz] : null;
	}
}
