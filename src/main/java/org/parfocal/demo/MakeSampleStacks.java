package org.parfocal.demo;

import ij.IJ;
import ij.ImagePlus;
import ij.plugin.PlugIn;

/**
 * {@code Plugins > Parfocal > Make Sample Stacks}: opens the sample stacks of the invented scene, built in memory
 * (the widefield cell, its PSF and truth; a bead recording and its PSF; a two-channel stack and its two-channel
 * PSF), each on the plane with the most signal and with a display range where its structure shows. No dialog,
 * no options.
 */
public class MakeSampleStacks implements PlugIn {

	@Override
	public void run(final String arg) {
		IJ.showStatus("Making the sample stacks...");
		for (final ImagePlus imp : SampleStacks.make().values()) imp.show();
		IJ.showStatus("Sample stacks: quillwort cell, beads, two channels (invented scene, simulated)");
	}
}
