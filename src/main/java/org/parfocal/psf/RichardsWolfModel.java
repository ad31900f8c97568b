package org.parfocal.psf;

import org.scijava.plugin.Plugin;

/**
 * Vectorial high-NA PSF after Richards &amp; Wolf (Proc. R. Soc. A 253:358, 1959), with the Gibson &amp; Lanni
 * aberration of {@link GibsonLanniModel} as the pupil phase. With θ the angle in the immersion medium
 * (sin θ = NA·ρ/n<sub>i</sub>) and the aplanatic factor √cos θ,
 * <pre>  I₀ = ∫ √cosθ sinθ (1 + cosθ) J₀(k n_i r sinθ) e^{iΦ} dθ
 *  I₁ = ∫ √cosθ sin²θ J₁(k n_i r sinθ) e^{iΦ} dθ
 *  I₂ = ∫ √cosθ sinθ (1 − cosθ) J₂(k n_i r sinθ) e^{iΦ} dθ
 *  I  = |I₀|² + 2|I₁|² + |I₂|²</pre>
 * the electric energy density averaged over the azimuth of a linear polarisation (equivalently unpolarised or
 * circular light), which is radially symmetric (from the Richards &amp; Wolf field components, derived here).
 * Integrated over ρ with dθ = (NA/n<sub>i</sub>)·dρ/cos θ. Fresnel transmission at the layer interfaces is not
 * included. The scalar models lose accuracy above NA ≈ 1.2 (the axial field components I₁, I₂ grow with the
 * aperture angle); use this model there.
 */
@Plugin(type = PsfModel.class, name = RichardsWolfModel.KEY, priority = 100)
public class RichardsWolfModel extends GibsonLanniModel {

	public static final String KEY = "richards-wolf";

	@Override
	public String key() { return KEY; }

	@Override
	public String description() { return "Richards & Wolf vectorial, with Gibson & Lanni aberration (for NA above ~1.2)"; }

	@Override
	protected int channels() { return 3; }

	@Override
	protected int besselOrder(final int c) { return c; }

	@Override
	protected double channelWeight(final int c) { return c == 1 ? 2 : 1; }

	@Override
	protected double pupilAmplitude(final int c, final Optics o, final double rho) {
		final double sin = o.na() * rho / o.immersionIndex(), cos = Math.sqrt(1 - sin * sin), sq = Math.sqrt(cos);
		switch (c) {
		case 0: return rho * (1 + cos) / sq;
		case 1: return rho * sin / sq;
		default: return rho * (1 - cos) / sq;
		}
	}
}
