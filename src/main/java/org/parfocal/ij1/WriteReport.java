package org.parfocal.ij1;

import java.awt.Color;
import java.awt.image.BufferedImage;
import java.io.ByteArrayOutputStream;
import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import javax.imageio.ImageIO;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.gui.Plot;
import ij.io.FileInfo;
import ij.plugin.PlugIn;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

import org.parfocal.core.Volume;
import org.parfocal.provenance.HtmlReport;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.psf.Fwhm;

/**
 * {@code Plugins > Parfocal > Write Report...}: a self-contained HTML report for the current image, made from its
 * provenance record: warnings first, then what was done, maximum projections (XY and XZ, with scale bars and their
 * display ranges) of the result and of its input when open, the PSF on a log scale, zoomed, with its profiles and
 * FWHM, the convergence curve and the watch curves, the inputs with their calibration, parameters, run facts,
 * versions. Figures are rendered without a display. An existing report is never replaced unless {@code replace} is
 * given.
 * <p>
 * Macro keys (public API): {@code file replace}.
 */
public class WriteReport implements PlugIn {

	static final String COMMAND = "Write Report";

	public record Options(String file, boolean replace) {
		public String macroOptions() {
			return "file=" + MacroOptions.quote(file) + (replace ? " replace" : "");
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.provenance.CommandKeys.WRITE_REPORT, () -> {
			final ImagePlus imp = WindowManager.getCurrentImage();
			if (imp == null) throw new IllegalArgumentException("No image is open");
			if (ImageProvenance.of(imp).isEmpty())
				throw new IllegalArgumentException("'" + imp.getTitle() + "' has no Parfocal provenance to report (Image > Show Info shows what ImageJ knows)");
			final GenericDialog gd = new GenericDialog(COMMAND);
			gd.addStringField("File:", defaultFile(imp), 50);
			gd.addCheckbox("Replace an existing report", false);
			gd.addHelp(DialogHelp.report().html());
			gd.showDialog();
			if (gd.wasCanceled()) throw Commands.cancelled();
			final File f = write(imp, new Options(gd.getNextString().trim(), gd.getNextBoolean()));
			IJ.log(COMMAND + ": wrote " + f.getPath());
		});
	}

	/** Beside the image's file if it has one, else in the current folder. */
	static String defaultFile(final ImagePlus imp) {
		final FileInfo fi = imp.getOriginalFileInfo();
		final String dir = fi != null && fi.directory != null && !fi.directory.isEmpty() ? fi.directory : System.getProperty("user.dir");
		return new File(dir, ConvolveWithPsf.stripExtension(imp.getTitle()) + "-report.html").getPath();
	}

	/** Writes the report of {@code imp}; returns the file. */
	public static File write(final ImagePlus imp, final Options o) {
		final var p = ImageProvenance.of(imp).orElseThrow(() -> new IllegalArgumentException("'" + imp.getTitle() + "' has no Parfocal provenance"));
		if (o.file().isEmpty()) throw new IllegalArgumentException("No report file given (file=)");
		final File f = new File(o.file());
		if (f.exists() && !o.replace()) throw new IllegalArgumentException("'" + f.getPath() + "' exists; give another name or add 'replace'");
		final File dir = f.getAbsoluteFile().getParentFile();
		if (dir == null || !dir.isDirectory() || !dir.canWrite()) throw new IllegalArgumentException("Cannot write into the folder of '" + f.getPath() + "'");
		final HtmlReport report = new HtmlReport(p, imp.getTitle());
		final var outCore = ImageBridge.toCore(imp);
		for (int c = 0; c < Math.min(4, outCore.channels()); c++)
			projections(report, "result" + (outCore.channels() > 1 ? " channel " + (c + 1) : ""), outCore.get(c, 0));
		for (final var in : p.inputs()) {
			final ImagePlus open = WindowManager.getImage(in.title());
			if (open == null || open == imp || open.getType() == ImagePlus.COLOR_RGB || in.role().equals("reference")) continue;
			final Volume v = ImageBridge.toCore(open).first();
			if (in.role().equals("psf")) psf(report, "psf '" + in.title() + "'", v);
			else projections(report, in.role() + " '" + in.title() + "'", v);
		}
		if (p.command().startsWith("PSF from") || p.command().equals("Blind Deconvolve") && imp.getTitle().contains("-psf")) psf(report, "result", outCore.first());
		final Object rc = p.run().get("relative_change");
		if (rc instanceof List<?> list && !list.isEmpty()) report.figure("Convergence: relative change between successive iterates (log scale), "
				+ (outCore.volumes().size() > 1 ? "channel 1" : "") + " " + list.size() + " iterations", png(convergence(list)));
		for (final var e : p.run().entrySet())
			if (e.getKey().startsWith("watch_curve") && e.getValue() != null) {
				final String suffix = e.getKey().substring("watch_curve".length());
				final Object sug = p.run().get("suggested_iteration" + suffix);
				final Object floor = p.run().get("watch_floor" + suffix);
				final Plot w = watch(String.valueOf(e.getValue()), sug instanceof Number n ? n.intValue() : -1, floor instanceof Number fl ? fl.doubleValue() : Double.NaN);
				if (w != null) report.figure("Watch" + (suffix.isEmpty() ? "" : " (volume " + suffix.substring(1) + ")") + ": patch distance to the references"
						+ (floor instanceof Number ? " ÷ their noise floor" : "") + " and re-blur chi-square per iteration; the dashed line is the suggested iteration"
						+ (sug != null ? " (" + sug + ")" : "") + "; 1 = indistinguishable from the references / consistent with the noise", png(w));
			}
		try {
			final byte[] html = report.toHtml().getBytes(StandardCharsets.UTF_8);
			if (o.replace()) Files.write(f.toPath(), html);
			else org.parfocal.core.OutputFiles.writeExactly(f.toPath(), out2 -> out2.write(html)); // atomic: never replaces a file another run made meanwhile
		} catch (final java.nio.file.FileAlreadyExistsException e) {
			throw new IllegalArgumentException("'" + f.getPath() + "' exists; give another name or add 'replace'");
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot write '" + f.getPath() + "': " + e.getMessage());
		}
		return f;
	}

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

	private static String calibrationText(final Volume v) {
		final var vs = v.voxelSize();
		return vs.isCalibrated() ? "; voxel " + fmt(vs.dx()) + " × " + fmt(vs.dy()) + " × " + fmt(vs.dz()) + " " + vs.unit() : "; uncalibrated";
	}

	/** Four significant digits, without trailing zeros. */
	static String fmt(final double v) {
		String t = String.format(Locale.ROOT, "%.4g", v);
		if (t.contains(".") && !t.contains("e")) t = t.replaceAll("0+$", "").replaceAll("\\.$", "");
		return t;
	}

	/**
	 * The PSF seen so that it shows: XY and XZ maximum projections of its central part (where it exceeds 10⁻³ of
	 * its peak, at least 9 voxels), on a log scale over three decades, enlarged; then its profiles and FWHM.
	 */
	static void psf(final HtmlReport report, final String what, final Volume psf) {
		final FloatProcessor[] p = maxProjections(psf);
		final float peak = (float) new ij.process.FloatStatistics(p[0]).max;
		final int[] c = Fwhm.peak(psf);
		int rx = 4, rz = 2;
		for (int x = 0; x < psf.nx(); x++) if (p[0].getf(x, c[1]) > 1e-3 * peak) rx = Math.max(rx, Math.abs(x - c[0]));
		for (int z = 0; z < psf.nz(); z++) if (p[1].getf(c[0], z) > 1e-3 * peak) rz = Math.max(rz, Math.abs(z - c[2]));
		final int x0 = Math.max(0, c[0] - rx), x1 = Math.min(psf.nx() - 1, c[0] + rx), y0 = Math.max(0, c[1] - rx), y1 = Math.min(psf.ny() - 1, c[1] + rx);
		final int z0 = Math.max(0, c[2] - rz), z1 = Math.min(psf.nz() - 1, c[2] + rz);
		p[0].setRoi(x0, y0, x1 - x0 + 1, y1 - y0 + 1);
		final FloatProcessor xy = (FloatProcessor) p[0].crop();
		p[1].setRoi(x0, z0, x1 - x0 + 1, z1 - z0 + 1);
		final FloatProcessor xz = (FloatProcessor) p[1].crop();
		final double zoom = Math.max(1, Math.min(16, 240.0 / xy.getWidth()));
		final double hi = Math.log10(peak), lo = hi - 3;
		final Volume crop = psf; // for the scale bar: same voxel size
		report.figure(what + ": XY maximum projection, log scale (peak to 10⁻³ of it), central " + xy.getWidth() + " × " + xy.getHeight() + " voxels"
				+ calibrationText(psf), png(withScaleBar(render(xy, lo, hi, zoom, 1, true), crop, zoom)));
		if (psf.nz() > 1) {
			final double aspect = psf.voxelSize().dz() / psf.voxelSize().dx();
			report.figure(what + ": XZ maximum projection, log scale (peak to 10⁻³ of it), z stretched to the voxel aspect",
					png(withScaleBar(render(xz, lo, hi, zoom, aspect, true), crop, zoom)));
		}
		profiles(report, what, psf);
	}

	/** PSF profiles (lateral through the peak along x, axial along z) and their FWHM. */
	static void profiles(final HtmlReport report, final String what, final Volume psf) {
		final int[] pk = Fwhm.peak(psf);
		final double dx = psf.voxelSize().dx(), dz = psf.voxelSize().dz();
		final double[] lx = new double[psf.nx()], ly = new double[psf.nx()], ax = new double[psf.nz()], ay = new double[psf.nz()];
		final double peak = psf.get(pk[0], pk[1], pk[2]);
		for (int x = 0; x < psf.nx(); x++) {
			lx[x] = (x - pk[0]) * dx;
			ly[x] = psf.get(x, pk[1], pk[2]) / peak;
		}
		for (int z = 0; z < psf.nz(); z++) {
			ax[z] = (z - pk[2]) * dz;
			ay[z] = psf.get(pk[0], pk[1], z) / peak;
		}
		final Plot plot = new Plot("PSF profiles", "Distance from peak (" + psf.voxelSize().unit() + ")", "Intensity / peak");
		plot.setLimits(Math.min(lx[0], psf.nz() > 1 ? ax[0] : lx[0]), Math.max(lx[lx.length - 1], psf.nz() > 1 ? ax[ax.length - 1] : 0), 0, 1.25);
		plot.setColor(new Color(0, 90, 170));
		plot.setLineWidth(2);
		plot.addPoints(lx, ly, Plot.LINE);
		if (psf.nz() > 1) {
			plot.setColor(new Color(200, 80, 0));
			plot.addPoints(ax, ay, Plot.LINE);
		}
		plot.setColor(Color.black);
		plot.setLineWidth(1);
		plot.addLegend(psf.nz() > 1 ? "lateral (x)\naxial (z)" : "lateral (x)", "top-right");
		report.figure(what + ": profiles through the peak, each divided by the peak", png(plot));
		final List<List<String>> rows = new ArrayList<>();
		rows.add(List.of("lateral x", String.format(Locale.ROOT, "%.4f", Fwhm.lateral(psf))));
		rows.add(List.of("lateral y", String.format(Locale.ROOT, "%.4f", Fwhm.lateralY(psf))));
		if (psf.nz() > 1) rows.add(List.of("axial z", String.format(Locale.ROOT, "%.4f", Fwhm.axial(psf))));
		report.table(new HtmlReport.Table(what + ": FWHM (" + psf.voxelSize().unit() + ")", List.of("axis", "FWHM"), rows));
	}

	/** The watch curve "it: d D chi2 C; …" as a plot: distance ÷ floor (when known) and χ², log scale, suggestion dashed. */
	static Plot watch(final String curve, final int suggested, final double floor) {
		final List<double[]> pts = new ArrayList<>();
		for (final String part : curve.split(";")) {
			final java.util.regex.Matcher m = java.util.regex.Pattern.compile("\\s*(\\d+): d (\\S+) chi2 (\\S+)").matcher(part);
			if (m.find()) pts.add(new double[] { Double.parseDouble(m.group(1)), parse(m.group(2)), parse(m.group(3)) });
		}
		if (pts.isEmpty()) return null;
		final double[] x = new double[pts.size()], d = new double[x.length], chi = new double[x.length];
		double ymin = 1, ymax = 1;
		for (int i = 0; i < x.length; i++) {
			x[i] = pts.get(i)[0];
			d[i] = Double.isNaN(floor) ? pts.get(i)[1] : pts.get(i)[1] / floor;
			chi[i] = pts.get(i)[2];
			for (final double v : new double[] { d[i], chi[i] }) if (v > 0 && Double.isFinite(v)) { ymin = Math.min(ymin, v); ymax = Math.max(ymax, v); }
		}
		final Plot plot = new Plot("Watch", "Iteration", "Distance" + (Double.isNaN(floor) ? "" : " / floor") + ", chi-square");
		plot.setLogScaleY();
		plot.setLimits(0, x[x.length - 1] * 1.05, ymin / 1.5, ymax * 3);
		final boolean hasDistance = java.util.Arrays.stream(d).anyMatch(v -> Double.isFinite(v) && v > 0);
		if (hasDistance) {
			plot.setColor(new Color(0, 90, 170));
			plot.setLineWidth(2);
			plot.addPoints(x, d, Plot.CONNECTED_CIRCLES);
		}
		plot.setColor(new Color(200, 80, 0));
		plot.setLineWidth(2);
		plot.addPoints(x, chi, Plot.LINE);
		plot.setLineWidth(1);
		plot.setColor(Color.gray);
		plot.drawDottedLine(0, 1, x[x.length - 1] * 1.05, 1, 2);
		if (suggested >= 0) {
			plot.setColor(new Color(0, 140, 60));
			plot.drawDottedLine(suggested, ymin / 1.5, suggested, ymax * 3, 4);
		}
		plot.setColor(Color.black);
		plot.addLegend((hasDistance ? "distance" + (Double.isNaN(floor) ? "" : " / floor") + "\t" : "") + "chi-square", "top-right");
		return plot;
	}

	private static double parse(final String s) {
		try {
			return Double.parseDouble(s);
		} catch (final NumberFormatException e) {
			return Double.NaN;
		}
	}

	private static Plot convergence(final List<?> relativeChange) {
		final double[] x = new double[relativeChange.size()], y = new double[x.length];
		for (int i = 0; i < x.length; i++) {
			x[i] = i + 1;
			y[i] = Math.max(1e-12, ((Number) relativeChange.get(i)).doubleValue());
		}
		final Plot plot = new Plot("Convergence", "Iteration", "Relative change");
		plot.setLogScaleY();
		plot.setColor(new Color(0, 90, 170));
		plot.setLineWidth(2);
		plot.addPoints(x, y, Plot.LINE);
		plot.setLimitsToFit(false);
		return plot;
	}

	private static byte[] png(final Plot plot) {
		return png(plot.getProcessor().getBufferedImage());
	}

	private static byte[] png(final BufferedImage img) {
		try (ByteArrayOutputStream bytes = new ByteArrayOutputStream()) {
			ImageIO.write(img, "png", bytes);
			return bytes.toByteArray();
		} catch (final IOException e) {
			throw new IllegalStateException("Cannot encode a PNG: " + e.getMessage());
		}
	}
}
