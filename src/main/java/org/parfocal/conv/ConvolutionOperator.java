package org.parfocal.conv;

import java.util.Arrays;

import org.parfocal.core.Boundary;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.fft.FastSizes;
import org.parfocal.fft.RealFft;

/**
 * Convolution with one PSF, H x = h ∗ E x restricted to the image grid, for images of one fixed shape.
 * <p>
 * <b>Definition.</b> For an image x of n = (nx, ny, nz) voxels and a PSF h of k = (kx, ky, kz) voxels whose
 * origin is voxel c = ⌊(k − 1)/2⌋ per axis (the centre voxel of an odd-sized PSF),
 * <pre>
 *   (H x)(i) = Σ_j h(j) · (E x)(i − j + c),   0 ≤ i &lt; n,
 * </pre>
 * where E continues x beyond its edges as the {@link Boundary} says. This is {@code scipy.signal.fftconvolve(
 * x_ext, h, mode="same")} on the extended image, cropped back. {@link #adjoint} applies Hᵀ = Eᵀ·(h ⋆ ·), the
 * exact transpose: correlation with h followed by folding the extension back onto the grid (for
 * {@link Boundary#ZERO} the folding is a crop), so ⟨Hx, y⟩ = ⟨x, Hᵀy⟩ for every mode.
 * <p>
 * <b>How.</b> The image is extended by k − 1 − c voxels before and c after, then padded up to a fast FFT size
 * (with zeros, which the cropped window never reads), and convolved circularly; wrap-around never reaches the
 * cropped window. The PSF's transfer function is computed once, here, and reused by every call. The
 * convolution runs in place on one grid ({@link RealFft#convolveInPlace}) and is pruned: only the rows of the
 * extended image are transformed forward and only the rows read back (window, or extension for the fold)
 * inverse.
 * <p>
 * The PSF is used as given; normalise it first ({@link Psfs#normalized}) if flux must be kept.
 * Instances are immutable and thread-safe; each call needs a {@link Workspace} (one per concurrent caller),
 * or allocates one.
 */
public final class ConvolutionOperator {

	private final int[] n, k, before, padded;
	private final Boundary boundary;
	private final RealFft fft;
	private final RealFft.LineTransfer transfer;
	/** Source index along each axis for every padded position, -1 where the extension is zero. */
	private final int[][] map;
	/** Floats per row of the in-place grid. */
	private final int rs;
	/** Grid rows of the extended image (the only non-zero rows of E x) and of the image window. */
	private final RealFft.Rows extendedRows, windowRows;

	private ConvolutionOperator(final int[] n, final Volume psf, final Boundary boundary) {
		this.n = n.clone();
		this.k = psf.shape();
		this.boundary = boundary;
		this.before = new int[3];
		this.padded = new int[3];
		this.map = new int[3][];
		for (int d = 0; d < 3; d++) {
			final int c = (k[d] - 1) / 2;
			before[d] = k[d] - 1 - c;
			padded[d] = FastSizes.next(n[d] + k[d] - 1);
			map[d] = new int[padded[d]];
			// Only [0, n + k - 1) is ever read by the cropped output; the rest of the padding stays zero, which
			// also keeps the transpose (fold) exact.
			for (int p = 0; p < padded[d]; p++) map[d][p] = p < n[d] + k[d] - 1 ? boundary.sourceIndex(p - before[d], n[d]) : -1;
		}
		this.fft = new RealFft(padded[0], padded[1], padded[2]);
		this.rs = fft.rowStride();
		final float[] spectrum = fft.newGrid();
		Psfs.place(psf.data(), k, spectrum, padded, rs, new int[3], false); // origin at voxel 0, wrapping around
		fft.transferFunctionInPlace(spectrum);
		// rearranged for the fused product (sequential reads); the spectrum-layout copy is dropped
		this.transfer = fft.lineTransfer(spectrum, fft.newGrid());
		this.extendedRows = fft.rows(first(map[1]), last(map[1]) + 1, first(map[2]), last(map[2]) + 1);
		this.windowRows = fft.rows(before[1], before[1] + n[1], before[2], before[2] + n[2]);
	}

	private static int first(final int[] map) {
		int p = 0;
		while (map[p] < 0) p++;
		return p;
	}

	private static int last(final int[] map) {
		int p = map.length - 1;
		while (map[p] < 0) p--;
		return p;
	}

	/**
	 * Operator for images of {@code imageShape} = {nx, ny, nz}.
	 *
	 * @throws IllegalArgumentException with a one-line message if the PSF does not suit the image (other
	 *         dimensionality, larger than the image along an axis, non-finite values) or the padded transform
	 *         would not fit in the memory left
	 */
	public static ConvolutionOperator create(final Volume psf, final int[] imageShape, final Boundary boundary) {
		checkPsfFor(psf, imageShape);
		MemoryBudget.require(bytesNeeded(imageShape, psf.shape()), "convolving a " + shapeText(imageShape) + " image");
		return new ConvolutionOperator(imageShape, psf, boundary);
	}

	/** Operator for images shaped like {@code image}. */
	public static ConvolutionOperator create(final Volume psf, final Volume image, final Boundary boundary) {
		return create(psf, image.shape(), boundary);
	}

	/** Rejects PSFs that cannot be used with an image of this shape, with a message a user can act on. */
	public static void checkPsfFor(final Volume psf, final int[] imageShape) {
		if (psf.nz() > 1 && imageShape[2] == 1)
			throw new IllegalArgumentException("The PSF is 3D (" + psf.nz() + " slices) but the image is 2D");
		if (psf.nz() == 1 && imageShape[2] > 1)
			throw new IllegalArgumentException("The PSF is 2D but the image is 3D (" + imageShape[2] + " slices): use a 3D PSF");
		final String[] axis = { "x", "y", "z" };
		final int[] ks = psf.shape();
		for (int d = 0; d < 3; d++)
			if (ks[d] > imageShape[d])
				throw new IllegalArgumentException("The PSF (" + shapeText(ks) + ") is larger than the image (" + shapeText(imageShape)
						+ ") along " + axis[d] + ": crop the PSF to at most the image size");
		final int bad = psf.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException("The PSF has a non-finite value (" + psf.data()[bad] + ") at " + psf.position(bad));
	}

	/** Bytes for the transfer function plus one workspace (one in-place grid). */
	public static long bytesNeeded(final int[] imageShape, final int[] psfShape) {
		long spec = 2;
		for (int d = 0; d < 3; d++) {
			final long p = FastSizes.next(imageShape[d] + psfShape[d] - 1);
			spec *= d == 0 ? p / 2 + 1 : p;
		}
		return 4 * (2 * spec);
	}

	/** Image shape {nx, ny, nz} this operator applies to. */
	public int[] imageShape() { return n.clone(); }

	/** PSF shape. */
	public int[] psfShape() { return k.clone(); }

	/** Shape of the padded transform. */
	public int[] paddedShape() { return padded.clone(); }

	public Boundary boundary() { return boundary; }

	/** The FFT plan of the padded shape (shared, thread-safe). */
	public RealFft fft() { return fft; }

	/** Scratch buffers for one caller at a time. */
	public Workspace newWorkspace() { return new Workspace(fft.gridLength()); }

	/** H x as a new volume with x's calibration; x is not modified. */
	public Volume apply(final Volume x) {
		final Volume out = Volume.zeros(n[0], n[1], n[2], x.voxelSize());
		apply(x.data(), out.data(), newWorkspace());
		return out;
	}

	/** Hᵀ y as a new volume with y's calibration; y is not modified. */
	public Volume adjoint(final Volume y) {
		final Volume out = Volume.zeros(n[0], n[1], n[2], y.voxelSize());
		adjoint(y.data(), out.data(), newWorkspace());
		return out;
	}

	/** out ← H in (arrays of the image shape; they may be the same array). */
	public void apply(final float[] in, final float[] out, final Workspace ws) {
		checkImage(in);
		checkImage(out);
		extend(in, ws.grid);
		fft.convolveInPlace(ws.grid, transfer, false, extendedRows, null, windowRows, null);
		crop(ws.grid, out);
	}

	/** out ← Hᵀ in (arrays of the image shape; they may be the same array). */
	public void adjoint(final float[] in, final float[] out, final Workspace ws) {
		checkImage(in);
		checkImage(out);
		embed(in, ws.grid);
		fft.convolveInPlace(ws.grid, transfer, true, windowRows, null, boundary == Boundary.ZERO ? windowRows : extendedRows, null);
		fold(ws.grid, out);
	}

	// -- boundary handling on the padded grid --

	private void checkImage(final float[] a) {
		if (a.length != n[0] * n[1] * n[2])
			throw new IllegalArgumentException("Array of " + a.length + " values does not match the operator's image " + shapeText(n));
	}

	/** P ← E x on the rows of the extended image (the other rows of E x are zero and never read). */
	private void extend(final float[] x, final float[] p) {
		final int px = padded[0], py = padded[1];
		final int[] mx = map[0];
		final RealFft.Rows b = extendedRows;
		final int w = b.y1() - b.y0();
		Parallel.forRange(b.count(), j -> {
			final int row = b.y0() + j % w + py * (b.z0() + j / w);
			final int sy = map[1][row % py], sz = map[2][row / py], o = row * rs;
			if (sy < 0 || sz < 0) {
				Arrays.fill(p, o, o + px, 0f);
				return;
			}
			final int src = n[0] * (sy + n[1] * sz);
			for (int i = 0; i < px; i++) {
				final int s = mx[i];
				p[o + i] = s < 0 ? 0f : x[src + s];
			}
		});
	}

	/** out ← window [before, before + n) of P. */
	private void crop(final float[] p, final float[] out) {
		Parallel.forRange(n[1] * n[2], row -> {
			final int y = row % n[1], z = row / n[1];
			final int src = before[0] + rs * (y + before[1] + padded[1] * (z + before[2]));
			System.arraycopy(p, src, out, row * n[0], n[0]);
		});
	}

	/**
	 * P ← y embedded in the window [before, before + n), zero elsewhere (the transpose of crop); rows outside
	 * the window are left alone (the pruned transform reads them as zero).
	 */
	private void embed(final float[] y, final float[] p) {
		Parallel.forRange(n[1] * n[2], row -> {
			final int yy = row % n[1], z = row / n[1];
			final int o = rs * (yy + before[1] + padded[1] * (z + before[2])), dst = o + before[0];
			Arrays.fill(p, o, dst, 0f);
			System.arraycopy(y, row * n[0], p, dst, n[0]);
			Arrays.fill(p, dst + n[0], o + padded[0], 0f);
		});
	}

	/**
	 * out ← Eᵀ P: every padded value added to the image voxel it was copied from. Output rows are
	 * independent tasks and each sums its sources in a fixed order, so the result is thread-count invariant.
	 */
	private void fold(final float[] p, final float[] out) {
		if (boundary == Boundary.ZERO) {
			crop(p, out);
			return;
		}
		final int[][][] inverse = { null, inverseMap(map[1], n[1]), inverseMap(map[2], n[2]) };
		final int[] mx = map[0];
		Parallel.forRange(n[1] * n[2], row -> {
			final int y = row % n[1], z = row / n[1], o = row * n[0];
			Arrays.fill(out, o, o + n[0], 0f);
			for (final int pz : inverse[2][z])
				for (final int py : inverse[1][y]) {
					final int src = rs * (py + padded[1] * pz);
					for (int i = 0; i < padded[0]; i++) {
						final int s = mx[i];
						if (s >= 0) out[o + s] += p[src + i];
					}
				}
		});
	}

	/** For each source index, the padded positions that copy it, in increasing order. */
	private static int[][] inverseMap(final int[] map, final int n) {
		final int[] count = new int[n];
		for (final int s : map) if (s >= 0) count[s]++;
		final int[][] inv = new int[n][];
		for (int s = 0; s < n; s++) inv[s] = new int[count[s]];
		Arrays.fill(count, 0);
		for (int p = 0; p < map.length; p++) if (map[p] >= 0) inv[map[p]][count[map[p]]++] = p;
		return inv;
	}

	static String shapeText(final int[] s) {
		return s[2] > 1 ? s[0] + " x " + s[1] + " x " + s[2] : s[0] + " x " + s[1];
	}

	/** Scratch array of one caller: the padded grid, real and spectrum in place. */
	public static final class Workspace {
		final float[] grid;

		Workspace(final int gridLength) {
			this.grid = new float[gridLength];
		}
	}
}
