package org.parfocal.command;

import java.util.ArrayList;
import java.util.List;

import org.parfocal.conv.Acquisition;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;

/**
 * {@code Convolve with PSF...}'s run without a front end: the PSF re-centred when asked (else checked), then every
 * channel and frame recorded through one {@link Acquisition} (the same seed for each volume). The ImageJ command
 * makes the image, the Log line and the record from the {@link Outcome}. Threads come from the caller's context.
 * No {@code ij.*}, no AWT.
 */
public final class ConvolveRunner {

	private ConvolveRunner() {}

	/**
	 * What a run made.
	 *
	 * @param image the simulated recording, one volume per channel and frame of the object
	 * @param offCentre the warning that the given PSF's centre of mass is off its centre voxel, or null
	 * @param centreOffset the given PSF's centre-of-mass offset (voxels x, y, z) when it was re-centred, else null
	 */
	public record Outcome(Hyperstack image, String offCentre, double[] centreOffset) {}

	/**
	 * Blurs every volume of {@code object} with {@code psf} as {@code request} asks. The request's image and PSF
	 * names are the front end's: {@code object} and {@code psf} are what they name (neither is modified).
	 *
	 * @throws IllegalArgumentException one line, for input the run cannot take
	 */
	public static Outcome run(final ConvolveRequest request, final Hyperstack object, final Volume psf, final Monitor monitor) {
		final String offCentre = Psfs.centroidWarning(psf);
		final Volume used = request.recentre() ? Psfs.recentred(psf) : psf;
		final Acquisition acq = new Acquisition(used, object.first().shape(), request.acquisition());
		final int n = object.volumes().size();
		final List<Volume> vols = new ArrayList<>();
		for (int i = 0; i < n; i++) {
			monitor.progress(i, n, "volume " + (i + 1) + " of " + n);
			vols.add(acq.record(object.volumes().get(i), monitor));
		}
		return new Outcome(new Hyperstack(object.channels(), object.frames(), vols), offCentre,
				request.recentre() ? Psfs.centroidOffset(psf) : null);
	}
}
