package org.parfocal.psf;

import org.parfocal.core.Volume;
import org.scijava.plugin.SciJavaPlugin;

/**
 * A PSF model: a function h: ℝ³ → [0, ∞), the image of a point emitter, computed from the {@link Optics} and
 * sampled on a {@link PsfGrid}.
 * <ul>
 * <li>Units: positions and voxel sizes in micrometres (µm); the returned volume's {@code VoxelSize} is in µm.</li>
 * <li>Origin: the emitter is imaged at the centre voxel ((n−1)/2 per axis, sizes are odd); z is the nominal
 * focus position (stage movement) relative to the emitter, so with aberrations the peak may lie off centre.</li>
 * <li>Normalisation: the voxels sum to 1 (within float rounding, ~1e-7).</li>
 * <li>Sampling: lateral values are pixel-area averages, see {@link Sampling}.</li>
 * </ul>
 * Implementations are stateless and thread-safe; they spread their work over the threads of the caller's
 * {@code Parallelization} context and give identical results for any thread count. Invalid input is rejected
 * with an {@link IllegalArgumentException} carrying a one-line message, before anything is allocated.
 * <p>
 * A new model is one class: implement this interface (or extend {@link PupilPsfModel}) and annotate it
 * {@code @Plugin(type = PsfModel.class)}; {@link PsfModels} finds it.
 */
public interface PsfModel extends SciJavaPlugin {

	/** Short lower-case name, the macro value of the model option (e.g. "born-wolf"). Public API. */
	String key();

	/** One line for dialogs and provenance. */
	String description();

	/** The sampled, unit-sum PSF. */
	Volume compute(Optics optics, PsfGrid grid, Sampling sampling);

	/**
	 * True if the PSF depends on the layers of Gibson &amp; Lanni's geometry ({@link Optics}: sample index and
	 * depth, coverslip in use, the objective's design values, working distance); false for models that use
	 * only NA, the immersion index and the wavelengths. {@link OpticsFields} marks the layer fields ignored when false.
	 */
	default boolean usesLayers() {
		return false;
	}

	/** The sampled, unit-sum PSF with {@link Sampling#AUTO}. */
	default Volume compute(final Optics optics, final PsfGrid grid) {
		return compute(optics, grid, Sampling.AUTO);
	}
}
