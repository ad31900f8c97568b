package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import ij.io.FileSaver;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.demo.SampleScene;

/**
 * A reference folder with a 0-byte, a truncated or a non-TIFF file gets one line naming it, not ImageJ's
 * multi-line opener error (issue 13, items 4 and 12).
 */
class ReferenceFolderFilesTest {

	@Test
	void badReferenceFilesGetOneLineNamingThem(@TempDir final Path dir) throws Exception {
		final Path good = dir.resolve("a-good.tif");
		assertTrue(new FileSaver(ImageBridge.toImagePlus(SampleScene.cell(16, 16, 4, 2), "a-good")).saveAsTiffStack(good.toString()));
		assertEquals(1, CompareWithReferences.references(dir.toString(), "", List.of()).size());
		final Path empty = Files.createFile(dir.resolve("b-empty.tif"));
		IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> CompareWithReferences.references(dir.toString(), "", List.of()));
		assertEquals(empty + " is empty (0 bytes)", e.getMessage());
		Files.delete(empty);
		final Path cut = dir.resolve("c-cut.tif");
		Files.copy(good, cut);
		org.parfocal.cli.TiffCheckTest.cut(cut, Files.size(cut) / 2);
		e = assertThrows(IllegalArgumentException.class, () -> CompareWithReferences.references(dir.toString(), "", List.of()));
		assertTrue(e.getMessage().startsWith(cut + " is truncated: its header declares 4 planes") && !e.getMessage().contains("\n"), e.getMessage());
	}
}
