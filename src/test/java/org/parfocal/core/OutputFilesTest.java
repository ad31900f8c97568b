package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Set;
import java.util.TreeSet;
import java.util.concurrent.CyclicBarrier;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Create-new outputs under concurrency (issue 13, item 5): many writers of one name at the same instant each get
 * their own file with their own content, nothing is replaced, nothing hidden is left. The guarantee rests on
 * POSIX link(2) and open(O_CREAT|O_EXCL) failing with EEXIST when the name exists (POSIX.1-2017).
 */
class OutputFilesTest {

	@TempDir
	Path dir;

	private List<String> names() throws Exception {
		try (Stream<Path> s = Files.list(dir)) {
			return s.map(p -> p.getFileName().toString()).sorted().toList();
		}
	}

	@Test
	void sixteenWritersOfOneNameAtOnceGetSixteenFilesEachWithItsOwnContent() throws Exception {
		final int n = 16;
		final CyclicBarrier start = new CyclicBarrier(n);
		final ExecutorService pool = Executors.newFixedThreadPool(n);
		try {
			final List<Future<Path>> got = new ArrayList<>();
			for (int i = 0; i < n; i++) {
				final int id = i;
				got.add(pool.submit(() -> {
					start.await();
					return OutputFiles.write(dir, "summary.csv", ("writer " + id + "\n").repeat(1000).getBytes(StandardCharsets.UTF_8));
				}));
			}
			final Set<String> contents = new TreeSet<>(), files = new TreeSet<>();
			for (final Future<Path> f : got) {
				files.add(f.get().getFileName().toString());
				contents.add(Files.readString(f.get()).lines().findFirst().orElseThrow());
			}
			assertEquals(n, files.size(), files.toString());
			assertEquals(n, contents.size(), "every writer's content survives");
			assertTrue(files.contains("summary.csv") && files.contains("summary-16.csv"), files.toString());
			assertEquals(new TreeSet<>(names()), files, "no hidden temporary file left");
		} finally {
			pool.shutdown();
		}
	}

	@Test
	void reservedNamesAreDistinctAndAnExactNameIsNeverReplaced() throws Exception {
		final String a = OutputFiles.reserve(dir.toString(), "r.tif"), b = OutputFiles.reserve(dir.toString(), "r.tif");
		assertEquals(List.of(dir.resolve("r.tif").toString(), dir.resolve("r-2.tif").toString()), List.of(a, b));
		Files.writeString(dir.resolve("x.html"), "first");
		assertThrows(FileAlreadyExistsException.class, () -> OutputFiles.writeExactly(dir.resolve("x.html"), o -> o.write('2')));
		assertEquals("first", Files.readString(dir.resolve("x.html")));
		assertEquals(List.of("r-2.tif", "r.tif", "x.html"), names());
	}
}
