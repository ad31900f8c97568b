package org.parfocal.blind;

import org.parfocal.core.Volume;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;

/**
 * Everything a blind deconvolution needs besides the image. Immutable; the constructor rejects invalid
 * combinations with a one-line message, {@link #checkFor(Volume)} those that depend on the image.
 *
 * @param iterations outer iterations, 1 to {@value #MAX_ITERATIONS}
 * @param objectUpdates object updates per outer iteration (k), 1 to {@value #MAX_UPDATES}
 * @param psfUpdates PSF updates per outer iteration (m), 0 (the PSF stays the start: non-blind) to
 *        {@value #MAX_UPDATES}
 * @param objectTv total-variation weight on the object (Dey et al. 2006 form), 0 to {@value #MAX_TV_WEIGHT}
 * @param psfTv total-variation weight on the PSF, 0 to {@value #MAX_TV_WEIGHT}
 * @param start the starting PSF
 * @param support the PSF's box, or null: the given PSF's size, else derived from the optics (or from the
 *        starting Gaussian), see {@link BlindDeconvolution}
 * @param bandLimit project the PSF onto the widefield band limit ({@link OtfSupport}); needs widefield optics
 *        and a calibrated image
 * @param symmetric make the PSF cylindrically symmetric about its lateral origin
 * @param centring keep the PSF's centroid where the starting PSF's was (to the nearest voxel)
 * @param optics the microscope, needed by the band limit and by a model start; may be null otherwise
 * @param snapshotInterval keep the PSF every this many outer iterations, 1 to {@code iterations}
 * @param edges what is assumed beyond the stack edges (as in the non-blind engine)
 * @param offset camera offset, subtracted first
 * @param background constant background b of the model Hx + b
 */
public record BlindOptions(int iterations, int objectUpdates, int psfUpdates, double objectTv, double psfTv, PsfStart start, SupportBox support,
		boolean bandLimit, boolean symmetric, boolean centring, Optics optics, int snapshotInterval, EdgeMode edges, Level offset,
		Level background) {

	public static final int MAX_ITERATIONS = 10_000, MAX_UPDATES = 100;
	/** As in the non-blind engine: above 1/6 the TV denominator could reach zero in 3D. */
	public static final double MAX_TV_WEIGHT = 0.1;
	/** Defaults that work on the sample stacks (see the tests): 30 outer iterations of 1 object and 1 PSF update. */
	public static final int DEFAULT_ITERATIONS = 30, DEFAULT_SNAPSHOT_INTERVAL = 5;
	public static final double DEFAULT_OBJECT_TV = 0.002;

	public BlindOptions {
		if (start == null) throw new IllegalArgumentException("No starting PSF given");
		if (edges == null) edges = EdgeMode.NON_CIRCULANT;
		if (offset == null) offset = Level.NONE;
		if (background == null) background = Level.NONE;
		if (iterations < 1 || iterations > MAX_ITERATIONS)
			throw new IllegalArgumentException("Iterations must be between 1 and " + MAX_ITERATIONS + ", got " + iterations);
		if (objectUpdates < 1 || objectUpdates > MAX_UPDATES)
			throw new IllegalArgumentException("Object updates per iteration must be between 1 and " + MAX_UPDATES + ", got " + objectUpdates);
		if (psfUpdates < 0 || psfUpdates > MAX_UPDATES)
			throw new IllegalArgumentException("PSF updates per iteration must be between 0 and " + MAX_UPDATES + ", got " + psfUpdates);
		if (!(objectTv >= 0 && objectTv <= MAX_TV_WEIGHT))
			throw new IllegalArgumentException("The object total-variation weight must be between 0 and " + MAX_TV_WEIGHT + " (typical 0.002), got " + objectTv);
		if (!(psfTv >= 0 && psfTv <= MAX_TV_WEIGHT))
			throw new IllegalArgumentException("The PSF total-variation weight must be between 0 and " + MAX_TV_WEIGHT + ", got " + psfTv);
		if (snapshotInterval < 1)
			throw new IllegalArgumentException("The snapshot interval must be at least 1, got " + snapshotInterval);
		if (snapshotInterval > iterations)
			throw new IllegalArgumentException("The snapshot interval (" + snapshotInterval + ") is larger than the number of iterations (" + iterations
					+ "): no snapshot would be taken");
		if (background.kind() == Level.Kind.FIT || background.kind() == Level.Kind.FIT_SMOOTH)
			throw new IllegalArgumentException("background=fit is available in Deconvolve only: give a number, auto or dark");
		if (background.kind() == Level.Kind.VALUE && background.value() < 0)
			throw new IllegalArgumentException("The background must be 0 or more, got " + background.value());
		if (bandLimit && optics == null)
			throw new IllegalArgumentException("The band-limit constraint needs the optics (NA, immersion index, emission wavelength): give them or turn the constraint off");
		if (bandLimit && optics.modality() != Modality.WIDEFIELD)
			throw new IllegalArgumentException("The band-limit constraint is derived for widefield optics, not " + optics.modality().key() + ": turn it off");
		if (start instanceof PsfStart.Model && optics == null)
			throw new IllegalArgumentException("A starting PSF from a model needs the optics");
	}

	/**
	 * Defaults: {@value #DEFAULT_ITERATIONS} outer iterations of one object and one PSF update, object TV
	 * {@value #DEFAULT_OBJECT_TV}, no PSF TV, support from the start or the optics, band limit when optics are
	 * given, no symmetry, centring on, a snapshot every {@value #DEFAULT_SNAPSHOT_INTERVAL} iterations,
	 * non-circulant edges, no offset or background.
	 */
	public static BlindOptions of(final PsfStart start, final Optics optics) {
		return new BlindOptions(DEFAULT_ITERATIONS, 1, 1, DEFAULT_OBJECT_TV, 0, start, null, optics != null && optics.modality() == Modality.WIDEFIELD,
				false, true, optics, DEFAULT_SNAPSHOT_INTERVAL, EdgeMode.NON_CIRCULANT, Level.NONE, Level.NONE);
	}

	/**
	 * Checks the options against the image, with one-line messages: support box no larger than the image,
	 * a given PSF of the image's dimensionality, a calibration where lengths in µm are needed.
	 */
	public void checkFor(final Volume image) {
		if (image == null) throw new IllegalArgumentException("No image given");
		final boolean is3D = image.nz() > 1;
		if (start instanceof PsfStart.Given g) {
			final Volume p = g.psf();
			if (p.nz() > 1 && !is3D) throw new IllegalArgumentException("The starting PSF is 3D (" + p.nz() + " slices) but the image is 2D");
			if (p.nz() == 1 && is3D)
				throw new IllegalArgumentException("The starting PSF is 2D but the image is 3D (" + image.nz() + " slices): give a 3D PSF");
		}
		if (support != null) {
			if (support.nz() > 1 && !is3D) throw new IllegalArgumentException("The support box is 3D (" + support + ") but the image is 2D");
			if (support.nx() > image.nx() || support.ny() > image.ny() || support.nz() > image.nz())
				throw new IllegalArgumentException("The PSF support box (" + support + ") is larger than the image (" + image.nx() + " x " + image.ny() + " x "
						+ image.nz() + "): choose a box of at most the image size");
		}
		final boolean needsMicrons = bandLimit || !(start instanceof PsfStart.Given);
		if (needsMicrons && !image.voxelSize().isCalibrated())
			throw new IllegalArgumentException((bandLimit ? "The band-limit constraint" : "A starting PSF from " + start.describe())
					+ " needs the voxel size: calibrate the image (µm)");
		if (needsMicrons) PsfGrid.micronsPer(image.voxelSize());
	}

	public BlindOptions withIterations(final int n) {
		return new BlindOptions(n, objectUpdates, psfUpdates, objectTv, psfTv, start, support, bandLimit, symmetric, centring, optics,
				Math.min(snapshotInterval, n), edges, offset, background);
	}

	/** k object updates and m PSF updates per outer iteration. */
	public BlindOptions withSchedule(final int k, final int m) {
		return new BlindOptions(iterations, k, m, objectTv, psfTv, start, support, bandLimit, symmetric, centring, optics, snapshotInterval, edges, offset,
				background);
	}

	public BlindOptions withRegularization(final double object, final double psf) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, object, psf, start, support, bandLimit, symmetric, centring, optics,
				snapshotInterval, edges, offset, background);
	}

	public BlindOptions withStart(final PsfStart s) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, s, support, bandLimit, symmetric, centring, optics,
				snapshotInterval, edges, offset, background);
	}

	public BlindOptions withSupport(final SupportBox box) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, start, box, bandLimit, symmetric, centring, optics,
				snapshotInterval, edges, offset, background);
	}

	/** Band limit, cylindrical symmetry, centring. */
	public BlindOptions withConstraints(final boolean band, final boolean sym, final boolean centre) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, start, support, band, sym, centre, optics, snapshotInterval,
				edges, offset, background);
	}

	public BlindOptions withSnapshotInterval(final int n) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, start, support, bandLimit, symmetric, centring, optics, n, edges,
				offset, background);
	}

	public BlindOptions withEdges(final EdgeMode e) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, start, support, bandLimit, symmetric, centring, optics,
				snapshotInterval, e, offset, background);
	}

	public BlindOptions withOffset(final Level o) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, start, support, bandLimit, symmetric, centring, optics,
				snapshotInterval, edges, o, background);
	}

	public BlindOptions withBackground(final Level b) {
		return new BlindOptions(iterations, objectUpdates, psfUpdates, objectTv, psfTv, start, support, bandLimit, symmetric, centring, optics,
				snapshotInterval, edges, offset, b);
	}
}
