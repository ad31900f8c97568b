package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.util.List;
import java.util.Map;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/** {@code Make Sample Stacks} as a SciJava command (typed inputs; same code path as the menu entry, see {@link MenuCommand}). */
@Plugin(type = Command.class, headless = true, label = "Make Sample Stacks (Parfocal)", name = "parfocal.makesamplestacks")
public class MakeSampleStacksCommand extends MenuCommand {


	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus widefield;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus psf;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus truth;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus beads;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus beads_psf;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus two_channel;

	@Parameter(type = ItemIO.OUTPUT)
	private ImagePlus two_channel_psf;

	@Override
	public String menuLabel() {
		return "Make Sample Stacks";
	}

	@Override
	protected org.parfocal.command.CommandKeys.Command keys() {
		return new org.parfocal.command.CommandKeys.Command("Make Sample Stacks", Map.of(), java.util.Set.of(), Map.of());
	}

	@Override
	protected void collect(final List<ImagePlus> created, final ImagePlus current) {
		for (final ImagePlus imp : created)
			switch (imp.getTitle()) {
			case "quillwort-widefield.tif" -> widefield = imp;
			case "quillwort-psf.tif" -> psf = imp;
			case "quillwort-truth.tif" -> truth = imp;
			case "quillwort-beads.tif" -> beads = imp;
			case "quillwort-beads-psf.tif" -> beads_psf = imp;
			case "quillwort-two-channel.tif" -> two_channel = imp;
			case "quillwort-two-channel-psf.tif" -> two_channel_psf = imp;
			default -> { }
			}
	}
}
