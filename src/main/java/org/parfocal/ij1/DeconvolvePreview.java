package org.parfocal.ij1;

import java.awt.Checkbox;
import java.awt.Dialog;
import java.awt.Choice;
import java.awt.GraphicsEnvironment;
import java.awt.TextField;
import java.awt.event.KeyAdapter;
import java.awt.event.KeyEvent;
import java.util.List;
import java.util.Vector;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.atomic.AtomicInteger;

import ij.IJ;
import ij.gui.GenericDialog;

import org.parfocal.core.Monitor;

/**
 * The preview of the Deconvolve dialog: ImageJ's preview checkbox ({@link GenericDialog#addPreviewCheckbox},
 * which the Recorder never records), and while it is ticked a few iterations ({@value #MAX_ITERATIONS} at most)
 * of the chosen method on the neighbourhood of the plane in view: at most {@value #MAX_XY} × {@value #MAX_XY}
 * pixels around the centre of the visible part of the image (or its rectangle selection) and
 * {@value #HALF_SLAB} planes on either side of the current plane, for the current channel and frame. The data
 * plane and the preview plane are shown side by side in a temporary window owned by the dialog — not an image
 * window, so it is never the current image, never in the image lists and never recorded. A PSF deeper than the
 * slab widens the slab to its depth where the stack allows; what is still larger than the region is cropped
 * about its centre (and normalised again) for the preview only. Each change of a field
 * starts a new run (the running one is abandoned at its next iteration); Esc stops it; closing the dialog
 * closes the window. Offset and background "auto" are estimated on the slab, so the preview's levels may differ
 * a little from the full run's.
 * <p>
 * The fields are read from the dialog's components (never through {@code getNext…}, which would record them):
 * choices image, psf, method, stop, edges (in this order, first), numbers iterations, regularization, strings
 * offset, background, checkbox 3 recentre. A run is {@link PreviewRun}; the window is {@link PreviewWindow}.
 */
final class DeconvolvePreview {

	static final int MAX_ITERATIONS = 5, MAX_XY = 96, HALF_SLAB = 3;
	/** Pause after a change before a run starts, so typing a number starts one run, not one per key. */
	private static final long SETTLE_MS = 300;

	private final GenericDialog gd;
	private final Checkbox box;
	private final ExecutorService worker = Executors.newSingleThreadExecutor(r -> {
		final Thread t = new Thread(r, "Parfocal preview");
		t.setDaemon(true);
		return t;
	});
	private final AtomicInteger generation = new AtomicInteger();
	private volatile boolean closed, escaped;
	private PreviewWindow window;

	private DeconvolvePreview(final GenericDialog gd, final Checkbox box) {
		this.gd = gd;
		this.box = box;
	}

	/** Adds the preview checkbox and its listeners; null without a display or in a macro (no dialog is shown). */
	static DeconvolvePreview attach(final GenericDialog gd) {
		if (GraphicsEnvironment.isHeadless() || Commands.isMacro()) return null;
		gd.addPreviewCheckbox(null, "Preview (a few iterations near the current plane)");
		final Checkbox box = gd.getPreviewCheckbox();
		if (box == null) return null;
		final DeconvolvePreview p = new DeconvolvePreview(gd, box);
		box.addItemListener(e -> p.changed());
		for (final Object c : orEmpty(gd.getChoices())) ((Choice) c).addItemListener(e -> p.changed());
		for (final Object f : orEmpty(gd.getNumericFields())) ((TextField) f).addTextListener(e -> p.changed());
		for (final Object f : orEmpty(gd.getStringFields())) ((TextField) f).addTextListener(e -> p.changed());
		for (final Object c : orEmpty(gd.getCheckboxes())) if (c != box) ((Checkbox) c).addItemListener(e -> p.changed());
		final KeyAdapter esc = new KeyAdapter() {
			@Override
			public void keyPressed(final KeyEvent e) {
				if (e.getKeyCode() == KeyEvent.VK_ESCAPE) p.escape();
			}
		};
		box.addKeyListener(esc);
		p.esc = esc;
		return p;
	}

	/** Esc in the dialog's preview box or in the preview window stops the run. */
	private KeyAdapter esc;

	private static List<?> orEmpty(final Vector<?> v) {
		return v == null ? List.of() : v;
	}

	/** True while the checkbox is ticked. */
	boolean active() {
		return box.getState() && !closed;
	}

	private void changed() {
		escaped = false;
		final int g = generation.incrementAndGet();
		if (!active()) {
			java.awt.EventQueue.invokeLater(this::hideWindow);
			return;
		}
		final PreviewRun.Settings s;
		try {
			s = PreviewRun.settings(gd);
		} catch (final RuntimeException e) {
			status("Preview: " + e.getMessage());
			return;
		}
		worker.submit(() -> {
			try {
				Thread.sleep(SETTLE_MS);
			} catch (final InterruptedException e) {
				return;
			}
			if (g != generation.get() || closed) return;
			try {
				final PreviewRun.Result r = PreviewRun.compute(s, () -> g != generation.get() || closed || escaped);
				if (g == generation.get() && !closed) java.awt.EventQueue.invokeLater(() -> show(r));
			} catch (final Monitor.CancelledException e) {
				if (escaped) status("Preview stopped (Esc); change a field to run it again");
			} catch (final RuntimeException | OutOfMemoryError e) {
				status("Preview: " + e.getMessage());
			}
		});
	}

	private void escape() {
		escaped = true;
		generation.incrementAndGet();
		status("Preview stopped (Esc); change a field to run it again");
	}

	/** Stops any run and closes the window (call when the dialog has closed). */
	void close() {
		closed = true;
		generation.incrementAndGet();
		worker.shutdownNow();
		java.awt.EventQueue.invokeLater(() -> {
			if (window != null) window.dispose();
		});
	}

	private static void status(final String s) {
		IJ.showStatus(s);
	}

	private void show(final PreviewRun.Result r) {
		if (closed || !active()) return;
		if (window == null) window = new PreviewWindow(owner(), box, esc);
		window.show(r);
		status("Preview: " + r.iterations() + " iteration(s) on " + r.width() + " x " + r.height() + " x " + (r.z1() - r.z0() + 1) + " voxels");
	}

	/**
	 * The dialog as a window. Without a display ij1-patcher gives GenericDialog another superclass, so the
	 * bytecode must not pass it where a Window is expected (the class would not verify): a checked cast at use.
	 */
	private java.awt.Window owner() {
		return (java.awt.Window) (Object) gd;
	}

	private void hideWindow() {
		if (window != null) window.hide();
	}

	/** The window, for display tests (null until a preview was shown). */
	Dialog window() {
		return window == null ? null : window.window();
	}

	/** The number of runs started (tests: a change must start one). */
	int generation() {
		return generation.get();
	}
}
