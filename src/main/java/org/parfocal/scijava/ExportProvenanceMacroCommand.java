package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Export Provenance as Macro...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Export Provenance as Macro (Parfocal)", name = "parfocal.exportprovenancemacro")
public class ExportProvenanceMacroCommand extends MenuCommand {

	@Parameter(label = "Image with a provenance record", persist = false)
	private ImagePlus image;

	@Parameter(required = false, style = "save", label = "Macro file (.ijm)", persist = false)
	private File macro;

	@Parameter(persist = false)
	private boolean replace;

	@Override
	public String menuLabel() {
		return "Export Provenance as Macro...";
	}

	@Override
	protected ImagePlus currentImage() {
		return image;
	}
}
