package org.parfocal.ij1;

import java.awt.Canvas;
import java.awt.Checkbox;
import java.awt.Color;
import java.awt.Dialog;
import java.awt.Dimension;
import java.awt.Graphics;
import java.awt.Image;
import java.awt.Window;
import java.awt.event.KeyListener;
import java.awt.event.WindowAdapter;
import java.awt.event.WindowEvent;

import ij.process.FloatProcessor;

/**
 * The preview's temporary window: data plane | preview plane side by side, owned by the Deconvolve dialog — a
 * plain AWT dialog, not an image window, so it is never the current image, never listed and never recorded.
 * Closing it unticks the preview box. Call on the event thread.
 */
final class PreviewWindow {

	private final Window owner;
	private final Checkbox box;
	private final KeyListener esc;
	private Dialog window;
	private View view;

	PreviewWindow(final Window owner, final Checkbox box, final KeyListener esc) {
		this.owner = owner;
		this.box = box;
		this.esc = esc;
	}

	/** Paints data | preview, each scaled to its own range, at a whole zoom. */
	private static final class View extends Canvas {
		private static final long serialVersionUID = 1L;
		private Image left, right;
		private String leftCaption = "", rightCaption = "";
		private int w, h, zoom = 1;

		void set(final PreviewRun.Result r) {
			w = r.width();
			h = r.height();
			zoom = Math.max(1, Math.min(4, 256 / Math.max(w, h)));
			left = image(r.data(), w, h);
			right = image(r.result(), w, h);
			leftCaption = "data, plane " + r.z();
			rightCaption = (r.iterations() == 0 ? "Wiener filter" : r.iterations() + " iteration(s)") + ", planes " + r.z0() + "-" + r.z1();
			setPreferredSize(new Dimension(Math.max(2 * w * zoom + 12, 300), h * zoom + 24));
			repaint();
		}

		private static Image image(final float[] px, final int w, final int h) {
			final FloatProcessor fp = new FloatProcessor(w, h, px.clone());
			fp.resetMinAndMax();
			return fp.createImage();
		}

		@Override
		public void paint(final Graphics g) {
			g.setColor(Color.DARK_GRAY);
			g.fillRect(0, 0, getWidth(), getHeight());
			if (left == null) return;
			g.drawImage(left, 4, 20, w * zoom, h * zoom, null);
			g.drawImage(right, 8 + w * zoom, 20, w * zoom, h * zoom, null);
			g.setColor(Color.WHITE);
			g.drawString(leftCaption, 4, 14);
			g.drawString(rightCaption, 8 + w * zoom, 14);
		}
	}

	/** Shows {@code r}, opening the window beside the dialog the first time. */
	void show(final PreviewRun.Result r) {
		if (window == null) {
			window = new Dialog(owner, "Preview of " + r.title() + " (temporary, not saved)", Dialog.ModalityType.MODELESS);
			view = new View();
			window.add(view);
			window.addWindowListener(new WindowAdapter() {
				@Override
				public void windowClosing(final WindowEvent e) {
					box.setState(false);
					hide();
				}
			});
			view.addKeyListener(esc);
			window.addKeyListener(esc);
		}
		window.setTitle("Preview of " + r.title() + " (temporary, not saved)");
		view.set(r);
		window.pack();
		if (!window.isVisible()) {
			window.setLocation(owner.getX() + owner.getWidth() + 8, owner.getY());
			window.setVisible(true);
		}
	}

	void hide() {
		if (window != null) window.setVisible(false);
	}

	void dispose() {
		if (window != null) window.dispose();
		window = null;
	}

	/** The window (null until a preview was shown). */
	Dialog window() {
		return window;
	}
}
