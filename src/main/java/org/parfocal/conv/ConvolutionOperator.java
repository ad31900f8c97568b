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
 * cropped window. The PSF's transfer function is computed once, here, and reused by every call.
 * <p>
 * The PSF is used as given; normalise it first ({@link Psfs#normalized}) if flux must be kept.
 * Instances are immutable and thread-safe; each call needs a {@link Workspace} (one per concurrent caller),
 * or allocates one.
 */
public final class ConvolutionOperator {

	private final int[] n, k, before, padded;
	private final Boundary boundary;
	private final RealFft fft;
	private final float[] transfer;
	/** Source index along each axis for every padded position, -1 where the extension is zero. */
	private final int[][] map;

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
		this.transfer = fft.transferFunction(wrappedKernel(psf));
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

	/** Bytes for the transfer function plus one workspace. */
	public static long bytesNeeded(final int[] imageShape, final int[] psfShape) {
		long real = 1, spec = 2;
		for (int d = 0; d < 3; d++) {
			final long p = FastSizes.next(imageShape[d] + psfShape[d] - 1);
			real *= p;
			spec *= d == 0 ? p / 2 + 1 : p;
		}
		return 4 * (2 * spec + real);
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
	public Workspace newWorkspace() { return new Workspace(fft.realLength(), fft.spectrumLength()); }

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
		extend(in, ws.real);
		fft.convolve(ws.real, transfer, false, ws.spectrum);
		crop(ws.real, out);
	}

	/** out ← Hᵀ in (arrays of the image shape; they may be the same array). */
	public void adjoint(final float[] in, final float[] out, final Workspace ws) {
		checkImage(in);
		checkImage(out);
		embed(in, ws.real);
		fft.convolve(ws.real, transfer, true, ws.spectrum);
		fold(ws.real, out);
	}

	// -- boundary handling on the padded grid --

	private void checkImage(final float[] a) {
		if (a.length != n[0] * n[1] * n[2])
			throw new IllegalArgumentException("Array of " + a.length + " values does not match the operator's image " + shapeText(n));
	}

	/** PSF placed with its origin at index 0 of the padded grid (wrapping around). */
	private float[] wrappedKernel(final Volume psf) {
		final float[] kernel = new float[fft.realLength()];
		final float[] h = psf.data();
		for (int z = 0; z < k[2]; z++) {
			final int pz = Math.floorMod(z - (k[2] - 1) / 2, padded[2]);
			for (int y = 0; y < k[1]; y++) {
				final int py = Math.floorMod(y - (k[1] - 1) / 2, padded[1]);
				for (int x = 0; x < k[0]; x++) {
					final int px = Math.floorMod(x - (k[0] - 1) / 2, padded[0]);
					kernel[px + padded[0] * (py + padded[1] * pz)] = h[x + k[0] * (y + k[1] * z)];
				}
			}
		}
		return kernel;
	}

	/** P ← E x on the whole padded grid. */
	private void extend(final float[] x, final float[] p) {
		final int px = padded[0], py = padded[1];
		final int[] mx = map[0];
		Parallel.forRange(py * padded[2], row -> {
			final int sy = map[1][row % py], sz = map[2][row / py], o = row * px;
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
			final int src = before[0] + padded[0] * (y + before[1] + padded[1] * (z + before[2]));
			System.arraycopy(p, src, out, row * n[0], n[0]);
		});
	}

	/** P ← y embedded in the window [before, before + n), zero elsewhere (the transpose of crop). */
	private void embed(final float[] y, final float[] p) {
		Arrays.fill(p, 0f);
		Parallel.forRange(n[1] * n[2], row -> {
			final int yy = row % n[1], z = row / n[1];
			final int dst = before[0] + padded[0] * (yy + before[1] + padded[1] * (z + before[2]));
			System.arraycopy(y, row * n[0], p, dst, n[0]);
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
					final int src = padded[0] * (py + padded[1] * pz);
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

	/** Scratch arrays of one caller: the padded real grid and a half spectrum. */
	public static final class Workspace {
		final float[] real, spectrum;

		Workspace(final int realLength, final int spectrumLength) {
			this.real = new float[realLength];
			this.spectrum = new float[spectrumLength];
		}
	}
}
