package org.parfocal.conv;

import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Noise;
import org.parfocal.core.Volume;

/**
 * A simulated acquisition: y = Poisson(s · (h ∗ x + b)) / s + o, the forward model every deconvolution in
 * Parfocal inverts (h the PSF, b a constant background that carries shot noise, s photons per intensity unit,
 * o a camera offset added without noise).
 */
public final class Acquisition {

	/**
	 * @param boundary how the object continues beyond the image edges
	 * @param normalizePsf scale the PSF to unit sum first (keeps total intensity)
	 * @param background constant b added after blurring (≥ 0)
	 * @param photons photons per intensity unit s for Poisson noise; 0 for none
	 * @param seed seed of the noise
	 * @param offset constant camera offset added last, without noise
	 */
	public record Options(Boundary boundary, boolean normalizePsf, double background, double photons, long seed, double offset) {
		public Options {
			if (boundary == null) throw new IllegalArgumentException("No boundary given");
			if (!(background >= 0) || !Double.isFinite(background)) throw new IllegalArgumentException("Background must be 0 or more, got " + background);
			if (!(photons >= 0) || !Double.isFinite(photons)) throw new IllegalArgumentException("Photons must be 0 (no noise) or more, got " + photons);
			if (!Double.isFinite(offset)) throw new IllegalArgumentException("Offset must be a finite number, got " + offset);
		}
	}

	/**
	 * Largest expected photon count per voxel simulated: beyond it the Poisson noise (relative σ = 1/√n, here
	 * 3e-8) is below float precision, and counts drawn as long integers lose exactness near 2^53.
	 */
	public static final double MAX_EXPECTED_PHOTONS = 1e15;

	private final ConvolutionOperator op;
	private final Options options;

	/** Prepares the operator for objects shaped like {@code shape}; checks the PSF. */
	public Acquisition(final Volume psf, final int[] shape, final Options options) {
		this.options = options;
		if (!options.normalizePsf()) {
			final double sum = psf.sum();
			if (!(sum > 0) || !Double.isFinite(sum))
				throw new IllegalArgumentException("The PSF sums to " + sum + " (all zero or negative): the recording would hold only background, "
						+ "offset and noise; give a PSF with a positive sum");
		}
		this.op = ConvolutionOperator.create(options.normalizePsf() ? Psfs.normalized(psf) : psf, shape, options.boundary());
	}

	/** The simulated recording of {@code object} (not modified), as a new volume with its calibration. */
	public Volume record(final Volume object, final Monitor monitor) {
		final int bad = object.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException("The image has a non-finite value (" + object.data()[bad] + ") at " + object.position(bad));
		if (options.photons() > 0) {
			float min = Float.POSITIVE_INFINITY;
			for (final float v : object.data()) min = Math.min(min, v);
			if (min < 0) throw new IllegalArgumentException("The image has negative values (minimum " + min + "): Poisson noise needs a "
					+ "non-negative object (photons cannot be negative); shift or clip it, or use photons=0 for no noise");
		}
		monitor.checkCancelled();
		final Volume y = op.apply(object);
		if (options.background() != 0) {
			final float b = (float) options.background();
			final float[] d = y.data();
			for (int i = 0; i < d.length; i++) d[i] += b;
		}
		monitor.checkCancelled();
		if (options.photons() > 0) {
			float max = 0;
			for (final float v : y.data()) max = Math.max(max, v);
			if (max * options.photons() > MAX_EXPECTED_PHOTONS)
				throw new IllegalArgumentException("photons=" + options.photons() + " gives up to " + String.format(java.util.Locale.ROOT, "%.3g", max * options.photons())
						+ " expected photons in a voxel, more than " + String.format(java.util.Locale.ROOT, "%.0e", MAX_EXPECTED_PHOTONS)
						+ ": the noise would be far below float precision (and counts overflow); use photons=0 for no noise");
		}
		final Volume out = options.photons() > 0 ? Noise.poisson(y, options.photons(), options.seed()) : y;
		if (options.offset() != 0) {
			final float o = (float) options.offset();
			final float[] d = out.data();
			for (int i = 0; i < d.length; i++) d[i] += o;
		}
		return out;
	}
}
