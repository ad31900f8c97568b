package org.parfocal.blocks;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.Level;

/**
 * Block-wise deconvolution against the whole-stack run of the same engine (the reference is the engine itself on
 * the whole stack, whose own checks are outside references in {@code DeconvolutionTest}), and the plan's
 * arithmetic against its definition (partition of unity, coverage, budget).
 */
class BlockDeconvolutionTest {

	private static final Volume PSF = BlockScenes.psf(9, 7, 1.3, 1.2);
	private static final Volume REC = BlockScenes.recording(11, 64, 56, 30, PSF);

	/** max |block − whole| / range(whole), everywhere and where one block has weight 1 (away from the seams). */
	static double[] differences(final Volume whole, final Volume blocks, final BlockPlan plan) {
		float mn = Float.MAX_VALUE, mx = -Float.MAX_VALUE;
		for (final float v : whole.data()) {
			mn = Math.min(mn, v);
			mx = Math.max(mx, v);
		}
		double all = 0, away = 0;
		for (int z = 0; z < whole.nz(); z++)
			for (int y = 0; y < whole.ny(); y++)
				for (int x = 0; x < whole.nx(); x++) {
					final double d = Math.abs(blocks.get(x, y, z) - whole.get(x, y, z)) / (mx - mn);
					all = Math.max(all, d);
					boolean seam = false;
					for (final Block b : plan.blocks()) {
						final double w = plan.weight(b, x, y, z);
						seam |= w > 0 && w < 1;
					}
					if (!seam) away = Math.max(away, d);
				}
		return new double[] { all, away };
	}

	private static void compare(final DeconvolutionOptions o) {
		final DeconvolutionResult whole = Deconvolution.run(REC, PSF, o, null);
		final BlockPlan plan = BlockPlan.forTileSize(REC.shape(), PSF.shape(), o, new int[] { 24, 24, 12 });
		assertEquals(3 * 3 * 3, plan.count(), plan.toString());
		final Volume blocks = BlockDeconvolution.run(REC, PSF, o, plan, null);
		final double[] d = differences(whole.estimate(), blocks, plan);
		System.out.printf(Locale.ROOT, "%s, %d iterations, %s: max difference %.2e of the range, away from seams %.2e%n", o.method().key(), o.iterations(),
				plan, d[0], d[1]);
		assertTrue(d[0] <= 0.01, "largest difference " + d[0] + " of the range (limit 1 %)");
		assertTrue(d[1] <= 1e-4, "largest difference away from seams " + d[1] + " of the range (limit 1e-4)");
	}

	@Test
	void richardsonLucyBlockwiseMatchesWholeStack() {
		compare(DeconvolutionOptions.of(DeconvolutionMethod.RL, 20).withOffset(Level.ESTIMATED).withBackground(Level.ESTIMATED));
	}

	@Test
	void totalVariationBlockwiseMatchesWholeStack() {
		compare(DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, 20).withOffset(Level.ESTIMATED).withBackground(Level.ESTIMATED));
	}

	@Test
	void sharedLevelsAreThoseOfTheWholeStackRun() throws Exception {
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 1).withOffset(Level.ESTIMATED).withBackground(Level.ESTIMATED);
		final DeconvolutionResult whole = Deconvolution.run(REC, PSF, o, null);
		final BlockDeconvolution.Levels l = BlockDeconvolution.levels(BlockSource.of(REC), o, null);
		assertEquals(whole.offset(), l.offset(), 0, "offset");
		assertEquals(whole.background(), l.background(), 0, "background");
	}

	/** The whole-stack run is the reference: background=dark block by block gives its value (the default of a Deconvolve line without background). */
	@Test
	void darkBackgroundBlockwiseIsTheWholeStackValue() throws Exception {
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 1).withOffset(Level.ESTIMATED).withBackground(Level.DARK);
		final DeconvolutionResult whole = Deconvolution.run(REC, PSF, o, null);
		final BlockDeconvolution.Levels l = BlockDeconvolution.levels(BlockSource.of(REC), o, null);
		assertTrue(whole.background() > 0, "the dark level of a recording with background is positive: " + whole.background());
		assertEquals(whole.background(), l.background(), 1e-9 * whole.background(), "dark background");
		compare(DeconvolutionOptions.of(DeconvolutionMethod.RL, 20).withOffset(Level.ESTIMATED).withBackground(Level.DARK));
	}

	@Test
	void weightsArePartitionOfUnityAndBlocksCoverTheStack() {
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 5);
		final int[] n = { 50, 37, 23 };
		final BlockPlan plan = BlockPlan.forTileSize(n, new int[] { 7, 5, 3 }, o, new int[] { 12, 10, 7 });
		assertTrue(plan.count() >= 27, plan.toString());
		for (int z = 0; z < n[2]; z++)
			for (int y = 0; y < n[1]; y++)
				for (int x = 0; x < n[0]; x++) {
					double s = 0;
					int cores = 0;
					for (final Block b : plan.blocks()) {
						s += plan.weight(b, x, y, z);
						boolean in = true;
						final int[] p = { x, y, z };
						for (int d = 0; d < 3; d++) in &= p[d] >= b.coreOrigin()[d] && p[d] < b.coreOrigin()[d] + b.coreSize()[d];
						if (in) cores++;
						if (plan.weight(b, x, y, z) > 0)
							for (int d = 0; d < 3; d++)
								assertTrue(p[d] >= b.outOrigin()[d] && p[d] < b.outOrigin()[d] + b.outSize()[d], "weight outside the block's output box");
					}
					assertEquals(1, s, 1e-12, "weights at " + x + "," + y + "," + z);
					assertEquals(1, cores, "tiles must partition the stack");
				}
	}

	@Test
	void budgetPlanFitsAndSmallStacksNeedNoBlocks() {
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL_TV, 10);
		final int[] n = { 512, 512, 100 }, k = { 33, 33, 21 };
		final long budget = 200L << 20;
		assertTrue(BlockPlan.needed(n, k, o, budget));
		final BlockPlan p = BlockPlan.forBudget(n, k, o, budget);
		assertTrue(p.count() > 1 && p.bytesPerBlock() <= budget, p.toString());
		for (final Block b : p.blocks()) assertTrue(Deconvolution.bytesNeeded(b.readSize(), k, o) <= budget, b.toString());
		assertTrue(p.describe().containsKey("halo") && p.describe().containsKey("blocks"));
		assertTrue(!BlockPlan.needed(new int[] { 64, 64, 16 }, new int[] { 9, 9, 7 }, o, 1L << 30));
		assertEquals(1, BlockPlan.forBudget(new int[] { 64, 64, 16 }, new int[] { 9, 9, 7 }, o, 1L << 30).count());
	}

	@Test
	void badPlansGetOneLine() {
		final DeconvolutionOptions o = DeconvolutionOptions.of(DeconvolutionMethod.RL, 10);
		final IllegalArgumentException small = assertThrows(IllegalArgumentException.class,
				() -> BlockPlan.forTileSize(new int[] { 100, 100, 50 }, new int[] { 21, 21, 11 }, o, new int[] { 15, 40, 40 }));
		assertTrue(small.getMessage().contains("smaller than the PSF") && !small.getMessage().contains("\n"), small.getMessage());
		final IllegalArgumentException budget = assertThrows(IllegalArgumentException.class,
				() -> BlockPlan.forBudget(new int[] { 100, 100, 50 }, new int[] { 21, 21, 11 }, o, 1 << 20));
		assertTrue(budget.getMessage().startsWith("The memory budget (1.0 MB) is too small for any block"), budget.getMessage());
	}
}
