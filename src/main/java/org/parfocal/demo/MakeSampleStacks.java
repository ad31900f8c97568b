package org.parfocal.demo;

import java.time.OffsetDateTime;
import java.time.format.DateTimeFormatter;

import ij.IJ;
import ij.ImagePlus;
import ij.plugin.PlugIn;

import org.parfocal.provenance.MacroExport;
import org.parfocal.provenance.Provenance;

/** {@code Plugins > Parfocal > Make Sample Stacks...}: opens the sample stacks, built in memory. No options. */
public class MakeSampleStacks implements PlugIn {

	@Override
	public void run(final String arg) {
		for (final ImagePlus imp : SampleStacks.make().values()) {
			attachRecord(imp);
			imp.show();
		}
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
