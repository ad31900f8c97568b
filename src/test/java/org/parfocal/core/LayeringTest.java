package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;

/**
 * The layering rules of DEVELOPERS.md, checked on the sources: the numerical core imports neither ImageJ
 * nor AWT/Swing, and only {@code org.parfocal.fft} imports a transform library (JTransforms, and FFTW through
 * JavaCPP: {@code org.bytedeco}).
 */
class LayeringTest {

	/** Packages allowed to use ImageJ 1.x and AWT: the plugin layers (ImageJ 1.x, SciJava commands), the batch entry and the demo writer. */
	private static final List<String> UI_PACKAGES = List.of("org/parfocal/ij1/", "org/parfocal/cli/", "org/parfocal/demo/", "org/parfocal/scijava/");

	@Test
	void coreIsFreeOfImageJAndAwtAndOnlyFftUsesJTransforms() throws IOException {
		final Path root = Path.of("src/main/java");
		final List<String> violations = new ArrayList<>();
		int checked = 0;
		try (Stream<Path> files = Files.walk(root)) {
			for (final Path f : (Iterable<Path>) files.filter(p -> p.toString().endsWith(".java"))::iterator) {
				final String rel = root.relativize(f).toString().replace('\\', '/');
				final boolean ui = UI_PACKAGES.stream().anyMatch(rel::startsWith);
				final boolean fft = rel.startsWith("org/parfocal/fft/");
				final String text = Files.readString(f);
				// fully qualified uses, which no import line shows
				if (!fft && (text.contains("org.bytedeco.") || text.contains("org.jtransforms."))) violations.add(rel + ": names a transform library");
				for (final String line : Files.readAllLines(f)) {
					final String l = line.trim();
					if (!l.startsWith("import ")) continue;
					if (!ui && (l.matches("import (static )?ij\\..*") || l.matches("import (static )?java\\.awt\\..*") || l.matches("import (static )?javax\\.swing\\..*")))
						violations.add(rel + ": " + l);
					if (!fft && l.matches("import (static )?org\\.jtransforms\\..*")) violations.add(rel + ": " + l);
					if (!fft && l.matches("import (static )?org\\.bytedeco\\..*")) violations.add(rel + ": " + l);
				}
				checked++;
			}
		}
		assertTrue(checked > 10, "sources not found from " + root.toAbsolutePath());
		assertTrue(violations.isEmpty(), () -> "layering violated:\n" + String.join("\n", violations));
	}
}
