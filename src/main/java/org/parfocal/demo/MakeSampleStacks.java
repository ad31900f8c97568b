package org.parfocal.demo;

import ij.ImagePlus;
import ij.plugin.PlugIn;

/** {@code Plugins > Parfocal > Make Sample Stacks...}: opens the sample stacks, built in memory. No options. */
public class MakeSampleStacks implements PlugIn {

	@Override
	public void run(final String arg) {
		for (final ImagePlus imp : SampleStacks.make().values()) imp.show();
	}
}
