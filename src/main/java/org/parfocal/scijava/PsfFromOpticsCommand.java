package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code PSF from Optics...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "PSF from Optics (Parfocal)", name = "parfocal.psffromoptics")
public class PsfFromOpticsCommand extends OpticsInputs {

	@Parameter(persist = false)
	private boolean show_profiles;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus result;

	@Override
	public String menuLabel() {
		return "PSF from Optics...";
	}
}
