package org.parfocal.command;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.demo.SampleScene;
import org.parfocal.provenance.MacroOptions;

/**
 * The block fallback is decided in one place, {@link DeconvolveRunner#run}: at the budget the whole stack needs it
 * runs the whole stack (bit for bit the engine's run), one byte less and it goes block by block, and with 60 % of it
 * the block-wise result is within 1 % of the range of the whole-stack one (the tolerance of the menu command's own
 * block test). The threshold is the project's own memory estimate ({@link Deconvolution#bytesNeeded} plus input and
 * output); the comparison is the project's own consistency.
 */
class DeconvolveRunnerTest {

	private static final String OPTIONS = "image=cell.tif psf=psf.tif method=richardson-lucy-tv iterations=8 regularization=0.002 stop=fixed "
			+ "threshold=0.001 edges=non-circulant offset=100 background=auto";

	private static final Volume PSF = SampleScene.gaussianPsf(9, 9, 5).withVoxelSize(SampleScene.VOXEL);

	private static Hyperstack recording() {
		final Volume cell = SampleScene.cell(140, 120, 10, 7);
		return Hyperstack.of(new Acquisition(PSF, cell.shape(), new Acquisition.Options(Boundary.ZERO, true, 2, 1, 5, 100)).record(cell, Monitor.NONE)
				.withVoxelSize(SampleScene.VOXEL));
	}

	private static DeconvolveRequest request(final String options) {
		return DeconvolveRequest.from(MacroOptions.parse(options));
	}

	/** What the whole stack needs by the project's estimate: the engine's arrays, the input copy and the output. */
	private static long needed(final Hyperstack in, final DeconvolutionOptions d) {
		return Deconvolution.bytesNeeded(in.first().shape(), PSF.shape(), d) + 8L * in.first().size();
	}

	@Test
	void theRunGoesBlockByBlockExactlyWhenTheBudgetIsTooSmallAndMatchesTheWholeStack() {
		final Hyperstack in = recording();
		final DeconvolveRequest request = request(OPTIONS);
		final long needed = needed(in, request.deconvolution());
		final PsfSource psf = new PsfSource.Given(Hyperstack.of(PSF), "psf.tif", false);

		final List<String> said = new ArrayList<>();
		final DeconvolveRunner.Hooks hooks = new DeconvolveRunner.Hooks() {
			@Override
			public void notice(final String line) {
				said.add(line);
			}
		};
		final DeconvolveRunner.Outcome whole = DeconvolveRunner.run(request, in, psf, needed, hooks, new ArrayList<>(), Monitor.NONE);
		assertFalse(whole.blockwise(), "the whole stack fits in exactly what it needs");
		assertTrue(said.isEmpty(), said::toString);
		assertEquals(1, whole.results().size());
		// no fallback taken: the engine's own run on the prepared PSF, bit for bit
		assertArrayEquals(Deconvolution.run(in.first(), whole.psfs().get(0), request.deconvolution(), Monitor.NONE).estimate().data(),
				whole.volumes().get(0).data());

		assertTrue(DeconvolveRunner.blockwise(request, in.first().shape(), PSF.shape(), needed - 1), "one byte less goes block by block");
		assertFalse(DeconvolveRunner.blockwise(request(OPTIONS + " watch"), in.first().shape(), PSF.shape(), needed - 1),
				"watch mode needs the whole iterate, so it never goes block by block");

		final DeconvolveRunner.Outcome blocks = DeconvolveRunner.run(request, in, psf, needed * 6 / 10, hooks, new ArrayList<>(), Monitor.NONE);
		assertTrue(blocks.blockwise(), "60 % of the need forces blocks");
		assertTrue(blocks.plan().count() > 1, blocks.plan()::toString);
		assertTrue(blocks.results().isEmpty());
		assertEquals(1, blocks.blockRuns().size());
		assertEquals(1, said.size(), said::toString);
		assertTrue(said.get(0).contains("deconvolving block by block"), said.get(0));
		final float[] a = whole.volumes().get(0).data(), b = blocks.volumes().get(0).data();
		float range = 0, diff = 0;
		for (int i = 0; i < a.length; i++) {
			range = Math.max(range, a[i]);
			diff = Math.max(diff, Math.abs(a[i] - b[i]));
		}
		assertTrue(diff > 0, "the block-wise run is a different computation");
		assertTrue(diff <= 0.01 * range, "block-wise within 1 % of the range: " + diff / range);
	}

	@Test
	void theBudgetPropertySetsTheBudget() {
		System.setProperty(DeconvolveRunner.BUDGET_PROPERTY, "12345");
		try {
			assertEquals(12345L, DeconvolveRunner.budget());
		} finally {
			System.clearProperty(DeconvolveRunner.BUDGET_PROPERTY);
		}
	}

	@Test
	void theBlockRunnersPlanFromTheTileSizeWhenGivenElseFromTheBudget() {
		final Hyperstack in = recording();
		final DeconvolutionOptions d = request(OPTIONS).deconvolution();
		final int[] shape = in.first().shape();
		assertEquals(org.parfocal.blocks.BlockPlan.forTileSize(shape, PSF.shape(), d, new int[] { 70, 60, 10 }),
				DeconvolveRunner.plan(shape, PSF.shape(), d, 1, new int[] { 70, 60, 10 }));
		final long budget = needed(in, d) * 6 / 10;
		assertEquals(org.parfocal.blocks.BlockPlan.forBudget(shape, PSF.shape(), d, budget), DeconvolveRunner.plan(shape, PSF.shape(), d, budget, null));
	}
}
