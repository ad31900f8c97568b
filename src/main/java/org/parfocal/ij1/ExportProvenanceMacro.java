package org.parfocal.ij1;

import java.io.File;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.StandardOpenOption;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;

import org.parfocal.command.OtherKeys;
import ij.io.SaveDialog;
import ij.plugin.PlugIn;

import org.parfocal.command.MacroExport;
import org.parfocal.provenance.MacroOptions;

/**
 * {@code Plugins > Parfocal > Export Provenance as Macro...}: writes an {@code .ijm} macro that rebuilds the
 * current image from its inputs by replaying the recorded chain of Parfocal commands (see
 * {@link MacroExport}). An existing file is never replaced silently: interactively the save dialog asks; in a
 * macro the {@code replace} flag must be given.
 * <p>
 * Macro keys (public API): {@code macro replace}.
 */
public class ExportProvenanceMacro implements PlugIn {

	static final String COMMAND = "Export Provenance as Macro";

	public record Options(String macroPath, boolean replace) {
		public String macroOptions() {
			return "macro=" + MacroOptions.quote(macroPath) + (replace ? " replace" : "");
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.EXPORT_MACRO, () -> {
			final ImagePlus imp = WindowManager.getCurrentImage();
			if (imp == null) throw new IllegalArgumentException("No image is open");
			macroText(imp); // checks the record before asking for a file
			final Options o = showDialog(imp);
			if (o == null) throw Commands.cancelled();
			final File f = write(imp, o);
			IJ.log(COMMAND + ": wrote " + f.getPath());
			IJ.showStatus(COMMAND + ": wrote " + f.getName());
		});
	}

	/** The rebuild macro of {@code imp}. @throws IllegalArgumentException one line, if there is no usable record */
	static String macroText(final ImagePlus imp) {
		final var p = ImageProvenance.ofChecked(imp).orElseThrow(() -> new IllegalArgumentException("'" + imp.getTitle()
				+ "' has no Parfocal provenance (it was not made by a Parfocal command, or was saved in a format that drops the Info); "
				+ "Image > Show Info shows what ImageJ knows of it"));
		return MacroExport.toMacro(p, imp.getTitle());
	}

	Options showDialog(final ImagePlus imp) {
		final String base = ConvolveWithPsf.stripExtension(imp.getTitle()) + "-rebuild.ijm";
		if (Commands.isMacro()) {
			final GenericDialog gd = new GenericDialog(COMMAND);
			gd.addStringField(OtherKeys.EXPORT.key("macro").label(), base, 40); // labels from the one description of the keys
			gd.addCheckbox(OtherKeys.EXPORT.key("replace").label(), OtherKeys.EXPORT.key("replace").shownChecked());
			gd.addHelp(DialogHelp.export().html());
			gd.showDialog();
			if (gd.wasCanceled()) return null;
			return new Options(gd.getNextString().trim(), gd.getNextBoolean());
		}
		// Interactively ImageJ's save dialog picks the file (the system's or Java's chooser, as set in Edit > Options)
		// and asks before replacing one.
		final SaveDialog sd = new SaveDialog(COMMAND, base, ".ijm");
		if (sd.getFileName() == null) return null;
		final Options o = new Options(new File(sd.getDirectory(), sd.getFileName()).getPath(), true);
		ij.plugin.frame.Recorder.recordOption("macro", o.macroPath());
		ij.plugin.frame.Recorder.recordOption("replace");
		return o;
	}

	/** Writes the macro for {@code imp}; returns the file. */
	public static File write(final ImagePlus imp, final Options o) {
		final String text = macroText(imp);
		if (o.macroPath().isEmpty()) throw new IllegalArgumentException("No macro file given (macro=)");
		final File f = new File(o.macroPath());
		if (f.exists() && !o.replace())
			throw new IllegalArgumentException("'" + f.getPath() + "' exists; give another name or add 'replace' to replace it");
		final File dir = f.getAbsoluteFile().getParentFile();
		if (dir == null || !dir.isDirectory()) throw new IllegalArgumentException("The folder of '" + f.getPath() + "' does not exist");
		if (!dir.canWrite()) throw new IllegalArgumentException("The folder '" + dir.getPath() + "' is not writable");
		try {
			Files.writeString(f.toPath(), text, StandardCharsets.UTF_8, StandardOpenOption.CREATE, StandardOpenOption.TRUNCATE_EXISTING,
					StandardOpenOption.WRITE);
		} catch (final IOException e) {
			throw new IllegalArgumentException("Cannot write '" + f.getPath() + "': " + e.getMessage());
		}
		return f;
	}
}
