package org.parfocal.core;

import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.FileSystemException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.UUID;

/**
 * Output files that never replace anything, also when several runs write into one folder at once.
 * <p>
 * A file is written completely under a hidden temporary name in its own folder, then published under its name
 * with a hard link ({@link Files#createLink}), which the file system creates only if the name is free — one
 * atomic step, so two writers can never both get one name and no reader ever sees a half-written file under it.
 * When the name is taken, {@code NAME-2.EXT}, {@code NAME-3.EXT}, … are tried in turn. On a file system without
 * hard links the temporary file is renamed instead after a check that the name is free (not atomic there).
 * <p>
 * Where another program must write the file under its final name (an ImageJ macro's {@code saveAs}),
 * {@link #reserve} creates it empty with {@code CREATE_NEW} first, which is atomic too.
 * Every Parfocal front end (batch, blocks, the demo, the report and macro commands) makes its outputs here.
 */
public final class OutputFiles {

	/** What fills a new file. */
	@FunctionalInterface
	public interface Content {
		void writeTo(OutputStream out) throws IOException;
	}

	private OutputFiles() {}

	/**
	 * Writes a new file {@code dir/name} (or {@code name-2}, {@code -3}, … if taken) and returns its path.
	 *
	 * @throws IOException when the folder is not writable or the content fails; nothing is then left behind
	 */
	public static Path write(final Path dir, final String name, final Content content) throws IOException {
		final Path tmp = temporary(dir, name);
		try {
			try (OutputStream out = Files.newOutputStream(tmp, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE)) {
				content.writeTo(out);
			}
			return publish(tmp, dir, name);
		} finally {
			Files.deleteIfExists(tmp);
		}
	}

	/** {@link #write} of a byte array. */
	public static Path write(final Path dir, final String name, final byte[] bytes) throws IOException {
		return write(dir, name, out -> out.write(bytes));
	}

	/**
	 * Writes exactly {@code file} or fails: the explicit-name variant, for commands whose user named the file.
	 *
	 * @throws FileAlreadyExistsException when the name is taken (also if another run took it meanwhile)
	 */
	public static Path writeExactly(final Path file, final Content content) throws IOException {
		final Path dir = file.toAbsolutePath().getParent(), name = file.getFileName();
		final Path tmp = temporary(dir, name.toString());
		try {
			try (OutputStream out = Files.newOutputStream(tmp, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE)) {
				content.writeTo(out);
			}
			if (!link(tmp, dir.resolve(name))) throw new FileAlreadyExistsException(file.toString());
			return dir.resolve(name);
		} finally {
			Files.deleteIfExists(tmp);
		}
	}

	/**
	 * Publishes a complete file {@code tmp} (in {@code dir}) as {@code dir/name}, {@code name-2}, … whichever
	 * is free first; {@code tmp} is gone afterwards. Returns the published path.
	 */
	public static Path publish(final Path tmp, final Path dir, final String name) throws IOException {
		final String base = stem(name), ext = name.substring(base.length());
		for (int i = 1;; i++) {
			final Path target = dir.resolve(i == 1 ? name : base + "-" + i + ext);
			if (link(tmp, target)) {
				Files.deleteIfExists(tmp);
				return target;
			}
			if (i > 100_000) throw new IOException("No free name for " + name + " in " + dir);
		}
	}

	/**
	 * Creates an empty file {@code dir/name} (or {@code name-2}, …) atomically and returns its path as text, for a
	 * writer that must write under the final name itself. Public and string-typed so an ImageJ macro can call it:
	 * {@code path = call("org.parfocal.core.OutputFiles.reserve", folder, "result.tif");}
	 */
	public static String reserve(final String dir, final String name) {
		final Path d = Path.of(dir);
		final String base = stem(name), ext = name.substring(base.length());
		try {
			for (int i = 1;; i++) {
				final Path target = d.resolve(i == 1 ? name : base + "-" + i + ext);
				try {
					Files.createFile(target);
					return target.toString();
				} catch (final FileAlreadyExistsException e) {
					if (i > 100_000) throw e;
				}
			}
		} catch (final IOException e) {
			throw new UncheckedIOException("Cannot create a file in " + dir + ": " + e.getMessage(), e);
		}
	}

	/** A hidden name in {@code dir} no other writer uses: {@code .NAME.<random>.tmp}. */
	public static Path temporary(final Path dir, final String name) {
		return dir.resolve("." + name + "." + UUID.randomUUID().toString().substring(0, 13) + ".tmp");
	}

	/** Links {@code tmp} as {@code target}; false when {@code target} exists. */
	private static boolean link(final Path tmp, final Path target) throws IOException {
		try {
			Files.createLink(target, tmp);
			return true;
		} catch (final FileAlreadyExistsException e) {
			return false;
		} catch (final UnsupportedOperationException | FileSystemException e) {
			if (e instanceof FileSystemException f && Files.exists(target)) return false;
			// no hard links here (some network and FAT file systems): rename, after a check (not atomic)
			if (Files.exists(target)) return false;
			try {
				Files.move(tmp, target);
				return true;
			} catch (final FileAlreadyExistsException again) {
				return false;
			}
		}
	}

	/** The name without its last extension ({@code a.b.tif} → {@code a.b}; {@code .x} stays). */
	public static String stem(final String name) {
		final int dot = name.lastIndexOf('.');
		return dot > 0 ? name.substring(0, dot) : name;
	}
}
