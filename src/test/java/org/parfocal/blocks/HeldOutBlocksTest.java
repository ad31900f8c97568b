package org.parfocal.blocks;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.Stopping;

/**
 * The default run (held-out stop) block by block: the number of iterations is decided once, on the centre block,
 * and every block runs it (the reference: the block-wise run with that count fixed, bit for bit).
 */
class HeldOutBlocksTest {

	@Test
	void heldOutStopRunsBlockByBlockAndSaysSo() throws java.io.IOException {
		final Volume psf = BlockScenes.psf(9, 7, 1.3, 1.2);
		final Volume rec = BlockScenes.recording(11, 64, 56, 30, psf);
		final DeconvolutionOptions o = Recipe.parse("offset=auto background=auto").options();
		assertTrue(o.stopping() == Stopping.HELD_OUT, "the default run");
		final BlockPlan plan = BlockPlan.forTileSize(rec.shape(), psf.shape(), o, new int[] { 32, 28, 15 });
		final java.util.List<String> notes = new java.util.ArrayList<>();
		final BlockDeconvolution.Levels levels = BlockDeconvolution.levels(BlockSource.of(rec), o, null);
		final DeconvolutionOptions once = BlockDeconvolution.heldOutOnce(BlockSource.of(rec), psf, o, plan, levels, null, notes);
		assertEquals(Stopping.FIXED, once.stopping());
		assertTrue(notes.get(0).startsWith("held-out stop decided once, on block"), notes.toString());
		// every block runs the decided count: the block-wise run equals the fixed run of that count, block for block
		final BlockSink.Memory a = BlockSink.memory(rec.shape(), rec.voxelSize()), b = BlockSink.memory(rec.shape(), rec.voxelSize());
		final BlockDeconvolution.Result r = BlockDeconvolution.run(BlockSource.of(rec), psf, o, plan, a, null);
		BlockDeconvolution.run(BlockSource.of(rec), psf, once, plan, b, null);
		assertEquals(once.iterations(), r.maxIterations());
		assertEquals(once.iterations(), r.minIterations());
		assertArrayEquals(b.result().data(), a.result().data());
		assertTrue(r.notes().stream().anyMatch(n -> n.startsWith("held-out stop decided once")), r.notes().toString());
	}
}
