package org.parfocal.conv;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import net.imglib2.parallel.Parallelization;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.testing.TestVolumes;

class AcquisitionTest {

	@Test
	void noiseIsSeededAndThreadCountInvariant() {
		final Volume x = TestVolumes.random(1, 30, 20, 8);
		final Volume h = Psfs.normalized(TestVolumes.random(2, 5, 5, 3));
		final Acquisition.Options o = new Acquisition.Options(Boundary.MIRROR, true, 2, 50, 7, 100);
		final Acquisition acq = new Acquisition(h, x.shape(), o);
		final Volume a = Parallelization.runSingleThreaded(() -> acq.record(x, Monitor.NONE));
		final Volume b = Parallelization.runWithNumThreads(2, () -> acq.record(x, Monitor.NONE));
		assertArrayEquals(a.data(), b.data());
		final Volume c = new Acquisition(h, x.shape(), new Acquisition.Options(Boundary.MIRROR, true, 2, 50, 8, 100)).record(x, Monitor.NONE);
		assertTrue(!java.util.Arrays.equals(a.data(), c.data()), "another seed gives other noise");
	}

	/**
	 * Poisson statistics (textbook: mean = variance = λ): on a flat object the recorded values, in photons,
	 * have mean s(x + b) and variance s(x + b) within sampling error; the offset adds without noise.
	 */
	@Test
	void poissonMeanAndVarianceMatchTheModel() {
		final Volume x = Volume.zeros(64, 64, 16, null);
		java.util.Arrays.fill(x.data(), 10f);
		final Volume h = Psfs.normalized(TestVolumes.random(3, 3, 3, 3));
		final double s = 4, b = 2, offset = 100;
		final Volume y = new Acquisition(h, x.shape(), new Acquisition.Options(Boundary.PERIODIC, true, b, s, 11, offset)).record(x, Monitor.NONE);
		double m = 0, m2 = 0;
		for (final float v : y.data()) {
			final double photons = (v - offset) * s;
			m += photons;
			m2 += photons * photons;
		}
		final int n = y.size();
		m /= n;
		final double var = m2 / n - m * m;
		final double lambda = s * (10 + b);
		assertEquals(lambda, m, 5 * Math.sqrt(lambda / n), "mean");
		assertEquals(lambda, var, 0.03 * lambda, "variance");
	}

	@Test
	void cancellationThrowsAndKeepsInput() {
		final Volume x = TestVolumes.random(1, 16, 16, 4), copy = x.copy();
		final Acquisition acq = new Acquisition(TestVolumes.random(2, 3, 3, 3), x.shape(),
				new Acquisition.Options(Boundary.ZERO, true, 0, 0, 1, 0));
		final Monitor cancelled = new Monitor() {
			@Override
			public boolean isCancelled() { return true; }
		};
		org.junit.jupiter.api.Assertions.assertThrows(Monitor.CancelledException.class, () -> acq.record(x, cancelled));
		assertEquals(copy, x);
	}

	@Test
	void nanPixelsAreReportedWithTheirPosition() {
		final Volume x = TestVolumes.random(1, 16, 16, 4);
		x.set(3, 4, 2, Float.POSITIVE_INFINITY);
		final Acquisition acq = new Acquisition(TestVolumes.random(2, 3, 3, 3), x.shape(),
				new Acquisition.Options(Boundary.ZERO, true, 0, 0, 1, 0));
		TestVolumes.assertMessage("non-finite value (Infinity) at (3, 4, 2)", () -> acq.record(x, Monitor.NONE));
		TestVolumes.assertMessage("Photons must be 0", () -> new Acquisition.Options(Boundary.ZERO, true, 0, -1, 1, 0));
	}
}
