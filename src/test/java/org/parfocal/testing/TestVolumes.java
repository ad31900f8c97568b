package org.parfocal.testing;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.util.List;
import java.util.Random;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/** Seeded test volumes, golden-file reading and tolerance assertions that name the worst voxel. */
public final class TestVolumes {

	private TestVolumes() {}

	/** Sampled Gaussian, sigmas in voxels, origin at ⌊(k − 1)/2⌋, unit sum. A 2D PSF has kz = 1. */
	public static Volume gaussianPsf(final int kx, final int ky, final int kz, final double sx, final double sy, final double sz) {
		final Volume h = Volume.zeros(kx, ky, kz, null);
		double s = 0;
		for (int z = 0; z < kz; z++)
			for (int y = 0; y < ky; y++)
				for (int x = 0; x < kx; x++) {
					final double dx = (x - (kx - 1) / 2) / sx, dy = (y - (ky - 1) / 2) / sy, dz = kz == 1 ? 0 : (z - (kz - 1) / 2) / sz;
					final double v = Math.exp(-0.5 * (dx * dx + dy * dy + dz * dz));
					h.set(x, y, z, (float) v);
					s += v;
				}
		final float[] d = h.data();
		for (int i = 0; i < d.length; i++) d[i] = (float) (d[i] / s);
		return h;
	}

	/** Uniform [0, 1) values from a seeded generator, calibrated 0.1 × 0.1 × 0.3 µm. */
	public static Volume random(final long seed, final int nx, final int ny, final int nz) {
		final Random r = new Random(seed);
		final Volume v = Volume.zeros(nx, ny, nz, VoxelSize.microns(0.1, 0.1, 0.3));
		final float[] d = v.data();
		for (int i = 0; i < d.length; i++) d[i] = r.nextFloat();
		return v;
	}

	public static void assertMessage(final String expected, final org.junit.jupiter.api.function.Executable call) {
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, call);
		assertTrue(e.getMessage().contains(expected), () -> "message '" + e.getMessage() + "' should contain '" + expected + "'");
		assertTrue(!e.getMessage().contains("\n"), "one line");
	}

	public static double[] toDouble(final float[] a) {
		final double[] d = new double[a.length];
		for (int i = 0; i < a.length; i++) d[i] = a[i];
		return d;
	}

	/** Max |ref − got| ≤ tol · max |ref|; the failure names the worst voxel. */
	public static void assertClose(final double[] ref, final float[] got, final double tol, final String what) {
		assertEquals(ref.length, got.length, what + ": length");
		double scale = 0;
		for (final double v : ref) scale = Math.max(scale, Math.abs(v));
		int worst = 0;
		double err = 0;
		for (int i = 0; i < ref.length; i++) {
			final double e = Math.abs(ref[i] - got[i]);
			if (e > err) {
				err = e;
				worst = i;
			}
		}
		final double rel = err / scale;
		final int w = worst;
		assertTrue(rel <= tol, () -> what + ": relative error " + rel + " at index " + w + " (ref " + ref[w] + ", got " + got[w] + ")");
	}

	public static float[] readF32(final String resource) {
		try (InputStream in = TestVolumes.class.getResourceAsStream(resource)) {
			if (in == null) throw new IllegalStateException("missing test resource " + resource);
			final ByteBuffer bb = ByteBuffer.wrap(in.readAllBytes()).order(ByteOrder.LITTLE_ENDIAN);
			final float[] f = new float[bb.remaining() / 4];
			bb.asFloatBuffer().get(f);
			return f;
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
	}

	public static List<String> resourceLines(final String resource) {
		try (InputStream in = TestVolumes.class.getResourceAsStream(resource)) {
			if (in == null) throw new IllegalStateException("missing test resource " + resource);
			return List.of(new String(in.readAllBytes(), StandardCharsets.UTF_8).split("\n"));
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
	}
}
