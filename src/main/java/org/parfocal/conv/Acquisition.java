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

	private final ConvolutionOperator op;
	private final Options options;

	/** Prepares the operator for objects shaped like {@code shape}; checks the PSF. */
	public Acquisition(final Volume psf, final int[] shape, final Options options) {
		this.options = options;
		this.op = ConvolutionOperator.create(options.normalizePsf() ? Psfs.normalized(psf) : psf, shape, options.boundary());
	}

	/** The simulated recording of {@code object} (not modified), as a new volume with its calibration. */
	public Volume record(final Volume object, final Monitor monitor) {
		final int bad = object.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException("The image has a non-finite value (" + object.data()[bad] + ") at " + object.position(bad));
		monitor.checkCancelled();
		final Volume y = op.apply(object);
		if (options.background() != 0) {
			final float b = (float) options.background();
			final float[] d = y.data();
			for (int i = 0; i < d.length; i++) d[i] += b;
		}
		monitor.checkCancelled();
		final Volume out = options.photons() > 0 ? Noise.poisson(y, options.photons(), options.seed()) : y;
		if (options.offset() != 0) {
			final float o = (float) options.offset();
			final float[] d = out.data();
			for (int i = 0; i < d.length; i++) d[i] += o;
		}
		return out;
	}
}
