package org.parfocal.scenes;

import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.Locale;

import org.parfocal.core.CameraNoise;

/** Prints the estimated gain and read noise of every scene against the truth (bin/parfocal-bench noise). */
public final class NoiseOnScenes {
	public static void main(final String[] args) throws Exception {
		final Path dir = Paths.get(args.length > 0 ? args[0] : "target/scenes");
		SceneBenchmark.ensure(dir);
		System.out.println("| scene | gain true | gain est. | error | read noise true (ADU) | est. |");
		System.out.println("| --- | --- | --- | --- | --- | --- |");
		for (final String name : SceneBenchmark.scenes(dir)) {
			final Scene s = Scene.load(dir, name);
			final CameraNoise n = CameraNoise.estimate(s.recording(), s.offset());
			System.out.printf(Locale.ROOT, "| %s | %.3f | %.3f | %+.1f %% | %.2f | %.2f |%n", name, s.gain(), n.gain(), 100 * (n.gain() / s.gain() - 1),
					s.readNoise(), n.readNoise());
		}
	}
}
