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
 * provenance record: parameters, inputs, run facts, versions, maximum projections (XY and XZ) of the result and
 * of its input and PSF when they are open, PSF profiles and FWHM, and the convergence curve when the record has
 * one. Figures are rendered without a display. An existing report is never replaced unless {@code replace} is
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
			if (Provenance.of(imp).isEmpty())
				throw new IllegalArgumentException("'" + imp.getTitle() + "' has no Parfocal provenance to report (Image > Show Info shows what ImageJ knows)");
			final GenericDialog gd = new GenericDialog(COMMAND);
			gd.addStringField("File:", defaultFile(imp), 50);
			gd.addCheckbox("Replace an existing report", false);
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
		final var p = Provenance.of(imp).orElseThrow(() -> new IllegalArgumentException("'" + imp.getTitle() + "' has no Parfocal provenance"));
		if (o.file().isEmpty()) throw new IllegalArgumentException("No report file given (file=)");
		final File f = new File(o.file());
		if (f.exists() && !o.replace()) throw new IllegalArgumentException("'" + f.getPath() + "' exists; give another name or add 'replace'");
		final File dir = f.getAbsoluteFile().getParentFile();
		if (dir == null || !dir.isDirectory() || !dir.canWrite()) throw new IllegalArgumentException("Cannot write into the folder of '" + f.getPath() + "'");
		final HtmlReport report = new HtmlReport(p, imp.getTitle());
		final Volume out = ImageBridge.toCore(imp).first();
		projections(report, "result", out);
		for (final var in : p.inputs()) {
			final ImagePlus open = WindowManager.getImage(in.title());
			if (open == null || open == imp || open.getType() == ImagePlus.COLOR_RGB) continue;
			final Volume v = ImageBridge.toCore(open).first();
			projections(report, in.role() + " '" + in.title() + "'", v);
			if (in.role().equals("psf")) psf(report, v);
		}
		if (p.command().startsWith("PSF from")) psf(report, out);
		final Object rc = p.run().get("relative_change");
		if (rc instanceof List<?> list && !list.isEmpty()) report.figure("Relative change per iteration", png(convergence(list)));
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

	/** Maximum projections along z (XY view) and along y (XZ view, stretched to the voxel aspect). */
	static void projections(final HtmlReport report, final String what, final Volume v) {
		final FloatProcessor xy = new FloatProcessor(v.nx(), v.ny()), xz = new FloatProcessor(v.nx(), v.nz());
		for (int z = 0; z < v.nz(); z++)
			for (int y = 0; y < v.ny(); y++)
				for (int x = 0; x < v.nx(); x++) {
					final float a = v.get(x, y, z);
					if (a > xy.getf(x, y) || z == 0) xy.setf(x, y, z == 0 ? a : Math.max(a, xy.getf(x, y)));
					if (y == 0 || a > xz.getf(x, z)) xz.setf(x, z, a);
				}
		report.figure(what + ": maximum projection along z (XY)", png(scaled(xy, 1)));
		if (v.nz() > 1) {
			final double aspect = v.voxelSize().dz() / v.voxelSize().dx();
			report.figure(what + ": maximum projection along y (XZ)", png(scaled(xz, aspect)));
		}
	}

	/** 8-bit, display range min–max, enlarged to at least 256 px wide, z stretched by {@code aspect}. */
	private static BufferedImage scaled(final FloatProcessor fp, final double aspect) {
		fp.resetMinAndMax();
		final double zoom = Math.max(1, 256.0 / fp.getWidth());
		ImageProcessor ip = fp.convertToByteProcessor(true);
		ip.setInterpolationMethod(ImageProcessor.NONE);
		ip = ip.resize((int) Math.round(fp.getWidth() * zoom), (int) Math.max(1, Math.round(fp.getHeight() * zoom * aspect)));
		return ip.getBufferedImage();
	}

	/** PSF profiles (lateral through the peak along x, axial along z) and their FWHM. */
	static void psf(final HtmlReport report, final Volume psf) {
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
		plot.setColor(new Color(0, 90, 170));
		plot.addPoints(lx, ly, Plot.LINE);
		if (psf.nz() > 1) {
			plot.setColor(new Color(200, 80, 0));
			plot.addPoints(ax, ay, Plot.LINE);
		}
		plot.setColor(Color.black);
		plot.addLegend(psf.nz() > 1 ? "lateral (x)\naxial (z)" : "lateral (x)");
		report.figure("PSF profiles", png(plot));
		final List<List<String>> rows = new ArrayList<>();
		rows.add(List.of("lateral x", String.format(Locale.ROOT, "%.4f", Fwhm.lateral(psf))));
		rows.add(List.of("lateral y", String.format(Locale.ROOT, "%.4f", Fwhm.lateralY(psf))));
		if (psf.nz() > 1) rows.add(List.of("axial z", String.format(Locale.ROOT, "%.4f", Fwhm.axial(psf))));
		report.table(new HtmlReport.Table("PSF FWHM (" + psf.voxelSize().unit() + ")", List.of("axis", "FWHM"), rows));
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
		plot.addPoints(x, y, Plot.LINE);
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
