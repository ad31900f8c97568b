package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import java.io.File;
import java.io.OutputStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.attribute.FileTime;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.jar.JarOutputStream;
import java.util.stream.Stream;
import java.util.zip.ZipEntry;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * {@code bin/parfocal-headless} started several times at once from one checkout (issue 13, item 5): every launch
 * must run its macro. The launcher runs in a copy of the checkout whose jar (made here from target/classes) is
 * newer than its sources and whose class path file is given, so no launch builds anything.
 */
class LauncherConcurrencyTest {

	@Test
	void sixLaunchesAtOnceAllRun(@TempDir final Path root) throws Exception {
		assumeTrue(new File("/bin/bash").canExecute(), "needs bash");
		final Path bin = Files.createDirectories(root.resolve("bin"));
		Files.copy(Path.of("bin/parfocal-headless"), bin.resolve("parfocal-headless"));
		assertTrue(bin.resolve("parfocal-headless").toFile().setExecutable(true));
		Files.createDirectories(root.resolve("src/main/resources"));
		Files.writeString(root.resolve("pom.xml"), "<project/>\n");
		final FileTime old = FileTime.fromMillis(System.currentTimeMillis() - 3_600_000);
		for (final String p : new String[] { "src/main/resources", "src/main", "src", "pom.xml" }) Files.setLastModifiedTime(root.resolve(p), old);
		final Path target = Files.createDirectories(root.resolve("target"));
		final Path jar = target.resolve("Parfocal_-test.jar");
		final Path classes = Path.of("target/classes").toAbsolutePath();
		try (OutputStream o = Files.newOutputStream(jar); JarOutputStream j = new JarOutputStream(o); Stream<Path> files = Files.walk(classes)) {
			for (final Path f : files.filter(Files::isRegularFile).toList()) {
				j.putNextEntry(new ZipEntry(classes.relativize(f).toString().replace(File.separatorChar, '/')));
				Files.copy(f, j);
				j.closeEntry();
			}
		}
		final String cp = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
		final List<String> deps = new ArrayList<>();
		for (final String e : cp.split(File.pathSeparator))
			if (e.endsWith(".jar") && !e.contains("junit") && !e.contains("opentest4j") && !e.contains("apiguardian")) deps.add(e);
		Files.writeString(target.resolve("classpath.txt"), String.join(File.pathSeparator, deps));
		final Path macro = Files.writeString(root.resolve("hello.ijm"), "print(\"launch \" + getArgument() + \" ran\");\n");
		final List<Process> runs = new ArrayList<>();
		final List<Path> logs = new ArrayList<>();
		for (int i = 0; i < 6; i++) {
			final Path log = root.resolve("log-" + i + ".txt");
			logs.add(log);
			final ProcessBuilder pb = new ProcessBuilder(bin.resolve("parfocal-headless").toString(), macro.toString(), String.valueOf(i))
					.redirectErrorStream(true).redirectOutput(log.toFile());
			pb.environment().put("PARFOCAL_JAVA_OPTS", "-Xmx96m");
			pb.environment().put("PATH", Path.of(System.getProperty("java.home"), "bin") + File.pathSeparator + System.getenv("PATH"));
			runs.add(pb.start());
		}
		for (int i = 0; i < runs.size(); i++) {
			assertTrue(runs.get(i).waitFor(300, TimeUnit.SECONDS), "launch " + i + " did not end");
			final String out = Files.readString(logs.get(i));
			assertEquals(0, runs.get(i).exitValue(), "launch " + i + ": " + out);
			assertTrue(out.contains("launch " + i + " ran"), out);
		}
	}
}
