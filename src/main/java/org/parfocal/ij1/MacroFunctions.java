package org.parfocal.ij1;

import ij.ImagePlus;
import ij.WindowManager;

/**
 * Static functions for ImageJ macros, called with {@code call("org.parfocal.ij1.MacroFunctions.name")} (the
 * macro language has no SHA-256 of its own). Used by the macros that Export Provenance as Macro writes.
 */
public final class MacroFunctions {

	private MacroFunctions() {}

	/** SHA-256 of the current image's pixels, as the provenance records it (see {@link Provenance#sha256}); "" without an image. */
	public static String currentPixelSha256() {
		final ImagePlus imp = WindowManager.getCurrentImage();
		return imp == null ? "" : Provenance.sha256(imp);
	}
}
