package org.parfocal.ij1;

import java.awt.Choice;
import java.awt.Container;
import java.awt.GraphicsEnvironment;
import java.awt.Label;
import java.awt.TextField;
import java.util.Vector;
import java.util.function.Consumer;

import ij.gui.GenericDialog;

/**
 * The hints beside Blind Deconvolve's numbers follow its choices: FWHM_xy/FWHM_z say whether the Gaussian start
 * uses them (and when a model fit cannot start from the chosen image), Support_xy/Support_z name the unit chosen,
 * Trust_radius says whether the estimate uses it. Reads the components (choices psf = 2nd, support_units = 3rd,
 * estimate = 5th; numbers fwhm_xy, fwhm_z first, support_xy, support_z 8th and 9th, trust_radius 11th), never
 * through {@code getNext…}, with labels found as {@link DeconvolveHints#unitLabel} finds them.
 */
final class BlindHints {

	private BlindHints() {}

	/** Indices of the numeric fields whose hints follow, in the order of {@link #hints}. */
	static final int[] FIELDS = { 0, 1, 7, 8, 10 };

	/** The hints of fwhm_xy, fwhm_z, support_xy, support_z and trust_radius for a start, a support unit and an estimate (macro values). */
	static String[] hints(final String psf, final String units, final String estimate) {
		final boolean gaussian = BlindDeconvolve.GAUSSIAN.equals(psf), optics = BlindDeconvolve.FROM_OPTICS.equals(psf);
		final boolean fit = !BlindDeconvolve.FREE_FORM.equals(estimate);
		final boolean refined = BlindDeconvolve.MODEL_FIT_REFINED.equals(estimate) || BlindDeconvolve.WIDEFIELD_FIT_REFINED.equals(estimate);
		final String xy, z;
		if (gaussian) {
			xy = "µm, lateral width of the Gaussian start";
			z = "µm, axial width of the Gaussian start";
		} else if (fit && !optics) {
			xy = "not used; a model fit needs the Gaussian or the optics start";
			z = "not used";
		} else {
			xy = "not used: the start is " + (optics ? "computed from the optics" : "the image chosen");
			z = "not used";
		}
		final String unit = BlindDeconvolve.MICRONS.equals(units) ? "µm" : "voxels, odd";
		final String trust = refined ? "largest distance of a refined PSF to the fitted model" : "not used: only with a fit, then refine";
		return new String[] { xy, z, "PSF box width (" + unit + "); 0 = automatic", "PSF box depth (" + unit + "); 0 = automatic", trust };
	}

	/** Sets the hints now and whenever the image, start, unit or estimate changes; nothing without a display or in a macro. */
	static void follow(final GenericDialog gd) {
		if (GraphicsEnvironment.isHeadless() || Commands.isMacro()) return;
		final Vector<?> ch = gd.getChoices(), num = gd.getNumericFields();
		if (ch == null || ch.size() < 5 || num == null || num.size() <= FIELDS[FIELDS.length - 1]) return;
		final Choice image = (Choice) ch.get(0), psf = (Choice) ch.get(1), units = (Choice) ch.get(2), estimate = (Choice) ch.get(4);
		final Consumer<Boolean> update = pack -> {
			final String[] h = hints(ChoiceWords.value("psf", psf.getSelectedItem()), ChoiceWords.value("support_units", units.getSelectedItem()),
					ChoiceWords.value("estimate", estimate.getSelectedItem()));
			for (int i = 0; i < FIELDS.length; i++) {
				final Label l = DeconvolveHints.unitLabel((TextField) num.get(FIELDS[i]));
				if (l == null) continue;
				l.setText(" " + h[i]);
				final Container p = l.getParent();
				if (p != null) p.validate();
			}
			if (pack) gd.pack();
		};
		update.accept(false); // showDialog packs
		for (final Choice c : new Choice[] { image, psf, units, estimate }) c.addItemListener(e -> update.accept(true));
	}
}
