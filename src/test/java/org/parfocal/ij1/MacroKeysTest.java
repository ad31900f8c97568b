package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;

import ij.ImagePlus;
import ij.Macro;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.command.CommandKeys;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/**
 * The macro keys of every command, against ImageJ's own key lookup ({@code ij.Macro.getValue}, the reader every
 * GenericDialog uses in a macro): no key may be found inside another; old names still work as whole keys;
 * unknown and missing keys are errors; omitted and reordered keys give the same result.
 */
class MacroKeysTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** Issue 13.7: over every key of every dialog one run can show, ImageJ's lookup of one key never finds another. */
	@Test
	void noKeyOfAnyCommandIsReadAsAnother() {
		final List<String> clashes = new ArrayList<>();
		for (final CommandKeys.Command c : CommandKeys.all()) {
			final List<String> keys = CommandKeys.keysOf(c);
			assertTrue(keys.size() >= 1, c.label());
			for (final String given : keys)
				for (final String asked : keys) {
					if (given.equals(asked)) continue;
					// a macro giving only `given`: does the dialog field `asked` read it?
					if (Macro.getValue(given + "=[x] ", asked, null) != null || given.endsWith("_" + asked))
						clashes.add(c.label() + ": " + given + "= is read as " + asked + "=");
				}
		}
		assertEquals(List.of(), clashes);
		// the clash of issue 13.7 itself, seen through ImageJ's lookup: the old pair clashes, so the old names are only translated
		assertEquals("cells*", Macro.getValue("open_references=[cells*] ", "references", null));
	}

	/** Old names are translated only as whole keys. */
	@Test
	void oldNamesAreWholeKeysOnly() {
		final String given = "result=r.tif open_references=[cells*] input=none";
		final String now = CommandKeys.check(CommandKeys.COMPARE, given);
		assertEquals("result=r.tif reference_images=[cells*] input=none", now);
		assertNull(Macro.getValue(now + " ", "reference_folder", null));
		assertEquals("result=r.tif reference_folder=[/data/open_references=x]",
				CommandKeys.check(CommandKeys.COMPARE, "result=r.tif references=[/data/open_references=x]"));
		assertThrows(IllegalArgumentException.class,
				() -> CommandKeys.check(CommandKeys.COMPARE, "result=r.tif references=a reference_folder=b"));
	}

	/** Issue 13.7 end to end: the old key open_references=, given alone, reads as the pattern (it was read as the folder). */
	@Test
	void oldOpenReferencesAloneIsThePattern() throws Exception {
		final ImagePlus res = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.deconvolved(), "result.tif");
		final ImagePlus a = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.truth(102), "cells-1.tif");
		final ImagePlus b = CompareWithReferencesCommandTest.image(CompareWithReferencesCommandTest.truth(103), "cells-2.tif");
		ImageJHarness.open(res, a, b);
		final ImageJHarness.Result r = ImageJHarness.run(res, "Compare with Sharp References...",
				"result=result.tif open_references=[cells*] patches=512 bootstrap=0");
		final var p = ImageProvenance.of(r.output()).orElseThrow();
		assertEquals("cells*", p.options().get("reference_images"));
		assertEquals("", p.options().get("reference_folder"));
	}

	/** Issue 13.10: a misspelled key is an error naming the closest key, not the default silently. */
	@Test
	void unknownKeyNamesTheClosest() {
		final ImagePlus obj = ConvolveWithPsfCommandTest.object("cell.tif"), h = ConvolveWithPsfCommandTest.psf("psf.tif", 3);
		ImageJHarness.open(obj, h);
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(obj, "Deconvolve...", "image=cell.tif psf=psf.tif method=richardson-lucy iteratons=5"));
		assertTrue(e.getMessage().contains("Unknown key 'iteratons' — did you mean 'iterations'?"), e.getMessage());
		final ImageJCommandException far = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(obj, "Convolve with PSF...", "image=cell.tif psf=psf.tif zzzzzzzzzz=1"));
		assertTrue(far.getMessage().contains("Unknown key 'zzzzzzzzzz' (known keys: image psf boundary"), far.getMessage());
	}

	/** Issue 13.10: in a macro the image and the PSF are never guessed. */
	@Test
	void missingRequiredImageIsAnError() {
		final ImagePlus obj = ConvolveWithPsfCommandTest.object("cell.tif"), h = ConvolveWithPsfCommandTest.psf("psf.tif", 3);
		ImageJHarness.open(obj, h);
		final ImageJCommandException e = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(obj, "Convolve with PSF...", "psf=psf.tif boundary=mirror"));
		assertTrue(e.getMessage().contains("A macro must give image="), e.getMessage());
		final ImageJCommandException p = assertThrows(ImageJCommandException.class,
				() -> ImageJHarness.run(obj, "Deconvolve...", "image=cell.tif iterations=2"));
		assertTrue(p.getMessage().contains("A macro must give psf="), p.getMessage());
	}

	/** Reordered keys give the same pixels; omitted keys take the documented defaults (never remembered values). */
	@Test
	void reorderedAndOmittedKeys() {
		final ImagePlus obj = ConvolveWithPsfCommandTest.object("cell.tif"), h = ConvolveWithPsfCommandTest.psf("psf.tif", 3);
		ImageJHarness.open(obj, h);
		final String full = "image=cell.tif psf=psf.tif boundary=mirror normalize background=0 photons=5 seed=1 offset=0";
		final List<MacroOptions.Token> tokens = new ArrayList<>(MacroOptions.tokens(full));
		Collections.reverse(tokens);
		final StringBuilder reversed = new StringBuilder();
		for (final MacroOptions.Token t : tokens) reversed.append(full, t.start(), t.end()).append(' ');
		final ImagePlus a = ImageJHarness.run(obj, "Convolve with PSF...", full).onlyCreated();
		final ImagePlus b = ImageJHarness.run(obj, "Convolve with PSF...", reversed.toString().trim()).onlyCreated();
		ImageJHarness.assertSamePixels(a, b, 0);
		// defaults: boundary=mirror, background=0, seed=1, offset=0 (README); normalize is a flag (absent = off).
		// Issue 16.5: values remembered from an interactive run never reach a macro.
		ij.Prefs.set("parfocal.convolve.boundary", "periodic");
		ij.Prefs.set("parfocal.deconvolve.iterations", 1);
		ij.Prefs.set("parfocal.deconvolve.method", "wiener");
		final ImagePlus c = ImageJHarness.run(obj, "Convolve with PSF...", "photons=5 normalize psf=psf.tif image=cell.tif").onlyCreated();
		ImageJHarness.assertSamePixels(a, c, 0);
		final ImagePlus d = ImageJHarness.run(obj, "Deconvolve...", "image=cell.tif psf=psf.tif offset=0 background=0").onlyCreated();
		final var p = ImageProvenance.of(d).orElseThrow().options();
		assertEquals("100", p.get("iterations"), "the documented default (the default run's cap), not the remembered 1");
		assertEquals("accelerated-richardson-lucy", p.get("method"));
		assertEquals("held-out", p.get("stop"));
	}
}
