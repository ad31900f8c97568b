package org.parfocal.quality;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;

import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;

/**
 * Random image patches as feature vectors, the local-content distribution that the sliced Wasserstein
 * distance compares (patch distributions as image models: Rabin et al. 2011 compare texture statistics this way).
 * <p>
 * Positions are drawn from a seeded generator, in a fixed sequence, before any parallel work: the image with
 * probability proportional to its number of valid positions, then the position uniformly. Each feature is the
 * concatenation over scales of the patch with its own mean removed (then optionally contrast-normalised). The
 * features depend only on the images, the options, the count and the seed, never on the thread count.
 */
public final class Patches {

	private Patches() {}

	/** True when the patches of these images are volumetric: the option asks for it and all images are 3D. */
	public static boolean volumetric(final List<Volume> images, final PatchOptions o) {
		if (!o.volumetric()) return false;
		for (final Volume v : images)
			if (!v.is3D()) return false;
		return true;
	}

	/**
	 * {@code count} features drawn from {@code images} (not modified).
	 *
	 * @param names how each image is named in messages
	 * @throws IllegalArgumentException if an image is too small for the patch at all scales
	 */
	public static PointSet sample(final List<Volume> images, final List<String> names, final PatchOptions o, final int count, final long seed) {
		if (images.isEmpty()) throw new IllegalArgumentException("No images to take patches from");
		if (count < 1) throw new IllegalArgumentException("The number of patches must be at least 1, got " + count);
		final boolean vol = volumetric(images, o);
		final int nImages = images.size();
		final List<Volume[]> pyramids = new ArrayList<>(nImages);
		final int[][] range = new int[nImages][]; // {xmin, xmax, ymin, ymax, zmin, zmax}, inclusive
		final long[] cumulative = new long[nImages];
		long total = 0;
		for (int im = 0; im < nImages; im++) {
			final Volume v = images.get(im);
			range[im] = validRange(v, o, vol, names.get(im));
			final int[] r = range[im];
			total += (long) (r[1] - r[0] + 1) * (r[3] - r[2] + 1) * (r[5] - r[4] + 1);
			cumulative[im] = total;
			pyramids.add(pyramid(v, o.scales()));
		}
		// Positions: sequential, seeded.
		final SplittableRandom rnd = new SplittableRandom(seed);
		final int[] img = new int[count], px = new int[count], py = new int[count], pz = new int[count];
		for (int i = 0; i < count; i++) {
			final long t = rnd.nextLong(total);
			int im = 0;
			while (cumulative[im] <= t) im++;
			final int[] r = range[im];
			img[i] = im;
			px[i] = r[0] + rnd.nextInt(r[1] - r[0] + 1);
			py[i] = r[2] + rnd.nextInt(r[3] - r[2] + 1);
			pz[i] = r[4] + rnd.nextInt(r[5] - r[4] + 1);
		}
		final int size = o.size(), depth = vol ? o.depth() : 1, half = size / 2, per = size * size * depth;
		final int dim = per * o.scales();
		final double[] values = new double[count * dim];
		Parallel.forRange(count, i -> {
			final Volume[] pyr = pyramids.get(img[i]);
			final int base = i * dim;
			for (int s = 0; s < o.scales(); s++) {
				final Volume lv = pyr[s];
				final float[] d = lv.data();
				final int nx = lv.nx(), ny = lv.ny();
				final int x0 = (px[i] >> s) - half, y0 = (py[i] >> s) - half;
				int k = base + s * per;
				double mean = 0;
				for (int z = pz[i]; z < pz[i] + depth; z++)
					for (int y = y0; y < y0 + size; y++) {
						final int row = nx * (y + ny * z);
						for (int x = x0; x < x0 + size; x++) {
							values[k++] = d[row + x];
							mean += d[row + x];
						}
					}
				mean /= per;
				for (int j = base + s * per; j < base + (s + 1) * per; j++) values[j] -= mean;
			}
			if (o.contrastNormalized()) {
				double ms = 0;
				for (int j = base; j < base + dim; j++) ms += values[j] * values[j];
				final double inv = 1 / Math.sqrt(ms / dim + PatchOptions.CONTRAST_FLOOR * PatchOptions.CONTRAST_FLOOR);
				for (int j = base; j < base + dim; j++) values[j] *= inv;
			}
		});
		return new PointSet(dim, count, values);
	}

	/** Inclusive ranges of the patch anchor (x, y centre at full resolution; z first slice) for every scale to fit. */
	static int[] validRange(final Volume v, final PatchOptions o, final boolean vol, final String name) {
		final int size = o.size(), half = size / 2;
		int xmin = 0, xmax = v.nx() - 1, ymin = 0, ymax = v.ny() - 1;
		int nx = v.nx(), ny = v.ny();
		for (int s = 0; s < o.scales(); s++) {
			if (s > 0) {
				nx /= 2;
				ny /= 2;
			}
			final int f = 1 << s;
			xmin = Math.max(xmin, half * f);
			xmax = Math.min(xmax, (nx - size + half) * f + f - 1);
			ymin = Math.max(ymin, half * f);
			ymax = Math.min(ymax, (ny - size + half) * f + f - 1);
		}
		final int depth = vol ? o.depth() : 1;
		if (xmin > xmax || ymin > ymax || v.nz() < depth) {
			final int need = size << (o.scales() - 1);
			throw new IllegalArgumentException(name + " (" + v.nx() + " x " + v.ny() + (v.nz() > 1 ? " x " + v.nz() : "") + " voxels on the common grid) is smaller than the patch: "
					+ size + " x " + size + (vol ? " x " + depth : "") + " at " + o.scales() + " scale" + (o.scales() > 1 ? "s" : "") + " needs at least "
					+ need + " x " + need + (vol ? " x " + depth : "") + "; use smaller or fewer patches");
		}
		return new int[] { xmin, xmax, ymin, ymax, 0, v.nz() - depth };
	}

	/** Level s is the image averaged over 2^s × 2^s blocks in x and y (sizes halved, rounding down). */
	static Volume[] pyramid(final Volume v, final int scales) {
		final Volume[] p = new Volume[scales];
		p[0] = v;
		for (int s = 1; s < scales; s++) {
			final Volume a = p[s - 1];
			final int nx = a.nx() / 2, ny = a.ny() / 2, nz = a.nz();
			if (nx < 1 || ny < 1) {
				p[s] = Volume.zeros(1, 1, nz, a.voxelSize()); // too small; validRange rejects it before use
				continue;
			}
			final Volume b = Volume.zeros(nx, ny, nz, a.voxelSize());
			final float[] in = a.data(), out = b.data();
			final int anx = a.nx(), any = a.ny();
			Parallel.forRange(ny * nz, row -> {
				final int y = row % ny, z = row / ny;
				final int r0 = anx * (2 * y + any * z), r1 = r0 + anx;
				for (int x = 0; x < nx; x++)
					out[x + nx * row] = 0.25f * (in[r0 + 2 * x] + in[r0 + 2 * x + 1] + in[r1 + 2 * x] + in[r1 + 2 * x + 1]);
			});
			p[s] = b;
		}
		return p;
	}
}
