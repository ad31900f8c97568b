package org.parfocal.demo;

import java.time.OffsetDateTime;
import java.time.format.DateTimeFormatter;

import ij.IJ;
import ij.ImagePlus;
import ij.plugin.PlugIn;

import org.parfocal.command.MacroExport;
import org.parfocal.provenance.Provenance;

/**
 * {@code Plugins > Parfocal > Make Sample Stacks}: opens the sample stacks of the invented scene, built in memory
 * (the widefield cell, its PSF and truth; a bead recording and its PSF; a two-channel stack and its two-channel
 * PSF), each on the plane with the most signal and with a display range where its structure shows. No dialog,
 * no options. Each carries a record saying this command made it, so Export Provenance as Macro can rebuild a
 * sample workflow.
 */
public class MakeSampleStacks implements PlugIn {

	@Override
	public void run(final String arg) {
		IJ.showStatus("Making the sample stacks...");
		for (final ImagePlus imp : SampleStacks.make().values()) {
			attachRecord(imp);
			imp.show();
		}
		IJ.showStatus("Sample stacks: quillwort cell, beads, two channels (invented scene, simulated)");
	}

	/**
	 * A provenance record saying the command made this stack, so that Export Provenance as Macro rebuilds the
	 * sample workflow (it reruns this command and selects the stack by its title).
	 */
	static void attachRecord(final ImagePlus imp) {
		final String v = MakeSampleStacks.class.getPackage().getImplementationVersion();
		final Provenance p = Provenance.of(MacroExport.SAMPLE_COMMAND, "").run(MacroExport.SAMPLE_TITLE, imp.getTitle())
				.run("seed", SampleStacks.SEED).versions(v == null ? "development" : v, IJ.getFullVersion(), System.getProperty("java.version"))
				.timing(0, 1, OffsetDateTime.now().format(DateTimeFormatter.ISO_OFFSET_DATE_TIME)).build();
		final Object old = imp.getProperty("Info");
		imp.setProperty("Info", (old instanceof String s && !s.isBlank() ? s + "\n" : "") + p.toInfoText());
	}
}
