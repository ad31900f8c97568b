package org.parfocal.ij1;

import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.util.List;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.parfocal.command.OtherKeys;
import ij.gui.Plot;
import ij.io.FileInfo;
import ij.plugin.PlugIn;

import org.parfocal.core.Volume;
import org.parfocal.provenance.HtmlReport;
import org.parfocal.provenance.MacroOptions;

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
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.WRITE_REPORT, () -> {
			final ImagePlus imp = WindowManager.getCurrentImage();
			if (imp == null) throw new IllegalArgumentException("No image is open");
			if (ImageProvenance.of(imp).isEmpty())
				throw new IllegalArgumentException("'" + imp.getTitle() + "' has no Parfocal provenance to report (Image > Show Info shows what ImageJ knows)");
			final GenericDialog gd = new GenericDialog(COMMAND);
			gd.addStringField(OtherKeys.REPORT.key("file").label(), defaultFile(imp), 50); // labels from the one description of the keys
			gd.addCheckbox(OtherKeys.REPORT.key("replace").label(), OtherKeys.REPORT.key("replace").shownChecked());
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
			ReportFigures.projections(report, "result" + (outCore.channels() > 1 ? " channel " + (c + 1) : ""), outCore.get(c, 0));
		for (final var in : p.inputs()) {
			final ImagePlus open = WindowManager.getImage(in.title());
			if (open == null || open == imp || open.getType() == ImagePlus.COLOR_RGB || in.role().equals("reference")) continue;
			final Volume v = ImageBridge.toCore(open).first();
			if (in.role().equals("psf")) ReportPlots.psf(report, "psf '" + in.title() + "'", v);
			else ReportFigures.projections(report, in.role() + " '" + in.title() + "'", v);
		}
		if (p.command().startsWith("PSF from") || p.command().equals("Blind Deconvolve") && imp.getTitle().contains("-psf")) ReportPlots.psf(report, "result", outCore.first());
		final Object rc = p.run().get("relative_change");
		if (rc instanceof List<?> list && !list.isEmpty()) report.figure("Convergence: relative change between successive iterates (log scale), "
				+ (outCore.volumes().size() > 1 ? "channel 1" : "") + " " + list.size() + " iterations", ReportFigures.png(ReportPlots.convergence(list)));
		for (final var e : p.run().entrySet())
			if (e.getKey().startsWith("watch_curve") && e.getValue() != null) {
				final String suffix = e.getKey().substring("watch_curve".length());
				final Object sug = p.run().get("suggested_iteration" + suffix);
				final Object floor = p.run().get("watch_floor" + suffix);
				final Plot w = ReportPlots.watch(String.valueOf(e.getValue()), sug instanceof Number n ? n.intValue() : -1, floor instanceof Number fl ? fl.doubleValue() : Double.NaN);
				if (w != null) report.figure("Watch" + (suffix.isEmpty() ? "" : " (volume " + suffix.substring(1) + ")") + ": patch distance to the references"
						+ (floor instanceof Number ? " ÷ their noise floor" : "") + " and re-blur chi-square per iteration; the dashed line is the suggested iteration"
						+ (sug != null ? " (" + sug + ")" : "") + "; 1 = indistinguishable from the references / consistent with the noise", ReportFigures.png(w));
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
}
