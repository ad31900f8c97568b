package org.parfocal.quality;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.testing.TestVolumes;

/**
 * Properties of the check on the invented "lantern" cells ({@link SharpScenes}); distances have no outside
 * reference value here (the metric itself is checked against SciPy and POT in the other tests), so these tests
 * check the properties the issue asks for: d(A, A) ≈ floor, symmetry, monotone in blur width, gap closed,
 * calibration handling, determinism, thread independence and bad input.
 */
class ReferenceComparisonTest {

	/** Smaller counts than the defaults, to keep the unit run short; the properties do not depend on them. */
	private static final ReferenceComparison.Options OPTIONS = ReferenceComparison.Options.defaults().withCounts(4096, 32768, 40);

	private static List<Volume> references2D(final int n, final double scale) {
		final List<Volume> refs = new ArrayList<>();
		for (int i = 0; i < n; i++) refs.add(SharpScenes.cell(100 + i, (int) (192 * scale), (int) (192 * scale), 1, scale));
		return refs;
	}

	private static final List<Volume> REFS = references2D(4, 1);

	private static String table(final ReferenceComparison.Report r) {
		return "\n" + r.toText();
	}

	/**
	 * A sharp cell of the same kind that is not among the references scores about the floor (within a factor
	 * 1.6 either way: the floor averages 2-against-2 splits of the references, the comparison is 1 image against
	 * 4), while the same cell blurred by a 2-voxel Gaussian is more than 1.5 floors away and above the sharp
	 * cell's bootstrap interval.
	 */
	@Test
	void sharpImageOfTheSameKindScoresAboutTheFloor() {
		final ReferenceComparison.References refs = ReferenceComparison.prepare(REFS, REFS.get(0), OPTIONS, Monitor.NONE);
		final Volume sharp = SharpScenes.cell2D(7, 192, 192);
		final ReferenceComparison.Report r = ReferenceComparison.compare(refs, sharp, null, Monitor.NONE);
		System.out.println("sharp vs references:" + table(r));
		final ReferenceComparison.Row p = r.row(ReferenceComparison.PATCHES);
		assertTrue(p.distance() < 1.6 * p.floor() && p.distance() > p.floor() / 1.6, table(r));
		final double blurred = ReferenceComparison.compare(refs, SharpScenes.blur(sharp, 2, 0), null, Monitor.NONE).distance();
		assertTrue(blurred > 1.5 * p.floor() && blurred > p.high(), "blurred " + blurred + table(r));
		assertTrue(p.low() <= p.high() && p.high() > 0, table(r));
	}

	/** Distances are symmetric: result A against reference B equals B against A within the bootstrap spread. */
	@Test
	void symmetricInResultAndReference() {
		final Volume a = SharpScenes.cell2D(31, 192, 192), b = SharpScenes.blur(SharpScenes.cell2D(32, 192, 192), 1.5, 0);
		final ReferenceComparison.Report ab = ReferenceComparison.compare(a, List.of(b), null, OPTIONS, Monitor.NONE);
		final ReferenceComparison.Report ba = ReferenceComparison.compare(b, List.of(a), null, OPTIONS, Monitor.NONE);
		for (int k = 0; k < ab.rows().size(); k++) {
			final ReferenceComparison.Row x = ab.rows().get(k), y = ba.rows().get(k);
			final double spread = Math.max(x.high() - x.low(), y.high() - y.low());
			assertEquals(x.distance(), y.distance(), spread, x.property() + table(ab) + table(ba));
		}
	}

	/**
	 * Monotone in blur width: the same cell blurred with Gaussians of σ = 0, 0.75, 1.5, 2.5, 3.5 voxels
	 * (ConvolutionOperator, mirror boundary) moves strictly further from the sharp references, for the patch
	 * distance and for the gradient and Laplacian marginals.
	 */
	@Test
	void distanceIncreasesWithBlurWidth() {
		final ReferenceComparison.References refs = ReferenceComparison.prepare(REFS, REFS.get(0), OPTIONS, Monitor.NONE);
		final Volume sharp = SharpScenes.cell2D(8, 192, 192);
		final double[] sigmas = { 0, 0.75, 1.5, 2.5, 3.5 };
		final String[] rows = { ReferenceComparison.PATCHES, "gradient magnitude", "Laplacian" };
		final double[][] d = new double[rows.length][sigmas.length];
		for (int i = 0; i < sigmas.length; i++) {
			final ReferenceComparison.Report r = ReferenceComparison.compare(refs, SharpScenes.blur(sharp, sigmas[i], 0), null, Monitor.NONE);
			for (int k = 0; k < rows.length; k++) d[k][i] = r.row(rows[k]).distance();
		}
		for (int k = 0; k < rows.length; k++)
			for (int i = 1; i < sigmas.length; i++)
				assertTrue(d[k][i] > d[k][i - 1], rows[k] + " not increasing: " + java.util.Arrays.toString(d[k]));
		System.out.println("patch distance against blur sigma " + java.util.Arrays.toString(sigmas) + ": " + java.util.Arrays.toString(d[0]));
	}

	/**
	 * Gap closed: exactly 0 when the result is the blurred input itself (same sample positions by construction),
	 * near 1 for a sharp result (within 0.35: the floor and the sharp result's distance differ by sampling), and
	 * the baseline equals the input's distance.
	 */
	@Test
	void gapClosedRunsFromInputToReferences() {
		final ReferenceComparison.References refs = ReferenceComparison.prepare(REFS, REFS.get(0), OPTIONS, Monitor.NONE);
		final Volume sharp = SharpScenes.cell2D(9, 192, 192), input = SharpScenes.blur(sharp, 2.5, 0);
		final ReferenceComparison.Report same = ReferenceComparison.compare(refs, input, input, Monitor.NONE);
		for (final ReferenceComparison.Row r : same.rows()) {
			assertEquals(r.distance(), r.baseline(), 0, r.property());
			if (!Double.isNaN(r.gapClosed())) assertEquals(0, r.gapClosed(), 0, r.property());
		}
		final ReferenceComparison.Report good = ReferenceComparison.compare(refs, sharp, input, Monitor.NONE);
		System.out.println("sharp result, blurred input:" + table(good));
		assertEquals(1, good.row(ReferenceComparison.PATCHES).gapClosed(), 0.35, table(good));
		final ReferenceComparison.Report half = ReferenceComparison.compare(refs, SharpScenes.blur(sharp, 1.2, 0), input, Monitor.NONE);
		final double g = half.row(ReferenceComparison.PATCHES).gapClosed();
		assertTrue(g > 0.05 && g < good.row(ReferenceComparison.PATCHES).gapClosed(), "partly deblurred: " + g + table(half));
	}

	/**
	 * Calibration: references recorded on a 2× finer grid (0.05 µm) are resampled to the result's 0.1 µm and
	 * score about the floor; compared voxel for voxel (calibration ignored) their structures look twice as large
	 * and the distance of the same sharp result is several times higher.
	 */
	@Test
	void referencesFromAnotherVoxelSizeAreResampled() {
		final List<Volume> fine = references2D(4, 2);
		final Volume sharp = SharpScenes.cell2D(10, 192, 192);
		final ReferenceComparison.Report r = ReferenceComparison.compare(sharp, fine, null, OPTIONS, Monitor.NONE);
		System.out.println("references at 0.05 µm, resampled:" + table(r));
		final ReferenceComparison.Row p = r.row(ReferenceComparison.PATCHES);
		assertTrue(p.distance() < 1.6 * p.floor(), table(r));
		final ReferenceComparison.Report raw = ReferenceComparison.compare(sharp, fine, null, OPTIONS.withIgnoreCalibration(true), Monitor.NONE);
		System.out.println("references at 0.05 µm, calibration ignored:" + table(raw));
		assertTrue(raw.distance() > 2 * p.distance(), table(raw));
	}

	/** Volumetric patches for 3D stacks: a sharp stack near the floor, a blurred one (σ 2 × 2 × 1.5 voxels) beyond 2 floors. */
	@Test
	void threeDStacksUseVolumetricPatches() {
		final List<Volume> refs = new ArrayList<>();
		for (int i = 0; i < 3; i++) refs.add(SharpScenes.cell(200 + i, 96, 96, 16, 1));
		final ReferenceComparison.References prepared = ReferenceComparison.prepare(refs, refs.get(0), OPTIONS, Monitor.NONE);
		final Volume sharp = SharpScenes.cell(210, 96, 96, 16, 1);
		final ReferenceComparison.Report r = ReferenceComparison.compare(prepared, sharp, SharpScenes.blur(sharp, 2, 1.5), Monitor.NONE);
		System.out.println("3D:" + table(r));
		assertTrue(r.volumetricPatches());
		assertEquals(7 * 7 * 3 * 2, r.patchDimension());
		final ReferenceComparison.Row p = r.row(ReferenceComparison.PATCHES);
		assertTrue(p.distance() < 1.6 * p.floor() && p.baseline() > 2 * p.floor(), table(r));
	}

	/** Same seed: identical reports; 1 and 2 threads: identical reports; inputs unchanged. */
	@Test
	void deterministicAndThreadIndependent() {
		final Volume result = SharpScenes.blur(SharpScenes.cell2D(11, 192, 192), 1, 0), input = SharpScenes.blur(result, 2, 0);
		final List<Volume> copies = new ArrayList<>();
		for (final Volume v : REFS) copies.add(v.copy());
		final Volume r0 = result.copy(), i0 = input.copy();
		final ReferenceComparison.Report[] rep = new ReferenceComparison.Report[3];
		Parallelization.runWithNumThreads(1, () -> rep[0] = ReferenceComparison.compare(result, REFS, input, OPTIONS, Monitor.NONE));
		Parallelization.runWithNumThreads(2, () -> rep[1] = ReferenceComparison.compare(result, REFS, input, OPTIONS, Monitor.NONE));
		Parallelization.runWithNumThreads(2, () -> rep[2] = ReferenceComparison.compare(result, REFS, input, OPTIONS, Monitor.NONE));
		assertEquals(rep[0].rows(), rep[1].rows(), "1 vs 2 threads");
		assertEquals(rep[1].rows(), rep[2].rows(), "repeat");
		final ReferenceComparison.Report other = ReferenceComparison.compare(result, REFS, input, OPTIONS.withSeed(2), Monitor.NONE);
		assertTrue(other.distance() != rep[0].distance(), "the seed matters");
		assertEquals(r0, result);
		assertEquals(i0, input);
		for (int i = 0; i < REFS.size(); i++) assertEquals(copies.get(i), REFS.get(i));
	}

	@Test
	void badInputGivesOneLineMessages() {
		final Volume result = SharpScenes.cell2D(12, 96, 96);
		TestVolumes.assertMessage("No reference images given", () -> ReferenceComparison.compare(result, List.of(), null, OPTIONS, Monitor.NONE));
		final Volume stack = SharpScenes.cell(13, 64, 64, 8, 1);
		TestVolumes.assertMessage("Reference 2 is 3D (8 slices) but the result is 2D", () -> ReferenceComparison.compare(result, List.of(REFS.get(0), stack), null, OPTIONS, Monitor.NONE));
		TestVolumes.assertMessage("Reference 1 is 2D but the result is 3D", () -> ReferenceComparison.compare(stack, List.of(result), null, OPTIONS, Monitor.NONE));
		TestVolumes.assertMessage("Reference 1 (12 x 12 voxels on the common grid) is smaller than the patch",
				() -> ReferenceComparison.compare(result, List.of(SharpScenes.cell2D(14, 12, 12)), null, OPTIONS, Monitor.NONE));
		final Volume flat = Volume.zeros(96, 96, 1, result.voxelSize());
		java.util.Arrays.fill(flat.data(), 3f);
		TestVolumes.assertMessage("Reference 2 is constant", () -> ReferenceComparison.compare(result, List.of(REFS.get(0), flat), null, OPTIONS, Monitor.NONE));
		TestVolumes.assertMessage("The result is constant", () -> ReferenceComparison.compare(flat, REFS, null, OPTIONS, Monitor.NONE));
		final Volume uncal = REFS.get(1).withVoxelSize(VoxelSize.UNCALIBRATED);
		TestVolumes.assertMessage("Reference 2 has no calibration but the result has", () -> ReferenceComparison.compare(result, List.of(REFS.get(0), uncal), null, OPTIONS, Monitor.NONE));
		TestVolumes.assertMessage("The result has no calibration but reference 1 has", () -> ReferenceComparison.compare(uncal, REFS, null, OPTIONS, Monitor.NONE));
		final ReferenceComparison.References refs2D = ReferenceComparison.prepare(REFS, result, OPTIONS, Monitor.NONE);
		TestVolumes.assertMessage("prepared for 2D", () -> ReferenceComparison.compare(refs2D, stack, null, Monitor.NONE));
		TestVolumes.assertMessage("Number of patches must be", () -> OPTIONS.withCounts(3, 100, 0));
	}
}
