package org.parfocal.psf;

import org.scijava.plugin.Plugin;

/**
 * Scalar PSF with the depth-dependent spherical aberration of Gibson &amp; Lanni (JOSA A 8(10):1601, 1991): the
 * Born &amp; Wolf integral with the optical path difference between the actual and the design layers. With
 * s = NA·ρ and q(n) = √(n² − s²), for an emitter {@code depth} = d below the coverslip and a nominal focus z from
 * it (the stage moved by d + z from the coverslip surface, thinning the immersion layer by as much):
 * <pre>  OPD(ρ) = (t<sub>i</sub>* − d − z)·q(n<sub>i</sub>) + d·q(n<sub>s</sub>) + t<sub>g</sub>·q(n<sub>g</sub>) − t<sub>i</sub>*·q(n<sub>i</sub>*) − t<sub>g</sub>*·q(n<sub>g</sub>*)</pre>
 * (the exact, non-paraxial form as written e.g. by Li, Xue &amp; Blu, JOSA A 34(6), 2017, from memory;
 * t<sub>i</sub>* is the working distance). At design values every term but −z·q(n<sub>i</sub>) cancels and the
 * model equals {@link BornWolfModel}. For an oil objective in water (n<sub>s</sub> &lt; n<sub>i</sub>) the focus
 * lands at about n<sub>s</sub>/n<sub>i</sub> of the nominal depth (paraxial), so the peak of the PSF moves to
 * z ≈ d·(n<sub>i</sub>/n<sub>s</sub> − 1) &gt; 0.
 * <p>
 * Where s exceeds a layer's index the wave is evanescent in it: q is imaginary and the ray's amplitude decays
 * as exp(−k·t·|q|) (sample and actual coverslip); a design term that would be evanescent is dropped.
 */
@Plugin(type = PsfModel.class, name = GibsonLanniModel.KEY, priority = 200)
public class GibsonLanniModel extends PupilPsfModel {

	public static final String KEY = "gibson-lanni";

	@Override
	public String key() { return KEY; }

	@Override
	public String description() { return "Gibson & Lanni: scalar, with depth-dependent spherical aberration"; }

	/** The depth aberration uses every layer (Richards &amp; Wolf inherits it). */
	@Override
	public boolean usesLayers() { return true; }

	@Override
	protected void aberration(final Optics o, final double rho, final double[] out) {
		final double s = o.na() * rho, s2 = s * s;
		final double d = o.depth(), ti = o.workingDistance();
		double re = (ti - d) * Math.sqrt(o.immersionIndex() * o.immersionIndex() - s2);
		re -= ti * Math.sqrt(o.immersionIndexDesign() * o.immersionIndexDesign() - s2);
		final double qd = o.coverslipIndexDesign() * o.coverslipIndexDesign() - s2;
		if (qd > 0) re -= o.coverslipThicknessDesign() * Math.sqrt(qd);
		double im = 0;
		final double qs = o.sampleIndex() * o.sampleIndex() - s2;
		if (qs >= 0) re += d * Math.sqrt(qs);
		else im += d * Math.sqrt(-qs);
		final double qg = o.coverslipIndex() * o.coverslipIndex() - s2;
		if (qg >= 0) re += o.coverslipThickness() * Math.sqrt(qg);
		else im += o.coverslipThickness() * Math.sqrt(-qg);
		out[0] = re;
		out[1] = im;
	}

	@Override
	protected double[] breakpoints(final Optics o) {
		return new double[] { o.sampleIndex() / o.na(), o.coverslipIndex() / o.na(), o.coverslipIndexDesign() / o.na() };
	}
}
