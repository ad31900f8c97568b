package org.parfocal.ij1;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.Rectangle;
import java.awt.TextField;
import java.util.ArrayList;
import java.util.List;
import java.util.Vector;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.gui.GenericDialog;

import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.IterationListener;
import org.parfocal.deconv.Level;

/**
 * One run of Deconvolve's preview ({@link DeconvolvePreview}): the slab around the current plane, its PSF fitted
 * to the slab, a few iterations, and the data and result planes.
 */
final class PreviewRun {

	private PreviewRun() {}

	/** What the dialog says now (read from its components, never through {@code getNext…}). */
	record Settings(String image, String psf, DeconvolutionOptions options, boolean recentre) {}

	static Settings settings(final GenericDialog gd) {
		final Vector<?> ch = gd.getChoices(), num = gd.getNumericFields(), str = gd.getStringFields(), cb = gd.getCheckboxes();
		final String image = ((Choice) ch.get(0)).getSelectedItem();
		final String psf = ChoiceWords.value("psf", ((Choice) ch.get(1)).getSelectedItem());
		if (Deconvolve.FROM_OPTICS.equals(psf))
			throw new IllegalArgumentException("the PSF from the optics is computed after this dialog: choose an open PSF to preview");
		final DeconvolutionMethod method = DeconvolutionMethod.parse(ChoiceWords.value("method", ((Choice) ch.get(2)).getSelectedItem()));
		final EdgeMode edges = EdgeMode.parse(ChoiceWords.value("edges", ((Choice) ch.get(4)).getSelectedItem()));
		final double iterations = number((TextField) num.get(0), "Iterations"), regularization = number((TextField) num.get(1), "Regularization");
		// the preview runs no background fit; the levels that follow the PSF (by-psf, dark-or-median) it runs as Deconvolve does
		final String bg = ((TextField) str.get(1)).getText().trim();
		final boolean byPsf = bg.equalsIgnoreCase("by-psf") || bg.equalsIgnoreCase("dark-or-median");
		final DeconvolutionOptions d = DeconvolutionOptions.of(method, (int) Math.max(1, Math.min(DeconvolvePreview.MAX_ITERATIONS, Math.rint(iterations))))
				.withRegularization(regularization).withEdges(edges)
				.withOffset(Level.parse("offset", ((TextField) str.get(0)).getText().trim(), false))
				.withBackground(Level.parse("background", bg, byPsf));
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
		int z0 = Math.max(1, z - DeconvolvePreview.HALF_SLAB), z1 = Math.min(imp.getNSlices(), z + DeconvolvePreview.HALF_SLAB);
		Volume slab = crop(imp, r, z0, z1, imp.getC(), imp.getT());
		final Hyperstack psfAll = ImageBridge.toCore(psfImp);
		final Volume psfChannel = psfAll.get(psfAll.channels() == 1 ? 0 : Math.min(imp.getC(), psfAll.channels()) - 1, 0);
		final ImagePlus onePsf = ImageBridge.toImagePlus(psfChannel, psfImp.getTitle());
		final List<String> notes = new ArrayList<>();
		Volume psf = DeconvolvePsfs.psfsFor(Hyperstack.of(slab), onePsf, null, notes, s.recentre()).get(0);
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

	/** The xy region: the rectangle selection if any, else the centre of the visible part; at most DeconvolvePreview.MAX_XY square. */
	static Rectangle region(final ImagePlus imp) {
		final int w = imp.getWidth(), h = imp.getHeight();
		Rectangle around = imp.getRoi() != null && imp.getRoi().isArea() ? imp.getRoi().getBounds()
				: imp.getCanvas() != null ? imp.getCanvas().getSrcRect() : new Rectangle(0, 0, w, h);
		final int cw = Math.min(DeconvolvePreview.MAX_XY, w), chh = Math.min(DeconvolvePreview.MAX_XY, h);
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
}
