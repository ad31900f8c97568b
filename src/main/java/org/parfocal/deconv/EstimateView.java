package org.parfocal.deconv;

import org.parfocal.core.Volume;

/**
 * Read-only view of the current iterate on the image grid (x fastest, as {@link Volume}). It reads the
 * solver's live buffer: valid only during the {@link IterationListener} call that received it; copy what must
 * outlive the call.
 */
public interface EstimateView {

	int nx();

	int ny();

	int nz();

	float get(int x, int y, int z);

	/** Copies the iterate into {@code dst} (length nx·ny·nz, x fastest). */
	void copyTo(float[] dst);

	/** A new volume holding a copy of the iterate. */
	Volume toVolume();

	/**
	 * With {@code background=fit}: the background b of the model Hx + b fitted so far (data units after offset
	 * removal; with {@code fit-smooth} its mean over the image); NaN when the background is fixed (the run's given or estimated level) or the engine does not say.
	 */
	default double background() {
		return Double.NaN;
	}

	/**
	 * With {@code background=fit-smooth}: the fitted background at every voxel of the image (a new array, x
	 * fastest); null otherwise (then {@link #background()} is the whole model's background).
	 */
	default float[] backgroundMap() {
		return null;
	}
}
