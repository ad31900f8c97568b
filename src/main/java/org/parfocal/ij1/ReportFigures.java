package org.parfocal.ij1;

import java.awt.Color;
import java.awt.image.BufferedImage;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.util.Locale;

import javax.imageio.ImageIO;

import ij.gui.Plot;
import ij.process.FloatProcessor;

import org.parfocal.core.Volume;
import org.parfocal.provenance.HtmlReport;

/**
 * The images of {@link WriteReport}: maximum projections with scale bars and display ranges, grey renderings
 * (linear or log), number formatting and PNG encoding. Rendered without a display.
 */
final class ReportFigures {

	private ReportFigures() {}

	/**
	 * Maximum projections along z (XY view) and along y (XZ view, stretched to the voxel aspect), each with a
	 * scale bar and its display range (0.1–99.9 % of the projection's values, linear) in the caption.
	 */
	static void projections(final HtmlReport report, final String what, final Volume v) {
		final FloatProcessor[] p = maxProjections(v);
		final double zoom = Math.max(1, Math.min(4, 256.0 / v.nx()));
		final double[] r = range(p[0]);
		report.figure(what + ": maximum projection along z (XY), display range " + fmt(r[0]) + " – " + fmt(r[1]) + " (linear)" + calibrationText(v),
				png(withScaleBar(render(p[0], r[0], r[1], zoom, 1, false), v, zoom)));
		if (v.nz() > 1) {
			final double aspect = v.voxelSize().dz() / v.voxelSize().dx();
			final double[] rz = range(p[1]);
			report.figure(what + ": maximum projection along y (XZ, z stretched to the voxel aspect), display range " + fmt(rz[0]) + " – " + fmt(rz[1]),
					png(withScaleBar(render(p[1], rz[0], rz[1], zoom, aspect, false), v, zoom)));
		}
	}

	/** XY and XZ maximum projections. */
	static FloatProcessor[] maxProjections(final Volume v) {
		final FloatProcessor xy = new FloatProcessor(v.nx(), v.ny()), xz = new FloatProcessor(v.nx(), Math.max(1, v.nz()));
		final float[] a = (float[]) xy.getPixels(), b = (float[]) xz.getPixels();
		java.util.Arrays.fill(a, Float.NEGATIVE_INFINITY);
		java.util.Arrays.fill(b, Float.NEGATIVE_INFINITY);
		for (int z = 0; z < v.nz(); z++)
			for (int y = 0; y < v.ny(); y++)
				for (int x = 0; x < v.nx(); x++) {
					final float q = v.get(x, y, z);
					if (q > a[y * v.nx() + x]) a[y * v.nx() + x] = q;
					if (q > b[z * v.nx() + x]) b[z * v.nx() + x] = q;
				}
		return new FloatProcessor[] { xy, xz };
	}

	/** 0.1 % and 99.9 % quantiles of the values (min and max when they coincide). */
	static double[] range(final FloatProcessor fp) {
		final float[] s = ((float[]) fp.getPixels()).clone();
		java.util.Arrays.sort(s);
		double lo = s[(int) Math.floor(0.001 * (s.length - 1))], hi = s[(int) Math.ceil(0.999 * (s.length - 1))];
		if (!(hi > lo)) {
			lo = s[0];
			hi = s[s.length - 1] > lo ? s[s.length - 1] : lo + 1;
		}
		return new double[] { lo, hi };
	}

	/** Grey image of {@code fp} between lo and hi (log10 when {@code log}), enlarged by {@code zoom}, rows by {@code aspect}. */
	static BufferedImage render(final FloatProcessor fp, final double lo, final double hi, final double zoom, final double aspect, final boolean log) {
		final int w = fp.getWidth(), h = fp.getHeight();
		final int W = (int) Math.round(w * zoom), H = (int) Math.max(1, Math.round(h * zoom * aspect));
		final BufferedImage img = new BufferedImage(W, H, BufferedImage.TYPE_INT_RGB);
		for (int Y = 0; Y < H; Y++)
			for (int X = 0; X < W; X++) {
				final double q = fp.getf(Math.min(w - 1, (int) (X / zoom)), Math.min(h - 1, (int) (Y / (zoom * aspect))));
				double t = log ? (Math.log10(Math.max(q, 1e-30)) - lo) / (hi - lo) : (q - lo) / (hi - lo);
				t = Math.max(0, Math.min(1, t));
				final int g = (int) Math.round(255 * t);
				img.setRGB(X, Y, (g << 16) | (g << 8) | g);
			}
		return img;
	}

	/** A white bar of a round length (about a fifth of the width) in the lower left corner, labelled. */
	static BufferedImage withScaleBar(final BufferedImage img, final Volume v, final double zoom) {
		final var vs = v.voxelSize();
		if (!vs.isCalibrated()) return img;
		final double widthUnits = img.getWidth() / zoom * vs.dx();
		final double bar = niceLength(widthUnits / 5);
		final int px = (int) Math.round(bar / vs.dx() * zoom);
		final java.awt.Graphics2D g = img.createGraphics();
		g.setRenderingHint(java.awt.RenderingHints.KEY_TEXT_ANTIALIASING, java.awt.RenderingHints.VALUE_TEXT_ANTIALIAS_ON);
		final int x0 = 6, y0 = img.getHeight() - 8;
		g.setColor(Color.black);
		g.fillRect(x0 - 1, y0 - 5, px + 2, 6);
		g.setColor(Color.white);
		g.fillRect(x0, y0 - 4, px, 4);
		g.setFont(new java.awt.Font(java.awt.Font.SANS_SERIF, java.awt.Font.BOLD, 11));
		final String label = fmt(bar) + " " + vs.unit();
		if (img.getHeight() > 24) {
			g.setColor(Color.black);
			g.drawString(label, x0 + 1, y0 - 8);
			g.setColor(Color.white);
			g.drawString(label, x0, y0 - 9);
		}
		g.dispose();
		return img;
	}

	/** 1, 2 or 5 times a power of ten, at most {@code target}. */
	static double niceLength(final double target) {
		final double p = Math.pow(10, Math.floor(Math.log10(target)));
		for (final double m : new double[] { 5, 2, 1 }) if (m * p <= target) return m * p;
		return p;
	}

	static String calibrationText(final Volume v) {
		final var vs = v.voxelSize();
		return vs.isCalibrated() ? "; voxel " + fmt(vs.dx()) + " × " + fmt(vs.dy()) + " × " + fmt(vs.dz()) + " " + vs.unit() : "; uncalibrated";
	}

	/** Four significant digits, without trailing zeros. */
	static String fmt(final double v) {
		String t = String.format(Locale.ROOT, "%.4g", v);
		if (t.contains(".") && !t.contains("e")) t = t.replaceAll("0+$", "").replaceAll("\\.$", "");
		return t;
	}

	static byte[] png(final Plot plot) {
		return png(plot.getProcessor().getBufferedImage());
	}

	static byte[] png(final BufferedImage img) {
		try (ByteArrayOutputStream bytes = new ByteArrayOutputStream()) {
			ImageIO.write(img, "png", bytes);
			return bytes.toByteArray();
		} catch (final IOException e) {
			throw new IllegalStateException("Cannot encode a PNG: " + e.getMessage());
		}
	}
}
