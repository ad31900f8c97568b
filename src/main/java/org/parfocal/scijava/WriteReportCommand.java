package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Write Report...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Write Report (Parfocal)", name = "parfocal.writereport")
public class WriteReportCommand extends MenuCommand {

	@Parameter(label = "Image with a provenance record", persist = false)
	private ImagePlus image;

	@Parameter(required = false, style = "save", label = "Report file (.html)", persist = false)
	private File file;

	@Parameter(persist = false)
	private boolean replace;

	@Override
	public String menuLabel() {
		return "Write Report...";
	}

	@Override
	protected ImagePlus currentImage() {
		return image;
	}
}
