package org.parfocal.ij1;

import java.awt.Canvas;
import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.Color;
import java.awt.Dialog;
import java.awt.Dimension;
import java.awt.Graphics;
import java.awt.GraphicsEnvironment;
import java.awt.Image;
import java.awt.Rectangle;
import java.awt.TextField;
import java.awt.event.KeyAdapter;
import java.awt.event.KeyEvent;
import java.awt.event.WindowAdapter;
import java.awt.event.WindowEvent;
import java.util.ArrayList;
import java.util.List;
import java.util.Vector;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.atomic.AtomicInteger;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.gui.GenericDialog;
import ij.process.FloatProcessor;

import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.IterationListener;

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
 * offset, background, checkbox 3 recentre.
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
	private Dialog window;
	private View view;

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
		final Settings s;
		try {
			s = settings();
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
				final Result r = compute(s, () -> g != generation.get() || closed || escaped);
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
			window = null;
		});
	}

	private static void status(final String s) {
		IJ.showStatus(s);
	}

	/** What the dialog says now. */
	record Settings(String image, String psf, DeconvolutionOptions options, boolean recentre) {}

	private Settings settings() {
		final Vector<?> ch = gd.getChoices(), num = gd.getNumericFields(), str = gd.getStringFields(), cb = gd.getCheckboxes();
		final String image = ((Choice) ch.get(0)).getSelectedItem();
		final String psf = ChoiceWords.value("psf", ((Choice) ch.get(1)).getSelectedItem());
		if (Deconvolve.FROM_OPTICS.equals(psf))
			throw new IllegalArgumentException("the PSF from the optics is computed after this dialog: choose an open PSF to preview");
		final DeconvolutionMethod method = DeconvolutionMethod.parse(ChoiceWords.value("method", ((Choice) ch.get(2)).getSelectedItem()));
		final EdgeMode edges = EdgeMode.parse(ChoiceWords.value("edges", ((Choice) ch.get(4)).getSelectedItem()));
		final double iterations = number((TextField) num.get(0), "Iterations"), regularization = number((TextField) num.get(1), "Regularization");
		final DeconvolutionOptions d = DeconvolutionOptions.of(method, (int) Math.max(1, Math.min(MAX_ITERATIONS, Math.rint(iterations))))
				.withRegularization(regularization).withEdges(edges)
				.withOffset(Deconvolve.level("offset", ((TextField) str.get(0)).getText().trim()))
				.withBackground(Deconvolve.level("background", ((TextField) str.get(1)).getText().trim()));
		final boolean recentre = cb.size() > 2 && ((Checkbox) cb.get(2)).getState();
		return new Settings(image, psf, d, recentre);
	}

	private static double number(final TextField f, final String what) {
		try {
			return Double.parseDouble(f.getText().trim());
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException(what + " is not a number");
		}
	}

	/** A preview run: data plane and result plane, the slab's planes (1-based) and the iterations done. */
	record Result(String title, float[] data, float[] result, int width, int height, int z0, int z1, int z, int iterations) {}

	/** The slab around the current plane of {@code s.image()}, deconvolved with a few iterations. */
	static Result compute(final Settings s, final java.util.function.BooleanSupplier cancelled) {
		final ImagePlus imp = Commands.image(s.image(), "image");
		final ImagePlus psfImp = Commands.image(s.psf(), "PSF");
		final Rectangle r = region(imp);
		final int z = imp.getZ();
		int z0 = Math.max(1, z - HALF_SLAB), z1 = Math.min(imp.getNSlices(), z + HALF_SLAB);
		Volume slab = crop(imp, r, z0, z1, imp.getC(), imp.getT());
		final Hyperstack psfAll = ImageBridge.toCore(psfImp);
		final Volume psfChannel = psfAll.get(psfAll.channels() == 1 ? 0 : Math.min(imp.getC(), psfAll.channels()) - 1, 0);
		final ImagePlus onePsf = ImageBridge.toImagePlus(psfChannel, psfImp.getTitle());
		final List<String> notes = new ArrayList<>();
		Volume psf = Deconvolve.psfsFor(Hyperstack.of(slab), onePsf, null, notes, s.recentre()).get(0);
		if (psf.nz() > slab.nz()) { // a deep (widefield) PSF: as many planes as it has, as far as the stack allows
			z0 = Math.max(1, z - psf.nz() / 2);
			z1 = Math.min(imp.getNSlices(), z0 + psf.nz() - 1);
			z0 = Math.max(1, Math.min(z0, z1 - psf.nz() + 1));
			slab = crop(imp, r, z0, z1, imp.getC(), imp.getT());
		}
		if (psf.nx() > slab.nx() || psf.ny() > slab.ny() || psf.nz() > slab.nz()) // the engine takes no PSF larger than the image
			psf = org.parfocal.conv.Psfs.normalized(org.parfocal.conv.Psfs.resizeCentered(psf, Math.min(psf.nx(), slab.nx()), Math.min(psf.ny(), slab.ny()),
					Math.min(psf.nz(), slab.nz())));
		final Volume p = psf, slabData = slab;
		final DeconvolutionResult res = Commands.withImageJThreads(() -> Deconvolution.run(slabData, p, s.options(), null, new Monitor() {
			@Override
			public boolean isCancelled() {
				return cancelled.getAsBoolean() || IJ.escapePressed();
			}
		}, IterationListener.NONE));
		if (IJ.escapePressed()) {
			IJ.resetEscape();
			throw new Monitor.CancelledException();
		}
		final int plane = z - z0, n = r.width * r.height;
		final float[] data = new float[n], result = new float[n];
		System.arraycopy(slabData.data(), plane * n, data, 0, n);
		System.arraycopy(res.estimate().data(), plane * n, result, 0, n);
		return new Result(imp.getTitle(), data, result, r.width, r.height, z0, z1, z, s.options().method() == DeconvolutionMethod.WIENER ? 0 : res.iterations());
	}

	/** The xy region: the rectangle selection if any, else the centre of the visible part; at most MAX_XY square. */
	static Rectangle region(final ImagePlus imp) {
		final int w = imp.getWidth(), h = imp.getHeight();
		Rectangle around = imp.getRoi() != null && imp.getRoi().isArea() ? imp.getRoi().getBounds()
				: imp.getCanvas() != null ? imp.getCanvas().getSrcRect() : new Rectangle(0, 0, w, h);
		final int cw = Math.min(MAX_XY, w), chh = Math.min(MAX_XY, h);
		final int cx = around.x + around.width / 2, cy = around.y + around.height / 2;
		final int x0 = Math.max(0, Math.min(w - cw, cx - cw / 2)), y0 = Math.max(0, Math.min(h - chh, cy - chh / 2));
		return new Rectangle(x0, y0, cw, chh);
	}

	/** Planes z0..z1 (1-based) of channel c, frame t, inside r, as a calibrated volume (raw values, as the bridge reads them). */
	static Volume crop(final ImagePlus imp, final Rectangle r, final int z0, final int z1, final int c, final int t) {
		ImageBridge.check(imp);
		final Volume v = Volume.zeros(r.width, r.height, z1 - z0 + 1, ImageBridge.voxelSize(imp.getCalibration()));
		final ImageStack st = imp.getStack();
		final float[] d = v.data();
		int o = 0;
		for (int z = z0; z <= z1; z++) {
			final var ip = st.getProcessor(imp.getStackIndex(c, z, t));
			for (int y = r.y; y < r.y + r.height; y++)
				for (int x = r.x; x < r.x + r.width; x++) d[o++] = ip.getf(x, y);
		}
		return v;
	}

	// -- the window --

	/** Paints data | preview, each scaled to its own range, at a whole zoom. */
	private static final class View extends Canvas {
		private static final long serialVersionUID = 1L;
		private Image left, right;
		private String leftCaption = "", rightCaption = "";
		private int w, h, zoom = 1;

		void set(final Result r) {
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

	private void show(final Result r) {
		if (closed || !active()) return;
		if (window == null) {
			window = new Dialog(owner(), "Preview of " + r.title() + " (temporary, not saved)", Dialog.ModalityType.MODELESS);
			view = new View();
			window.add(view);
			window.addWindowListener(new WindowAdapter() {
				@Override
				public void windowClosing(final WindowEvent e) {
					box.setState(false);
					hideWindow();
				}
			});
			view.addKeyListener(esc);
			window.addKeyListener(esc);
		}
		window.setTitle("Preview of " + r.title() + " (temporary, not saved)");
		view.set(r);
		window.pack();
		if (!window.isVisible()) {
			window.setLocation(owner().getX() + owner().getWidth() + 8, owner().getY());
			window.setVisible(true);
		}
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
		if (window != null) window.setVisible(false);
	}

	/** The window, for display tests (null until a preview was shown). */
	Dialog window() {
		return window;
	}

	/** The number of runs started (tests: a change must start one). */
	int generation() {
		return generation.get();
	}
}
