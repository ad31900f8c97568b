package org.parfocal.fft;

import net.imglib2.parallel.Parallelization;
import net.imglib2.parallel.TaskExecutor;

import org.jtransforms.fft.FloatFFT_1D;
import org.parfocal.core.Parallel;

/**
 * Discrete Fourier transform of real 1D, 2D and 3D data of any size, X(k) = Σ_n x(n)·exp(−2πi k·n/N).
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
 * <b>Threads.</b> Work is split over lines with the {@link TaskExecutor} of the calling thread's
 * {@link Parallelization} context. Every line is transformed by the same sequence of operations whatever the
 * number of threads, so results are bitwise identical for 1 and N threads. Each worker thread keeps its own
 * JTransforms plans and line buffers (plans hold state), and JTransforms' global thread setting is left
 * alone: lines shorter than its 1D threshold (8192) are transformed single-threaded inside.
 * <p>
 * Instances are thread-safe: any number of threads may call {@link #forward}, {@link #inverse} and
 * {@link #convolve} at once on different arrays.
 */
public final class RealFft {

	/** Complex columns gathered together along y and z, so that each row read touches one cache line. */
	private static final int BLOCK = 8;

	private final int nx, ny, nz, h;
	private final ThreadLocal<Lines> lines;

	/** Plan for a real array of nx × ny × nz (use 1 for absent dimensions). */
	public RealFft(final int nx, final int ny, final int nz) {
		if (nx < 1 || ny < 1 || nz < 1)
			throw new IllegalArgumentException("Transform sizes must be at least 1, got " + nx + " x " + ny + " x " + nz);
		if ((long) 2 * (nx / 2 + 1) * ny * nz > Integer.MAX_VALUE - 8)
			throw new IllegalArgumentException("Transform of " + nx + " x " + ny + " x " + nz + " is too large for one block");
		this.nx = nx;
		this.ny = ny;
		this.nz = nz;
		this.h = nx / 2 + 1;
		this.lines = ThreadLocal.withInitial(Lines::new);
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
		forwardX(real, spectrum);
		if (ny > 1) passAxis(spectrum, 1, true, false, null, false);
		if (nz > 1) passAxis(spectrum, 2, true, false, null, false);
	}

	/**
	 * Inverse transform of {@code spectrum} (destroyed) into {@code real}, divided by nx·ny·nz, so that
	 * {@code inverse(forward(x)) == x}.
	 */
	public void inverse(final float[] spectrum, final float[] real) {
		checkLengths(real, spectrum);
		if (nz > 1) passAxis(spectrum, 2, false, true, null, false);
		if (ny > 1) passAxis(spectrum, 1, false, true, null, false);
		inverseX(spectrum, real);
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
		if (transfer.length != spectrumLength())
			throw new IllegalArgumentException("Transfer function has " + transfer.length + " floats, expected " + spectrumLength());
		forwardX(real, work);
		if (nz > 1) {
			if (ny > 1) passAxis(work, 1, true, false, null, false);
			passAxis(work, 2, true, false, transfer, conjugate);
			if (ny > 1) passAxis(work, 1, false, false, null, false);
		} else if (ny > 1) {
			passAxis(work, 1, true, false, transfer, conjugate);
		} else {
			multiply(work, 0, transfer, 0, h, conjugate);
		}
		inverseX(work, real);
	}

	/**
	 * Transfer function for {@link #convolve}: the spectrum of {@code kernel} (real, full size, origin at
	 * index 0 with wrap-around) divided by ny·nz. (The x pass always scales its inverse by 1/nx: JTransforms'
	 * unscaled 1D real inverse is not a plain multiple of the data for every length.)
	 */
	public float[] transferFunction(final float[] kernel) {
		final float[] t = newSpectrum();
		forward(kernel, t);
		final float s = (float) (1.0 / ((double) ny * nz));
		for (int i = 0; i < t.length; i++) t[i] *= s;
		return t;
	}

	// -- passes --

	private void checkLengths(final float[] real, final float[] spectrum) {
		if (real.length != realLength())
			throw new IllegalArgumentException("Real array has " + real.length + " floats, expected " + realLength());
		if (spectrum.length != spectrumLength())
			throw new IllegalArgumentException("Spectrum array has " + spectrum.length + " floats, expected " + spectrumLength());
	}

	/** Real transforms of every x row, unpacked from JTransforms' packed layout into h complex values. */
	private void forwardX(final float[] real, final float[] spec) {
		final int rows = ny * nz, stride = 2 * h;
		Parallel.forRange(rows, r -> {
			final int o = r * stride;
			System.arraycopy(real, r * nx, spec, o, nx);
			if (nx == 1) {
				spec[o + 1] = 0;
				return;
			}
			lines.get().x.realForward(spec, o);
			// JTransforms packs the last real-valued (even nx) or the last imaginary part (odd nx) into a[1].
			final float packed = spec[o + 1];
			spec[o + 1] = 0;
			if ((nx & 1) == 0) {
				spec[o + nx] = packed;
				spec[o + nx + 1] = 0;
			} else {
				spec[o + nx] = packed;
			}
		});
	}

	private void inverseX(final float[] spec, final float[] real) {
		final int rows = ny * nz, stride = 2 * h;
		Parallel.forRange(rows, r -> {
			final int o = r * stride;
			if (nx == 1) {
				real[r] = spec[o];
				return;
			}
			spec[o + 1] = spec[o + nx];
			lines.get().x.realInverse(spec, o, true);
			System.arraycopy(spec, o, real, r * nx, nx);
		});
	}

	/**
	 * Complex transforms along y (axis 1) or z (axis 2) of every line of the half spectrum, BLOCK adjacent
	 * columns at a time. Forward, inverse, or — with a transfer function t — forward, product, inverse.
	 */
	private void passAxis(final float[] spec, final int axis, final boolean forward, final boolean scale, final float[] t,
			final boolean conj) {
		final int rowStride = 2 * h, planeStride = rowStride * ny;
		final int n = axis == 1 ? ny : nz, stride = axis == 1 ? rowStride : planeStride;
		final int outer = axis == 1 ? nz : ny, outerStride = axis == 1 ? planeStride : rowStride;
		final int blocks = (h + BLOCK - 1) / BLOCK;
		Parallel.forRange(outer * blocks, task -> {
			final int kx0 = (task % blocks) * BLOCK, nb = Math.min(BLOCK, h - kx0);
			final int base = (task / blocks) * outerStride + 2 * kx0;
			final Lines l = lines.get();
			final FloatFFT_1D plan = axis == 1 ? l.y : l.z;
			final float[][] buf = axis == 1 ? l.yBuf : l.zBuf;
			gather(spec, base, stride, n, nb, buf);
			for (int b = 0; b < nb; b++) {
				if (forward || t != null) plan.complexForward(buf[b]);
				if (t != null) multiplyStrided(buf[b], t, base + 2 * b, stride, n, conj);
				if (!forward || t != null) plan.complexInverse(buf[b], scale);
			}
			scatter(buf, spec, base, stride, n, nb);
		});
	}

	private static void gather(final float[] spec, final int base, final int stride, final int n, final int nb, final float[][] buf) {
		for (int i = 0, o = base; i < n; i++, o += stride)
			for (int b = 0; b < nb; b++) {
				buf[b][2 * i] = spec[o + 2 * b];
				buf[b][2 * i + 1] = spec[o + 2 * b + 1];
			}
	}

	private static void scatter(final float[][] buf, final float[] spec, final int base, final int stride, final int n, final int nb) {
		for (int i = 0, o = base; i < n; i++, o += stride)
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

	/** Per-thread plans and line buffers. */
	private final class Lines {
		final FloatFFT_1D x = nx > 1 ? new FloatFFT_1D(nx) : null;
		final FloatFFT_1D y = ny > 1 ? new FloatFFT_1D(ny) : null;
		final FloatFFT_1D z = nz > 1 ? new FloatFFT_1D(nz) : null;
		final float[][] yBuf = ny > 1 ? new float[BLOCK][2 * ny] : null;
		final float[][] zBuf = nz > 1 ? new float[BLOCK][2 * nz] : null;
	}
}
