package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.RandomAccessFile;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Truncated, empty and non-TIFF files are refused with one line naming the file and what is missing (issue 13,
 * item 4). The files come from ImageJ's own TIFF writer (contiguous planes, {@code images=} in its description)
 * and from tifffile 2023.2.3 (one IFD per page, and zlib strips; {@code tools/golden/gen_tiff_pages.py}), whose
 * page offsets the script prints (pixels at 208, 592, 976, 1360, headers at 8, 1744, 1910, 2076, 2242 bytes).
 */
public class TiffCheckTest {

	@Test
	void anImageJStackCutInHalfIsRefusedThoughImageJOpensItAsAShorterStack(@TempDir final Path dir) throws IOException {
		final Path f = dir.resolve("cells.tif");
		final ImagePlus imp = IJ.createImage("cells", "16-bit ramp", 20, 10, 6);
		assertTrue(new FileSaver(imp).saveAsTiffStack(f.toString()));
		assertNull(TiffCheck.problem(f), "complete stack");
		final long size = Files.size(f);
		cut(f, size / 2);
		// the defect: ImageJ's opener reads the cut file as fewer planes, without a word
		final ImagePlus opened = IJ.openImage(f.toString());
		if (opened != null) assertTrue(opened.getStackSize() < 6, "ImageJ opened " + opened.getStackSize() + " planes");
		final String p = TiffCheck.problem(f);
		assertNotNull(p);
		assertTrue(p.startsWith(f.toString()) && p.contains("truncated") && p.contains("declares 6 planes") && !p.contains("\n"), p);
		// 6 planes of 400 bytes after the header: half the file holds two or three whole planes
		assertTrue(p.contains("holds 2 complete") || p.contains("holds 3 complete"), p);
	}

	@Test
	void aSinglePlaneCutShortIsRefused(@TempDir final Path dir) throws IOException {
		final Path f = dir.resolve("plane.tif");
		assertTrue(new FileSaver(IJ.createImage("plane", "32-bit ramp", 30, 30, 1)).saveAsTiff(f.toString()));
		assertNull(TiffCheck.problem(f));
		cut(f, Files.size(f) - 100);
		final String p = TiffCheck.problem(f);
		assertTrue(p != null && p.contains("truncated") && p.contains("declares 1 plane"), p);
	}

	@Test
	void pagesWithTheirOwnStripsAreCheckedEachAgainstTheFileSize(@TempDir final Path dir) throws IOException {
		for (final String name : new String[] { "pages-4x16x12-u16.tif", "pages-3x16x12-u16-zlib.tif" }) {
			final Path f = dir.resolve(name);
			Files.copy(Path.of("src/test/resources/golden/tiff", name), f);
			assertNull(TiffCheck.problem(f), name + " complete");
		}
		final Path f = dir.resolve("pages-4x16x12-u16.tif");
		cut(f, 2200); // tifffile put the IFDs after the pixels, at 8, 1744, 1910, 2076: page 4's header ends past 2200
		String p = TiffCheck.problem(f);
		assertTrue(p != null && p.contains("truncated") && p.contains("image 4"), p);
		cut(f, 1500); // ImageJ's decoder now sees one page: the next header (at 1744) is past the end
		assertEquals(1, new ij.io.TiffDecoder(dir + "/", f.getFileName().toString()).getTiffInfo().length);
		p = TiffCheck.problem(f);
		assertTrue(p != null && p.contains("truncated") && p.contains("image 2") && p.contains("1500 bytes"), p);
		final Path z = dir.resolve("pages-3x16x12-u16-zlib.tif");
		cut(z, Files.size(z) - 200);
		assertNotNull(TiffCheck.problem(z), "cut zlib pages");
	}

	@Test
	void emptyMissingAndNonTiffFilesGetOneLineEach(@TempDir final Path dir) throws IOException {
		final Path empty = Files.createFile(dir.resolve("empty.tif"));
		assertEquals(empty + " is empty (0 bytes)", TiffCheck.problem(empty));
		final Path text = Files.writeString(dir.resolve("notes.tif"), "not an image\n", StandardCharsets.UTF_8);
		assertTrue(TiffCheck.problem(text).startsWith(text + " is not a TIFF file"), TiffCheck.problem(text));
		assertTrue(TiffCheck.problem(dir.resolve("nope.tif")).contains("does not exist"));
		final IllegalArgumentException e = org.junit.jupiter.api.Assertions.assertThrows(IllegalArgumentException.class,
				() -> TiffCheck.requireComplete(empty));
		assertTrue(e.getMessage().contains("empty.tif"));
	}

	public static void cut(final Path f, final long length) throws IOException {
		try (RandomAccessFile r = new RandomAccessFile(f.toFile(), "rw")) {
			r.setLength(length);
		}
	}
}
