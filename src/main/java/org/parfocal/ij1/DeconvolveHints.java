package org.parfocal.ij1;

import java.awt.Choice;
import java.awt.Component;
import java.awt.Container;
import java.awt.GraphicsEnvironment;
import java.awt.Label;
import java.awt.TextField;
import java.util.Vector;

import ij.gui.GenericDialog;

import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.Stopping;

/**
 * The hints beside Deconvolve's numbers follow the dialog's state: Iterations says whether all of them run
 * (Stop = after all the iterations) or at most (the change stop), or that the Wiener filter has none;
 * Regularization names what it weighs for the chosen method or says it is not used; Threshold says whether it
 * is used. Reads the components (choices method = 3rd, stop = 4th; numbers iterations, regularization,
 * threshold), never through {@code getNext…}. Also PSF from Beads' box hints, which follow its Optics choice.
 */
final class DeconvolveHints {

	private DeconvolveHints() {}

	/** The three hints for a method and a stopping rule. */
	static String[] hints(final DeconvolutionMethod m, final Stopping stop) {
		final boolean wiener = m == DeconvolutionMethod.WIENER;
		final String iterations = wiener ? "not used: the Wiener filter is one step"
				: stop == Stopping.FIXED ? "all of them run"
				: stop == Stopping.HELD_OUT ? "at most; stops where the result best matches held-out photons" : "at most; stops earlier below the threshold";
		final String regularization = switch (m) {
		case RL_TV -> "total-variation weight (e.g. 0.002)";
		case WIENER -> "Wiener weight, above 0 (e.g. 0.001)";
		default -> "not used by this method";
		};
		final String threshold = wiener || stop != Stopping.RELATIVE_CHANGE ? "not used with this stop" : "relative change that stops";
		return new String[] { iterations, regularization, threshold };
	}

	/** Sets the hints now and whenever the method or the stop changes; nothing without a display or in a macro. */
	static void follow(final GenericDialog gd) {
		if (GraphicsEnvironment.isHeadless() || Commands.isMacro()) return;
		final Vector<?> ch = gd.getChoices(), num = gd.getNumericFields();
		if (ch == null || ch.size() < 4 || num == null || num.size() < 3) return;
		final Choice method = (Choice) ch.get(2), stop = (Choice) ch.get(3);
		final java.util.function.Consumer<Boolean> update = pack -> {
			final String[] h;
			try {
				h = hints(DeconvolutionMethod.parse(ChoiceWords.value("method", method.getSelectedItem())),
						Stopping.parse(ChoiceWords.value("stop", stop.getSelectedItem())));
			} catch (final IllegalArgumentException e) {
				return;
			}
			for (int i = 0; i < 3; i++) {
				final Label l = unitLabel((TextField) num.get(i));
				if (l != null) {
					l.setText(" " + h[i]);
					final Container p = l.getParent();
					if (p != null) p.validate();
				}
			}
			if (pack) gd.pack();
		};
		update.accept(false); // showDialog packs
		method.addItemListener(e -> update.accept(true));
		stop.addItemListener(e -> update.accept(true));
	}

	/** PSF from Beads' box hints: 0 means "from the optics" only when optics are chosen. */
	static String[] beadBoxHints(final boolean optics) {
		return optics ? new String[] { "µm; 0 = from the optics", "µm; 0 = 2D image, or from the optics" }
				: new String[] { "µm (no optics chosen below: enter it)", "µm; 0 = 2D image, else enter it" };
	}

	/**
	 * Keeps PSF from Beads' box hints true to its Optics choice (the 4th choice; numbers box_xy, box_z first);
	 * nothing without a display or in a macro.
	 */
	static void followBeads(final GenericDialog gd, final String none) {
		if (GraphicsEnvironment.isHeadless() || Commands.isMacro()) return;
		final Vector<?> ch = gd.getChoices(), num = gd.getNumericFields();
		if (ch == null || ch.size() < 4 || num == null || num.size() < 2) return;
		final Choice optics = (Choice) ch.get(3);
		final java.util.function.Consumer<Boolean> update = pack -> {
			final String[] h = beadBoxHints(!none.equals(optics.getSelectedItem()));
			for (int i = 0; i < 2; i++) {
				final Label l = unitLabel((TextField) num.get(i));
				if (l != null) l.setText(" " + h[i]);
			}
			if (pack) gd.pack();
		};
		update.accept(false);
		optics.addItemListener(e -> update.accept(true));
	}

	/** The units label GenericDialog puts beside a numeric field, if it has one. */
	static Label unitLabel(final TextField field) {
		final Container p = field.getParent();
		if (p == null) return null;
		for (final Component c : p.getComponents()) if (c instanceof Label l && c != field) return l;
		return null;
	}
}
