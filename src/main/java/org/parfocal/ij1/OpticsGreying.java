package org.parfocal.ij1;

import java.awt.Choice;
import java.awt.Color;
import java.awt.Component;
import java.awt.Container;
import java.awt.GraphicsEnvironment;
import java.awt.Label;
import java.awt.TextField;
import java.awt.Window;
import java.util.Vector;

import ij.gui.GenericDialog;

import org.parfocal.psf.Modality;
import org.parfocal.psf.OpticsFields;
import org.parfocal.psf.PsfModel;
import org.parfocal.psf.PsfModels;

/**
 * Greys out the optics dialog's fields that the chosen model and modality do not use ({@link OpticsFields}),
 * again whenever the Model or Modality choice or a box size changes. A greyed field keeps its value, which is
 * still read, recorded and written to the record (under {@code ignored}). It listens to the AWT components
 * rather than being a {@code DialogListener}: {@code GenericDialog.finalizeRecording} hands the recording to the
 * first DialogListener, which must then read every field in order. Nothing without a display or in a macro.
 * Components: choices model (1st), modality (2nd); numeric fields in {@link OpticsFields#FIELDS} order.
 */
final class OpticsGreying {

	private OpticsGreying() {}

	static void follow(final GenericDialog gd) {
		if (GraphicsEnvironment.isHeadless() || Commands.isMacro()) return;
		final Vector<?> ch = gd.getChoices(), num = gd.getNumericFields();
		if (ch == null || ch.size() < 2 || num == null || num.size() < OpticsFields.FIELDS.size()) return;
		final Choice model = (Choice) ch.get(0), modality = (Choice) ch.get(1);
		final TextField sizeXY = field(num, "size_xy"), sizeZ = field(num, "size_z");
		final Runnable update = () -> {
			final PsfModel m;
			final Modality mod;
			try {
				m = PsfModels.get(ChoiceWords.value("model", model.getSelectedItem()));
				mod = Modality.parse(ChoiceWords.value("modality", modality.getSelectedItem()));
			} catch (final IllegalArgumentException e) {
				return;
			}
			final boolean sizesGiven = nonZero(sizeXY) && nonZero(sizeZ);
			for (int i = 0; i < OpticsFields.FIELDS.size(); i++) {
				final boolean used = OpticsFields.relevant(OpticsFields.FIELDS.get(i).key(), m, mod, sizesGiven);
				grey((TextField) num.get(i), used);
			}
		};
		update.run();
		model.addItemListener(e -> update.run());
		modality.addItemListener(e -> update.run());
		sizeXY.addTextListener(e -> update.run());
		sizeZ.addTextListener(e -> update.run());
	}

	/**
	 * Enables or greys one field, its label on the left and its units on the right. AWT on X11 draws a disabled
	 * text field like an enabled one, so a greyed field also takes the dialog's background and grey text.
	 */
	private static void grey(final TextField f, final boolean used) {
		f.setEnabled(used);
		f.setForeground(used ? Color.BLACK : Color.GRAY);
		Component top = f;
		while (top.getParent() != null && !(top.getParent() instanceof Window)) top = top.getParent();
		final Container dialog = top.getParent();
		f.setBackground(used || dialog == null ? Color.WHITE : dialog.getBackground());
		if (dialog == null) return;
		// a field with units sits in a panel with its units label; one without is added to the dialog directly
		final Component unit = top != f ? DeconvolveHints.unitLabel(f) : null;
		if (unit != null) unit.setEnabled(used);
		// GenericDialog adds the field's label just before the field (or before the panel holding field and units)
		final Component[] all = dialog.getComponents();
		for (int i = 1; i < all.length; i++) if (all[i] == top && all[i - 1] instanceof Label l) l.setEnabled(used);
	}

	/** The state of every optics field now: true = in use (tests). */
	static boolean[] enabled(final GenericDialog gd) {
		final Vector<?> num = gd.getNumericFields();
		final boolean[] out = new boolean[OpticsFields.FIELDS.size()];
		for (int i = 0; i < out.length; i++) out[i] = ((TextField) num.get(i)).isEnabled();
		return out;
	}

	private static TextField field(final Vector<?> num, final String key) {
		for (int i = 0; i < OpticsFields.FIELDS.size(); i++) if (OpticsFields.FIELDS.get(i).key().equals(key)) return (TextField) num.get(i);
		throw new IllegalStateException("no optics field " + key);
	}

	private static boolean nonZero(final TextField f) {
		try {
			return Double.parseDouble(f.getText().trim()) != 0;
		} catch (final NumberFormatException e) {
			return false;
		}
	}
}
