package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Parfocal Options...} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Parfocal Options", name = "parfocal.parfocaloptions")
public class ParfocalOptionsCommand extends MenuCommand {

	@Parameter(choices = { "auto", "fftw", "java" }, label = "FFT library", persist = false)
	private String fft_library = org.parfocal.command.OtherKeys.OPTIONS.key("fft_library").defaultValue(); // the table's default

	@Override
	public String menuLabel() {
		return "Parfocal Options...";
	}
}
