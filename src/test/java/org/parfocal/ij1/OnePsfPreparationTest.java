package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import ij.IJ;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.blocks.Recipe;
import org.parfocal.cli.BlockRunner;
import org.parfocal.command.OpticsRequest;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.demo.SampleScene;
import org.parfocal.psf.PsfGrid;

/**
 * One PSF preparation for every front end ({@link org.parfocal.command.PsfSource}): the block runner (and with
 * it Spark) gets the PSF the menu command gets, for a PSF from the optics (the box fitted to the stack, which
 * holds a widefield defocus cone; before, the runners took the optics-only box) and for a PSF file at other voxels.
 */
class OnePsfPreparationTest {

	private static final VoxelSize VOXEL = VoxelSize.microns(0.1, 0.1, 0.25);
	private static final int[] SHAPE = { 48, 48, 40 };

	@Test
	void theBlockRunnerPreparesThePsfFromTheOpticsAsTheMenuCommandDoes() {
		final Recipe r = Recipe.parse("psf=from_optics model=born-wolf modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 "
				+ "emission=0.52 voxel_xy=0.1 voxel_z=0.25");
		final Volume blocks = BlockRunner.loadPsf(r, VOXEL, SHAPE);
		final OpticsRequest o = r.optics();
		final Hyperstack stack = Hyperstack.of(Volume.zeros(SHAPE[0], SHAPE[1], SHAPE[2], VOXEL));
		final List<String> notes = new ArrayList<>();
		final Volume menu = DeconvolvePsfs.psfsFor(stack, null, new OpticsRequest(o.model(), o.optics(), o.voxelXY(), o.voxelZ(), 0, 0),
				notes, false).get(0);
		assertArrayEquals(menu.shape(), blocks.shape());
		assertArrayEquals(menu.data(), blocks.data(), 0f);
		// the optics-only box the runners took before is another PSF: this test fails on that path
		final PsfGrid opticsOnly = o.grid();
		assertNotEquals(opticsOnly.nz(), blocks.nz(), "the box is fitted to the stack's depth, not to the optics alone");
	}

	@Test
	void theBlockRunnerResamplesAPsfFileAsTheMenuCommandDoes(@TempDir final Path dir) {
		final Volume fine = SampleScene.gaussianPsf(21, 21, 11).withVoxelSize(VoxelSize.microns(0.05, 0.05, 0.125));
		final Path file = dir.resolve("psf.tif");
		IJ.saveAsTiff(ImageBridge.toImagePlus(fine, "psf.tif"), file.toString());
		assertTrue(Files.isRegularFile(file));
		final Volume blocks = BlockRunner.loadPsf(Recipe.parse("psf=" + file), VOXEL, SHAPE);
		final Hyperstack stack = Hyperstack.of(Volume.zeros(SHAPE[0], SHAPE[1], SHAPE[2], VOXEL));
		final Volume menu = DeconvolvePsfs.psfsFor(stack, IJ.openImage(file.toString()), null, new ArrayList<>(), false).get(0);
		assertArrayEquals(menu.shape(), blocks.shape());
		assertArrayEquals(menu.data(), blocks.data(), 0f);
		assertTrue(blocks.nx() < fine.nx(), "resampled to the coarser voxels");
	}
}
