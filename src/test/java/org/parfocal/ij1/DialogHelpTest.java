package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.junit.jupiter.api.Test;

/**
 * The Help of every dialog. Outside references: the README's table of public macro keys (what users were
 * promised), ImageJ 1.54's rule that {@code addHelp} text is shown as HTML only when it starts with
 * {@code <html>} (otherwise it is opened as a web address), and ImageJ's rule that a field's macro key is the
 * first word of its label, lower case (from memory of {@code Macro.trimKey}; the record tests confirm it).
 */
class DialogHelpTest {

	private static final Map<String, List<DialogHelp.Page>> PAGES = new LinkedHashMap<>();
	static {
		PAGES.put("Convolve with PSF...", List.of(DialogHelp.convolve()));
		PAGES.put("PSF from Optics...", List.of(DialogHelp.psfFromOptics(true)));
		PAGES.put("PSF from Beads...", List.of(DialogHelp.beads()));
		PAGES.put("Deconvolve...", List.of(DialogHelp.deconvolve()));
		PAGES.put("Blind Deconvolve...", List.of(DialogHelp.blind(), DialogHelp.band()));
		PAGES.put("Compare with Sharp References...", List.of(DialogHelp.compare()));
		PAGES.put("Export Provenance as Macro...", List.of(DialogHelp.export()));
		PAGES.put("Write Report...", List.of(DialogHelp.report()));
		PAGES.put("Parfocal Options...", List.of(DialogHelp.options()));
	}

	private static String readme() throws IOException {
		return Files.readString(Path.of("README.md"));
	}

	/** The README table: command → its macro keys (backticked words of the last column, option values left out). */
	private static Map<String, List<String>> readmeKeys() throws IOException {
		final Map<String, List<String>> keys = new LinkedHashMap<>();
		final Pattern row = Pattern.compile("^\\| `([^`]+)` \\|.*\\| (.*) \\|$");
		for (final String line : readme().split("\n")) {
			final Matcher m = row.matcher(line.trim());
			if (!m.matches()) continue;
			final List<String> k = new ArrayList<>();
			final Matcher ticks = Pattern.compile("`([^`]+)`").matcher(m.group(2));
			while (ticks.find())
				for (final String w : ticks.group(1).split(" ")) if (w.matches("[a-z_]+")) k.add(w);
			keys.put(m.group(1), k);
		}
		return keys;
	}

	@Test
	void everyHelpIsHtmlSoImageJShowsItInsteadOfOpeningItAsAWebAddress() {
		final List<DialogHelp.Page> all = new ArrayList<>();
		PAGES.values().forEach(all::addAll);
		all.add(DialogHelp.watch());
		all.add(DialogHelp.psfFromOptics(false));
		for (final DialogHelp.Page p : all) {
			final String h = p.html();
			assertTrue(h.startsWith("<html>"), h.substring(0, 40));
			assertTrue(h.endsWith("</html>"));
			assertFalse(p.fields().isEmpty());
			for (final DialogHelp.Field f : p.fields()) {
				assertTrue(h.contains("<code>" + f.key() + "</code>"), f.key());
				assertFalse(f.meaning().isBlank(), f.key());
			}
		}
	}

	@Test
	void everyKeyTheReadmePromisesIsExplainedInItsCommandsHelp() throws IOException {
		final Map<String, List<String>> readme = readmeKeys();
		assertTrue(readme.keySet().containsAll(PAGES.keySet()), "README table rows: " + readme.keySet());
		for (final Map.Entry<String, List<DialogHelp.Page>> e : PAGES.entrySet()) {
			final Set<String> helped = new HashSet<>();
			for (final DialogHelp.Page p : e.getValue()) for (final DialogHelp.Field f : p.fields()) helped.add(f.key());
			assertFalse(readme.get(e.getKey()).isEmpty(), e.getKey());
			final String html = String.join("", e.getValue().stream().map(DialogHelp.Page::html).toList());
			for (final String key : readme.get(e.getKey()))
				assertTrue(helped.contains(key) || html.contains("<code>" + key + "</code>"), e.getKey() + " Help lacks " + key);
		}
		// the watch dialog's keys are listed in the README's watch paragraph
		final Matcher m = Pattern.compile("second-dialog keys `([^`]+)`").matcher(readme().replace("\n", " "));
		assertTrue(m.find());
		final Set<String> watch = new HashSet<>();
		for (final DialogHelp.Field f : DialogHelp.watch().fields()) watch.add(f.key());
		for (final String key : m.group(1).split(" "))
			assertTrue(watch.contains(key) || DialogHelp.watch().html().contains("<code>" + key + "</code>"), "watch Help lacks " + key);
	}

	@Test
	void eachFieldsKeyIsTheFirstWordOfItsLabelAsImageJDerivesIt() {
		for (final List<DialogHelp.Page> pages : PAGES.values())
			for (final DialogHelp.Page p : pages) {
				final Set<String> seen = new HashSet<>();
				for (final DialogHelp.Field f : p.fields()) {
					final String first = f.label().split("[ :]")[0].toLowerCase(Locale.ROOT);
					// "Photons per unit" records as photons=, "Plot convergence" as plot, "Watch quality" as watch
					assertEquals(first, f.key(), f.label());
					assertTrue(seen.add(f.key()), "key twice on one page: " + f.key());
				}
			}
	}

	/** Every GenericDialog in the ImageJ commands gets one of these pages before it is shown. */
	@Test
	void everyDialogOfTheCommandsHasHelp() throws IOException {
		int dialogs = 0;
		try (var files = Files.list(Path.of("src/main/java/org/parfocal/ij1"))) {
			for (final Path f : files.filter(p -> p.toString().endsWith(".java")).toList()) {
				final String s = Files.readString(f);
				int at = 0;
				while ((at = s.indexOf("new GenericDialog(", at)) >= 0) {
					dialogs++;
					final int shown = s.indexOf(".showDialog()", at);
					assertTrue(shown > 0, f.toString());
					assertTrue(s.substring(at, shown).contains("gd.addHelp(DialogHelp."), f.getFileName() + ": a dialog without Help at " + at);
					at = shown;
				}
			}
		}
		assertTrue(dialogs >= 10, "dialogs found: " + dialogs);
	}
}
