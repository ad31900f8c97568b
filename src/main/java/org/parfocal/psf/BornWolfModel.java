package org.parfocal.psf;

import org.scijava.plugin.Plugin;

/**
 * Scalar Born &amp; Wolf PSF: the Kirchhoff diffraction integral of a uniformly filled circular pupil with
 * defocus (Born &amp; Wolf, Principles of Optics, §8.8):
 * <pre>  I(r, z) = |2 ∫₀¹ J₀(k·NA·r·ρ) exp(−i·k·z·√(n_i² − NA²ρ²)) ρ dρ|²,  k = 2π/λ.</pre>
 * The defocus phase is the exact (non-paraxial) path k·z·n<sub>i</sub>·cos θ with sin θ = NAρ/n<sub>i</sub>, not
 * its paraxial expansion z·NA²ρ²/(2n<sub>i</sub>); in focus the integral is the Airy pattern
 * (2·J₁(v)/v)², v = k·NA·r, at any NA. Uses NA, the immersion index and the wavelengths only: the sample index,
 * layers and depth are ignored (use {@link GibsonLanniModel} for those).
 */
@Plugin(type = PsfModel.class, name = BornWolfModel.KEY, priority = 300)
public class BornWolfModel extends PupilPsfModel {

	public static final String KEY = "born-wolf";

	@Override
	public String key() { return KEY; }

	@Override
	public String description() { return "Born & Wolf scalar diffraction, no aberration"; }
}
