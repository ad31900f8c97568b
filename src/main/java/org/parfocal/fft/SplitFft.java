package org.parfocal.fft;

import org.jtransforms.fft.FloatFFT_1D;

/**
 * Complex DFT of length n = q·m with q = 3 or 5 and m a power of two (at least {@link #MIN_POWER}) or itself
 * such a length (so n = 3^a·5^b·2^k), as decimation-in-time steps (Cooley &amp; Tukey, Math. Comp. 1965): q
 * transforms of length m (JTransforms' power-of-two plans at the bottom), then a twiddle and a q-point DFT per
 * output frequency. Same convention as JTransforms:
 * X(k) = Σ_j x(j)·exp(−2πi jk/n) forward, the conjugate kernel inverse.
 * <p>
 * <b>Why by hand.</b> JTransforms takes lengths with factors 3 and 5 through its mixed-radix path, which is
 * slower per value than its power-of-two path and, measured here, uneven from one JVM run to the next; the
 * padded sizes of deconvolution are mostly 3^a·5^b·2^k. These steps on top of its power-of-two plans took
 * 0.42–0.93 of the mixed-radix time per line over several runs of {@code bin/parfocal-bench lines}
 * (forward + inverse, one core: n = 320 = 5·64, one step, split 6.8–7.1 ns per value, JTransforms 7.6–16;
 * n = 576 = 3·3·64, two nested steps: 0.82), and about 10 % less CPU time per deconvolution iteration; never
 * more. {@link #forLength} splits off a 3 first, then a 5, and recurses until the remaining length is a power
 * of two of at least {@link #MIN_POWER}. Other lengths (a factor 7 or more, or fewer than 16 in the power of
 * two) go to JTransforms as they are.
 * <p>
 * <b>Layout.</b> Input lines are given <i>de-interleaved</i>: value j sits at complex position
 * {@code position[j] = (j mod q)·m + p(j / q)}, p the inner step's own positions (the identity when the
 * length-m transforms are power-of-two plans), so that the q sub-sequences are contiguous, each already in its
 * inner step's layout (the caller writes them there while gathering the line). Output is in natural order.
 * One instance per thread: it and its inner steps each hold a scratch line.
 */
final class SplitFft {

	/** Shortest power-of-two plan at the bottom of the steps; shorter ones gain nothing. */
	static final int MIN_POWER = 16;

	final int n, q, m;
	/** Complex position of natural index j in the de-interleaved layout. */
	final int[] position;
	/** The transforms of length m: a power-of-two plan, or (exactly one of the two) an inner split. */
	private final FloatFFT_1D sub;
	private final SplitFft inner;
	/** exp(∓2πi r·k/n) for r in [0, q), k in [0, m): (re, im) at 2(r·m + k); forward and inverse (conjugate). */
	private final float[] twiddle, twiddleInverse;
	private final float[] scratch;

	private static final float C51 = (float) Math.cos(2 * Math.PI / 5), C52 = (float) Math.cos(4 * Math.PI / 5);
	private static final float S51 = (float) Math.sin(2 * Math.PI / 5), S52 = (float) Math.sin(4 * Math.PI / 5);
	private static final float S31 = (float) Math.sin(2 * Math.PI / 3);

	/** A split plan for n, or null if n is not 3^a·5^b·2^k (a + b ≥ 1) with 2^k ≥ {@link #MIN_POWER}. */
	static SplitFft forLength(final int n) {
		for (final int q : new int[] { 3, 5 }) {
			if (n % q != 0) continue;
			final int m = n / q;
			if (m >= MIN_POWER && (m & (m - 1)) == 0) return new SplitFft(n, q, m, null);
			final SplitFft in = forLength(m);
			if (in != null) return new SplitFft(n, q, m, in);
		}
		return null;
	}

	private SplitFft(final int n, final int q, final int m, final SplitFft inner) {
		this.n = n;
		this.q = q;
		this.m = m;
		this.inner = inner;
		this.sub = inner == null ? new FloatFFT_1D(m) : null;
		this.position = new int[n];
		for (int j = 0; j < n; j++) position[j] = (j % q) * m + (inner == null ? j / q : inner.position[j / q]);
		this.twiddle = new float[2 * n];
		this.twiddleInverse = new float[2 * n];
		for (int r = 0; r < q; r++)
			for (int k = 0; k < m; k++) {
				final double a = -2 * Math.PI * ((long) r * k % n) / n;
				twiddle[2 * (r * m + k)] = twiddleInverse[2 * (r * m + k)] = (float) Math.cos(a);
				twiddle[2 * (r * m + k) + 1] = (float) Math.sin(a);
				twiddleInverse[2 * (r * m + k) + 1] = -(float) Math.sin(a);
			}
		this.scratch = new float[2 * n];
	}

	/** Forward transform of a de-interleaved line (2n floats); the result, in natural order, replaces it. */
	void forward(final float[] line) {
		forwardAt(line, 0);
	}

	/** Inverse transform of a de-interleaved line, divided by n if {@code scale}; natural order out, in place. */
	void inverse(final float[] line, final boolean scale) {
		inverseAt(line, 0);
		if (scale) {
			final float s = 1f / n;
			for (int i = 0; i < 2 * n; i++) line[i] *= s;
		}
	}

	private void forwardAt(final float[] a, final int off) {
		for (int r = 0; r < q; r++) {
			if (inner != null) inner.forwardAt(a, off + 2 * r * m);
			else sub.complexForward(a, off + 2 * r * m);
		}
		stage(a, off, 1f);
		System.arraycopy(scratch, 0, a, off, 2 * n);
	}

	/** Unscaled inverse of the line at {@code off}. */
	private void inverseAt(final float[] a, final int off) {
		for (int r = 0; r < q; r++) {
			if (inner != null) inner.inverseAt(a, off + 2 * r * m);
			else sub.complexInverse(a, off + 2 * r * m, false);
		}
		stage(a, off, -1f);
		System.arraycopy(scratch, 0, a, off, 2 * n);
	}

	/** A natural-order line rearranged into the de-interleaved layout (through the scratch line), in place. */
	void deinterleave(final float[] line) {
		for (int j = 0; j < n; j++) {
			final int p = 2 * position[j];
			scratch[p] = line[2 * j];
			scratch[p + 1] = line[2 * j + 1];
		}
		System.arraycopy(scratch, 0, line, 0, 2 * n);
	}

	/**
	 * line ← line · t (complex, natural order; t from {@code to}, conjugated if asked), rearranged into the
	 * de-interleaved layout on the way: the product of a fused convolution, ready for {@link #inverse}.
	 */
	void multiplyDeinterleave(final float[] line, final float[] t, final int to, final boolean conj) {
		final float sign = conj ? -1f : 1f;
		final int[] pos = position;
		final float[] out = scratch;
		for (int j = 0; j < n; j++) {
			final float ar = line[2 * j], ai = line[2 * j + 1];
			final float br = t[to + 2 * j], bi = sign * t[to + 2 * j + 1];
			final int p = 2 * pos[j];
			out[p] = ar * br - ai * bi;
			out[p + 1] = ar * bi + ai * br;
		}
		System.arraycopy(out, 0, line, 0, 2 * n);
	}

	/** scratch ← the radix-q step on the transformed sub-sequences in w; sign −1 for the inverse kernel. */
	private void stage(final float[] w, final int off, final float sign) {
		final float[] tw = sign > 0 ? twiddle : twiddleInverse;
		if (q == 3) stage3(w, off, tw, sign);
		else stage5(w, off, tw, sign);
	}

	private void stage3(final float[] w, final int off, final float[] tw, final float sign) {
		final float[] out = scratch;
		final float s = sign * S31;
		for (int k = 0; k < m; k++) {
			final int i1 = 2 * (m + k), i2 = 2 * (2 * m + k);
			final float a0r = w[off + 2 * k], a0i = w[off + 2 * k + 1];
			final float b1r = w[off + i1], b1i = w[off + i1 + 1], t1r = tw[i1], t1i = tw[i1 + 1];
			final float b2r = w[off + i2], b2i = w[off + i2 + 1], t2r = tw[i2], t2i = tw[i2 + 1];
			final float a1r = b1r * t1r - b1i * t1i, a1i = b1r * t1i + b1i * t1r;
			final float a2r = b2r * t2r - b2i * t2i, a2i = b2r * t2i + b2i * t2r;
			final float sr = a1r + a2r, si = a1i + a2i, dr = a1r - a2r, di = a1i - a2i;
			final float cr = a0r - 0.5f * sr, ci = a0i - 0.5f * si;
			out[2 * k] = a0r + sr;
			out[2 * k + 1] = a0i + si;
			out[i1] = cr + s * di;
			out[i1 + 1] = ci - s * dr;
			out[i2] = cr - s * di;
			out[i2 + 1] = ci + s * dr;
		}
	}

	private void stage5(final float[] w, final int off, final float[] tw, final float sign) {
		final float[] out = scratch;
		final float s1 = sign * S51, s2 = sign * S52;
		for (int k = 0; k < m; k++) {
			final int i1 = 2 * (m + k), i2 = 2 * (2 * m + k), i3 = 2 * (3 * m + k), i4 = 2 * (4 * m + k);
			final float a0r = w[off + 2 * k], a0i = w[off + 2 * k + 1];
			final float a1r = w[off + i1] * tw[i1] - w[off + i1 + 1] * tw[i1 + 1], a1i = w[off + i1] * tw[i1 + 1] + w[off + i1 + 1] * tw[i1];
			final float a2r = w[off + i2] * tw[i2] - w[off + i2 + 1] * tw[i2 + 1], a2i = w[off + i2] * tw[i2 + 1] + w[off + i2 + 1] * tw[i2];
			final float a3r = w[off + i3] * tw[i3] - w[off + i3 + 1] * tw[i3 + 1], a3i = w[off + i3] * tw[i3 + 1] + w[off + i3 + 1] * tw[i3];
			final float a4r = w[off + i4] * tw[i4] - w[off + i4 + 1] * tw[i4 + 1], a4i = w[off + i4] * tw[i4 + 1] + w[off + i4 + 1] * tw[i4];
			final float t1r = a1r + a4r, t1i = a1i + a4i, t2r = a2r + a3r, t2i = a2i + a3i;
			final float t3r = a1r - a4r, t3i = a1i - a4i, t4r = a2r - a3r, t4i = a2i - a3i;
			final float c1r = a0r + C51 * t1r + C52 * t2r, c1i = a0i + C51 * t1i + C52 * t2i;
			final float c2r = a0r + C52 * t1r + C51 * t2r, c2i = a0i + C52 * t1i + C51 * t2i;
			final float u1r = s1 * t3r + s2 * t4r, u1i = s1 * t3i + s2 * t4i;
			final float u2r = s2 * t3r - s1 * t4r, u2i = s2 * t3i - s1 * t4i;
			out[2 * k] = a0r + t1r + t2r;
			out[2 * k + 1] = a0i + t1i + t2i;
			out[i1] = c1r + u1i;
			out[i1 + 1] = c1i - u1r;
			out[i4] = c1r - u1i;
			out[i4 + 1] = c1i + u1r;
			out[i2] = c2r + u2i;
			out[i2 + 1] = c2i - u2r;
			out[i3] = c2r - u2i;
			out[i3 + 1] = c2i + u2r;
		}
	}
}
