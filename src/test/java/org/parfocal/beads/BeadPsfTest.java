package org.parfocal.beads;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Random;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Monitor;
import org.parfocal.core.RobustStats;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Fwhm;
import org.parfocal.testing.TestVolumes;

/**
 * PSF from beads against synthetic recordings drawn with the project's Born &amp; Wolf model at known sub-voxel
 * positions ({@link SyntheticBeads}), with seeded Poisson noise.
 * <p>
 * Photon counts: 3·10⁶ detected photons per bead over its 45 × 45 × 25 voxel region, i.e. a peak of about 6 500
 * photons per voxel, on a background of 10 photons per voxel — a bright bead on a 16-bit camera.
 */
class BeadPsfTest {

	static final double DX = 0.05, DZ = 0.15, PHOTONS = 3e6, BACKGROUND = 10;
	/** Lateral 0.05 µm is twice Nyquist (λ/(4·NA) = 0.108 µm), axial 0.15 µm below Nyquist 0.35 µm: well sampled. */
	static final SyntheticBeads GEN = new SyntheticBeads(DX, DZ, 5, 4, 22, 12);

	static BeadOptions options(final double boxXY, final double boxZ, final BackgroundMode bg, final Averaging avg) {
		return new BeadOptions(boxXY, boxZ, 0.1, 6, true, 16, 3.5, bg, avg, false);
	}

	/** Ten beads on a 5 × 2 grid, sub-voxel positions in steps of 1/5 voxel laterally and 1/4 axially. */
	static double[][] tenBeads(final Volume clean) {
		final Random r = new Random(3);
		final double[][] pos = new double[10][];
		for (int i = 0; i < 10; i++) {
			pos[i] = new double[] { 30 + 56 * (i % 5) + r.nextInt(5) / 5.0, 30 + 56 * (i / 5) + r.nextInt(5) / 5.0, 17 + (r.nextInt(9) - 4) / 4.0 };
			GEN.add(clean, pos[i][0], pos[i][1], pos[i][2], PHOTONS);
		}
		return pos;
	}

	/** ‖a − g‖ / ‖g‖: scikit-image's normalized_root_mse with its default Euclidean normalisation (from memory). */
	static double nrmse(final Volume a, final Volume g) {
		double num = 0, den = 0;
		for (int i = 0; i < g.size(); i++) {
			final double d = a.data()[i] - g.data()[i];
			num += d * d;
			den += (double) g.data()[i] * g.data()[i];
		}
		return Math.sqrt(num / den);
	}

	@Test
	void tenBeadsGiveTheGeneratingPsfPositionsAndWidths() {
		final Volume clean = GEN.stack(285, 117, 35);
		final double[][] truth = tenBeads(clean);
		final Volume rec = SyntheticBeads.record(clean, BACKGROUND, 7);
		final BeadPsf.Result r = BeadPsf.measure(rec, options(2.05, 3.0, BackgroundMode.STACK, Averaging.MEAN), Monitor.NONE);
		final List<Bead> acc = r.accepted();
		assertEquals(10, acc.size(), () -> "accepted: " + r.beads());
		// positions within 0.1 voxel of where they were drawn (the drawing grid is the outside reference)
		for (final double[] t : truth) {
			final Bead b = acc.stream().min((p, q) -> Double.compare(dist(p, t), dist(q, t))).orElseThrow();
			assertTrue(Math.abs(b.x() - t[0]) < 0.1 && Math.abs(b.y() - t[1]) < 0.1 && Math.abs(b.z() - t[2]) < 0.1,
					() -> "bead at " + java.util.Arrays.toString(t) + " found at " + b.x() + ", " + b.y() + ", " + b.z());
			assertEquals(t[0] * DX, b.xUm(), 0.1 * DX);
		}
		final Volume psf = r.psf();
		assertEquals(41, psf.nx());
		assertEquals(21, psf.nz());
		assertEquals(1.0, psf.sum(), 1e-5, "unit sum");
		assertEquals(VoxelSize.microns(DX, DX, DZ), psf.voxelSize());
		final Volume g = GEN.psf(20, 10);
		final double e = nrmse(psf, g);
		assertTrue(e < 0.05, "NRMSE of the average against the generating PSF: " + e);
		// FWHM within 5 % of the generating PSF's, measured the same way (Fwhm through the peak)
		assertEquals(Fwhm.lateral(g), r.fwhm()[0], 0.05 * Fwhm.lateral(g));
		assertEquals(Fwhm.lateralY(g), r.fwhm()[1], 0.05 * Fwhm.lateralY(g));
		assertEquals(Fwhm.axial(g), r.fwhm()[2], 0.05 * Fwhm.axial(g));
		// Born & Wolf (from memory): lateral FWHM of the widefield Airy pattern ≈ 0.51·λ/NA = 0.221 µm; tolerance
		// 5 %, which covers the 0.05 µm pixel integration and the linear interpolation of the half-maximum crossing
		final double airy = 0.51 * 0.52 / 1.2;
		assertEquals(airy, r.fwhm()[0], 0.05 * airy);
		assertTrue(r.warnings().isEmpty(), r.warnings()::toString);
	}

	@Test
	void medianAveragingAndTheBorderBackgroundAlsoWork() {
		final Volume clean = GEN.stack(285, 117, 35);
		tenBeads(clean);
		final Volume rec = SyntheticBeads.record(clean, BACKGROUND, 8);
		final Volume g = GEN.psf(20, 10);
		final BeadPsf.Result med = BeadPsf.measure(rec, options(2.05, 3.0, BackgroundMode.STACK, Averaging.MEDIAN), Monitor.NONE);
		assertTrue(nrmse(med.psf(), g) < 0.05, "median: " + nrmse(med.psf(), g));
		// The box-border background also removes the PSF light that reaches the box faces; compare with the generating
		// PSF seen through the same rule (its own border median subtracted, negatives set to 0, unit sum).
		final BeadPsf.Result border = BeadPsf.measure(rec, options(2.05, 3.0, BackgroundMode.BORDER, Averaging.MEAN), Monitor.NONE);
		final Volume gb = g.copy();
		final double bm = BeadPsf.borderMedian(gb.data(), gb.nx(), gb.ny(), gb.nz());
		double s = 0;
		for (int i = 0; i < gb.size(); i++) s += gb.data()[i] = (float) Math.max(0, gb.data()[i] - bm);
		for (int i = 0; i < gb.size(); i++) gb.data()[i] /= s;
		assertTrue(nrmse(border.psf(), gb) < 0.05, "border: " + nrmse(border.psf(), gb));
		assertTrue(nrmse(border.psf(), g) > 0.2, "the border rule cuts a widefield PSF's wings: " + nrmse(border.psf(), g));
	}

	private static double dist(final Bead b, final double[] t) {
		return Math.hypot(Math.hypot(b.x() - t[0], b.y() - t[1]), b.z() - t[2]);
	}

	/** A 16-bit recording with a close pair, a touching pair, a saturated bead, an edge bead and eight good beads. */
	static Volume problemStack(final List<double[]> good) {
		final Volume clean = GEN.stack(200, 150, 27);
		for (final double[] p : new double[][] { { 25, 25 }, { 65, 25 }, { 105, 25 }, { 145, 25 }, { 25, 75 }, { 65, 75 }, { 150, 75 }, { 145, 125 } }) {
			final double[] q = { p[0] + 0.4, p[1] + 0.6, 13.25 };
			good.add(q);
			GEN.add(clean, q[0], q[1], q[2], PHOTONS);
		}
		GEN.add(clean, 100, 75, 13, PHOTONS); // close pair, 0.6 µm apart: resolved, each in the other's box
		GEN.add(clean, 112, 75, 13, PHOTONS);
		GEN.add(clean, 25, 125, 13, PHOTONS); // touching pair, 0.1 µm apart: unresolved, twice as bright
		GEN.add(clean, 27, 125, 13, PHOTONS);
		GEN.add(clean, 65, 125, 13, 15 * PHOTONS); // saturates a 16-bit camera
		GEN.add(clean, 190, 125, 13, PHOTONS); // box of ±15 voxels leaves the image at x = 199
		final Volume rec = SyntheticBeads.record(clean, BACKGROUND, 11);
		final float[] d = rec.data();
		for (int i = 0; i < d.length; i++) d[i] = Math.min(d[i], 65535f); // the camera's 16-bit ceiling
		return rec;
	}

	@Test
	void closePairTouchingPairSaturatedAndEdgeBeadsAreRejectedWithTheirReason() {
		final List<double[]> good = new ArrayList<>();
		final Volume rec = problemStack(good);
		final BeadPsf.Result r = BeadPsf.measure(rec, options(1.5, 2.4, BackgroundMode.STACK, Averaging.MEAN), Monitor.NONE);
		assertEquals(BeadStatus.NEIGHBOUR, near(r, 100, 75).status(), r.beads()::toString);
		assertEquals(BeadStatus.NEIGHBOUR, near(r, 112, 75).status());
		assertEquals(BeadStatus.INTENSITY_OUTLIER, near(r, 26, 125).status(), () -> near(r, 26, 125).reason());
		assertEquals(BeadStatus.SATURATED, near(r, 65, 125).status());
		assertTrue(near(r, 65, 125).reason().contains("65535"), near(r, 65, 125).reason());
		assertEquals(BeadStatus.EDGE, near(r, 190, 125).status());
		for (final double[] g : good) assertEquals(BeadStatus.ACCEPTED, near(r, g[0], g[1]).status(), () -> near(r, g[0], g[1]).reason());
		assertEquals(8, r.accepted().size(), r.beads()::toString);
		// a 32-bit recording has no bit-depth maximum: the same bright bead is then refused only as an intensity outlier
		final BeadPsf.Result f = BeadPsf.measure(rec, new BeadOptions(1.5, 2.4, 0, 6, true, 32, 3.5, BackgroundMode.STACK, Averaging.MEAN, false),
				Monitor.NONE);
		assertEquals(BeadStatus.INTENSITY_OUTLIER, near(f, 65, 125).status());
	}

	private static Bead near(final BeadPsf.Result r, final double x, final double y) {
		return r.beads().stream().filter(b -> Math.abs(b.x() - x) < 2.5 && Math.abs(b.y() - y) < 2.5).findFirst()
				.orElseThrow(() -> new AssertionError("no bead near " + x + ", " + y + ": " + r.beads()));
	}

	@Test
	void oneAndTwoThreadsAgree() {
		final Volume rec = problemStack(new ArrayList<>());
		final BeadOptions o = options(1.5, 2.4, BackgroundMode.BORDER, Averaging.MEDIAN);
		final BeadPsf.Result[] r = new BeadPsf.Result[2];
		Parallelization.runWithNumThreads(1, () -> { r[0] = BeadPsf.measure(rec, o, Monitor.NONE); });
		Parallelization.runWithNumThreads(2, () -> { r[1] = BeadPsf.measure(rec, o, Monitor.NONE); });
		assertEquals(r[0].beads(), r[1].beads());
		TestVolumes.assertClose(TestVolumes.toDouble(r[0].psf().data()), r[1].psf().data(), 1e-5, "1 vs 2 threads");
	}

	@Test
	void twoDimensionalBeadsGiveATwoDimensionalPsf() {
		final SyntheticBeads g2 = new SyntheticBeads(DX, DZ, 5, 1, 15, 0);
		final Volume clean = g2.stack(160, 100, 1);
		final List<double[]> truth = new ArrayList<>();
		for (int i = 0; i < 6; i++) {
			final double[] t = { 25 + 50 * (i % 3) + (i % 5) / 5.0, 25 + 50 * (i / 3) + ((i + 2) % 5) / 5.0, 0 };
			truth.add(t);
			g2.add(clean, t[0], t[1], 0, 1e5);
		}
		final BeadPsf.Result r = BeadPsf.measure(SyntheticBeads.record(clean, BACKGROUND, 5),
				options(1.5, 0, BackgroundMode.STACK, Averaging.MEAN), Monitor.NONE);
		assertEquals(6, r.accepted().size(), r.beads()::toString);
		assertEquals(1, r.psf().nz());
		for (final double[] t : truth) {
			final Bead b = near(r, t[0], t[1]);
			assertEquals(t[0], b.x(), 0.1);
			assertEquals(t[1], b.y(), 0.1);
		}
		assertTrue(nrmse(r.psf(), g2.psf(15, 0)) < 0.05, "2D NRMSE " + nrmse(r.psf(), g2.psf(15, 0)));
		assertTrue(Double.isNaN(r.fwhm()[2]));
	}

	@Test
	void badInputGetsOneClearLine() {
		final Volume clean = GEN.stack(120, 120, 31);
		GEN.add(clean, 60.2, 60.4, 15.5, PHOTONS);
		final Volume one = SyntheticBeads.record(clean, BACKGROUND, 3);
		final BeadOptions o = options(2.05, 3.0, BackgroundMode.STACK, Averaging.MEAN);
		final BeadPsf.Result single = BeadPsf.measure(one, o, Monitor.NONE);
		assertEquals(1, single.accepted().size());
		assertTrue(single.warnings().get(0).startsWith("Only one bead"), single.warnings()::toString);
		TestVolumes.assertMessage("no voxel size", () -> BeadPsf.measure(one.withVoxelSize(VoxelSize.UNCALIBRATED), o, Monitor.NONE));
		final Volume plane = Volume.wrap(java.util.Arrays.copyOf(one.data(), 120 * 120), 120, 120, 1, one.voxelSize());
		TestVolumes.assertMessage("one plane but the box is 3 µm deep", () -> BeadPsf.measure(plane, o, Monitor.NONE));
		TestVolumes.assertMessage("axial box is 0", () -> BeadPsf.measure(one, options(2.05, 0, BackgroundMode.STACK, Averaging.MEAN), Monitor.NONE));
		TestVolumes.assertMessage("larger than the stack", () -> BeadPsf.measure(one, options(8, 3, BackgroundMode.STACK, Averaging.MEAN), Monitor.NONE));
		final Volume noise = SyntheticBeads.record(GEN.stack(60, 60, 21), BACKGROUND, 4);
		TestVolumes.assertMessage("No beads found", () -> BeadPsf.measure(noise, new BeadOptions(1, 1, 0, 100, true, 16, 3.5, BackgroundMode.STACK,
				Averaging.MEAN, false), Monitor.NONE));
		final Volume atEdge = GEN.stack(120, 120, 31);
		GEN.add(atEdge, 25, 60, 15, PHOTONS);
		TestVolumes.assertMessage("None of the 1 beads found could be used (edge 1); the box", () -> BeadPsf.measure(SyntheticBeads.record(atEdge,
				BACKGROUND, 3), options(3, 3.0, BackgroundMode.STACK, Averaging.MEAN), Monitor.NONE));
		TestVolumes.assertMessage("between 0 (unknown) and 100", () -> new BeadOptions(1, 1, -1, 6, true, 16, 3.5, BackgroundMode.STACK, Averaging.MEAN, false));
	}

	/** The bead-size rule: at D = FWHM/2 a Gaussian widens by √(1 + 0.2773/4) − 1 = 3.4 %; above it, a warning. */
	@Test
	void beadSizeRule() {
		// variance of a uniform ball along one axis is R²/5 (textbook second moment): check it by summing a fine grid
		final int n = 201;
		double s2 = 0, cnt = 0;
		for (int i = 0; i < n; i++)
			for (int j = 0; j < n; j++)
				for (int k = 0; k < n; k++) {
					final double x = -1 + 2.0 * i / (n - 1), y = -1 + 2.0 * j / (n - 1), z = -1 + 2.0 * k / (n - 1);
					if (x * x + y * y + z * z <= 1) {
						s2 += x * x;
						cnt++;
					}
				}
		assertEquals(0.2, s2 / cnt, 2e-3, "<x²> of the unit ball");
		assertEquals(8 * Math.log(2) * 0.25 * (s2 / cnt), BeadSize.SPHERE, 3e-3);
		assertEquals(0.034, BeadSize.widening(0.1, 0.2), 1e-3);
		assertEquals(null, BeadSize.check(0.1, 0.2));
		assertNotNull(BeadSize.check(0.2, 0.25));
		assertEquals(0.2, BeadSize.corrected(Math.sqrt(0.04 + BeadSize.SPHERE * 0.01), 0.1), 1e-12);
	}

	/** Fourier shift theorem against the closed form: a sampled Gaussian (σ = 2 voxels, band-limited in practice) moved by a fraction. */
	@Test
	void fourierShiftMatchesTheShiftedGaussian() {
		final int nx = 31, ny = 25, nz = 21;
		final double[] s = { 0.3, -0.45, 0.2 };
		final float[] a = new float[nx * ny * nz];
		final double[] ref = new double[a.length];
		for (int z = 0; z < nz; z++)
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++) {
					final int i = x + nx * (y + ny * z);
					a[i] = (float) g3(x - 15, y - 12, z - 10);
					ref[i] = g3(x + s[0] - 15, y + s[1] - 12, z + s[2] - 10);
				}
		TestVolumes.assertClose(ref, FourierShift.shift(a, nx, ny, nz, s[0], s[1], s[2]), 1e-5, "y(n) = x(n + s)");
	}

	private static double g3(final double x, final double y, final double z) {
		return Math.exp(-(x * x + y * y + z * z) / (2 * 2.0 * 2.0));
	}

	/** A rotationally symmetric PSF (the generating one, design conditions) is left as it is by the symmetrisation. */
	@Test
	void symmetrisationKeepsASymmetricPsf() {
		final Volume g = GEN.psf(15, 8);
		final Volume s = Symmetry.radial(g);
		// 1e-4 of the peak: pixel-area averaging has only the square's 8 symmetries, so coincident radii (3,4 and 5,0)
		// differ slightly in the sampled model
		TestVolumes.assertClose(TestVolumes.toDouble(g.data()), s.data(), 1e-4, "symmetric in, same out");
		final Volume skew = g.copy();
		skew.set(16, 15, 8, skew.get(16, 15, 8) * 2); // one voxel of the first ring doubled
		final Volume t = Symmetry.radial(skew);
		assertEquals(g.get(15, 16, 8) * 1.25, t.get(15, 16, 8), 1e-6 * g.get(15, 16, 8), "the excess is shared by the ring's four voxels");
		assertEquals(g.sum() + g.get(16, 15, 8), t.sum(), 1e-6, "sum kept");
	}

	/** Worked by hand: {1, 2, 3, 4, 100} has median 3, MAD 1, so z(100) = 0.6745 × 97 = 65.43 (Iglewicz & Hoaglin's definition). */
	@Test
	void robustStatistics() {
		final double[] z = RobustStats.modifiedZ(new double[] { 1, 2, 3, 4, 100 }, 0);
		assertEquals(65.4265, z[4], 1e-4);
		assertEquals(0, z[2], 0);
		// half-sample mode: most values near 10, a long tail above (the beads' wings) does not move it
		final float[] v = new float[1000];
		final Random r = new Random(1);
		for (int i = 0; i < v.length; i++) v[i] = i < 450 ? (float) (10 + 0.1 * r.nextGaussian()) : (float) (10 + 50 * r.nextDouble());
		assertEquals(10, RobustStats.halfSampleMode(v, v.length), 0.1);
		assertTrue(RobustStats.median(v, v.length) > 12, "the median is pulled up by the tail");
		// the floor: beads within a percent of each other are no outliers
		final double[] zf = RobustStats.modifiedZ(new double[] { 1.000, 1.001, 0.999, 1.002, 0.998, 1.010 }, 0.02);
		assertTrue(Math.abs(zf[5]) < 1, "z " + zf[5]);
	}
}
