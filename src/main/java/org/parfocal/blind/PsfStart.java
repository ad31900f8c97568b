package org.parfocal.blind;

import org.parfocal.core.Volume;

/**
 * Where the PSF estimate starts. Immutable.
 * <ul>
 * <li>{@link Model}: a PSF model from optics ({@link org.parfocal.psf.PsfModels}, e.g. "gibson-lanni"),
 * computed with {@link BlindOptions#optics()} on the support box at the image's voxel size;</li>
 * <li>{@link Given}: a PSF volume (e.g. a recorded bead), used as it is if it already has the size of the
 * support box, else cropped or zero-padded about its origin voxel; negative values are set to zero and it is
 * scaled to unit sum;</li>
 * <li>{@link Gaussian}: a separable Gaussian of the given full widths at half maximum (µm), sampled at the
 * voxel centres.</li>
 * </ul>
 */
public sealed interface PsfStart {

	/** Short name for reports and provenance. */
	String describe();

	static PsfStart model(final String key) { return new Model(key); }

	static PsfStart given(final Volume psf) { return new Given(psf); }

	static PsfStart gaussian(final double fwhmLateral, final double fwhmAxial) { return new Gaussian(fwhmLateral, fwhmAxial); }

	/** A PSF model from optics, by key. */
	record Model(String key) implements PsfStart {
		public Model {
			if (key == null || key.isBlank()) throw new IllegalArgumentException("No PSF model given for the starting PSF");
		}

		@Override
		public String describe() { return "model " + key; }
	}

	/** A given PSF volume (not modified; a copy is used). */
	record Given(Volume psf) implements PsfStart {
		public Given {
			if (psf == null) throw new IllegalArgumentException("No starting PSF image given");
		}

		@Override
		public String describe() { return "given PSF " + psf.nx() + " x " + psf.ny() + " x " + psf.nz(); }
	}

	/** A Gaussian of these FWHMs in µm (the axial one is ignored for 2D images). */
	record Gaussian(double fwhmLateral, double fwhmAxial) implements PsfStart {
		public Gaussian {
			if (!(fwhmLateral > 0) || !Double.isFinite(fwhmLateral) || !(fwhmAxial > 0) || !Double.isFinite(fwhmAxial))
				throw new IllegalArgumentException("The starting Gaussian's widths (FWHM) must be positive, got " + fwhmLateral + " and " + fwhmAxial + " µm");
		}

		@Override
		public String describe() { return "Gaussian FWHM " + fwhmLateral + " x " + fwhmAxial + " µm"; }
	}
}
