package org.parfocal.zarr;

import java.io.IOException;
import java.util.LinkedHashMap;
import java.util.Map;

import org.parfocal.blocks.BlockSource;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * One frame and channel of an OME-Zarr image read a box at a time: a box is put together from the chunks it
 * meets (a block's halo comes from the neighbouring chunks). Decoded chunks are kept in a small least-recently-used
 * cache, so the plane-by-plane passes of the shared levels decode each chunk once when one layer of chunks fits in
 * the cache ({@code cacheBytes}; 0 for a cache of a sixteenth of the free heap, at most one chunk layer; larger
 * layers are streamed chunk by chunk instead, see {@link #chunkShape()}). A box read decodes each chunk it meets once
 * whatever the cache. Every read
 * checks that the array's metadata has not changed since it was opened.
 */
public final class ZarrBlockSource implements BlockSource {

	private final OmeZarr image;
	private final int t, c;
	private final int[] chunk, shape;
	private final long capacity;
	private long held;
	private final LinkedHashMap<Long, float[]> cache = new LinkedHashMap<>(16, 0.75f, true);

	/**
	 * @param cacheBytes bytes of decoded chunks kept; 0 for the default, negative for none
	 */
	public ZarrBlockSource(final OmeZarr image, final int t, final int c, final long cacheBytes) {
		if (t < 0 || t >= image.frames() || c < 0 || c >= image.channels())
			throw new IllegalArgumentException("Zarr image " + image.name() + " has no frame " + (t + 1) + ", channel " + (c + 1));
		this.image = image;
		this.t = t;
		this.c = c;
		chunk = image.chunkShape();
		shape = image.shape();
		final long chunkBytes = 4L * chunk[0] * chunk[1] * chunk[2];
		final long layer = chunkBytes * ((shape[0] + chunk[0] - 1) / chunk[0]) * ((shape[1] + chunk[1] - 1) / chunk[1]);
		capacity = cacheBytes < 0 ? 0 : cacheBytes > 0 ? cacheBytes : Math.max(chunkBytes, Math.min(layer, MemoryBudget.available() / 16));
	}

	/** Opens {@code path} and its frame t, channel c. */
	public static ZarrBlockSource open(final java.nio.file.Path path, final int t, final int c) throws IOException {
		return new ZarrBlockSource(OmeZarr.open(path), t, c, 0);
	}

	@Override
	public int[] shape() {
		return shape.clone();
	}

	@Override
	public VoxelSize voxelSize() {
		return image.voxelSize();
	}

	@Override
	public int[] chunkShape() {
		return chunk.clone();
	}

	@Override
	public String name() {
		return image.name() + (image.frames() * image.channels() > 1 ? " (frame " + (t + 1) + ", channel " + (c + 1) + ")" : "");
	}

	@Override
	public Volume read(final int[] o, final int[] s) throws IOException {
		for (int d = 0; d < 3; d++)
			if (o[d] < 0 || s[d] < 1 || o[d] + s[d] > shape[d])
				throw new IllegalArgumentException("Box outside the " + shape[0] + " x " + shape[1] + " x " + shape[2] + " image " + image.name());
		image.array().checkUnchanged();
		final Volume v = Volume.zeros(s[0], s[1], s[2], image.voxelSize());
		final float[] dst = v.data();
		final int[] g0 = new int[3], g1 = new int[3];
		for (int d = 0; d < 3; d++) {
			g0[d] = o[d] / chunk[d];
			g1[d] = (o[d] + s[d] - 1) / chunk[d];
		}
		for (int gz = g0[2]; gz <= g1[2]; gz++)
			for (int gy = g0[1]; gy <= g1[1]; gy++)
				for (int gx = g0[0]; gx <= g1[0]; gx++) {
					final float[] ch = chunk(gx, gy, gz);
					final int x0 = Math.max(o[0], gx * chunk[0]), x1 = Math.min(o[0] + s[0], (gx + 1) * chunk[0]);
					final int y0 = Math.max(o[1], gy * chunk[1]), y1 = Math.min(o[1] + s[1], (gy + 1) * chunk[1]);
					final int z0 = Math.max(o[2], gz * chunk[2]), z1 = Math.min(o[2] + s[2], (gz + 1) * chunk[2]);
					for (int z = z0; z < z1; z++)
						for (int y = y0; y < y1; y++) {
							final int a = (x0 - gx * chunk[0]) + chunk[0] * ((y - gy * chunk[1]) + chunk[1] * (z - gz * chunk[2]));
							final int b = (x0 - o[0]) + s[0] * ((y - o[1]) + s[1] * (z - o[2]));
							System.arraycopy(ch, a, dst, b, x1 - x0);
						}
				}
		return v;
	}

	private synchronized float[] chunk(final int gx, final int gy, final int gz) throws IOException {
		final long key = ((long) gz << 42) | ((long) gy << 21) | gx;
		float[] v = cache.get(key);
		if (v != null) return v;
		v = image.readChunk(t, c, gx, gy, gz);
		if (capacity > 0) {
			cache.put(key, v);
			held += 4L * v.length;
			for (final var it = cache.entrySet().iterator(); held > capacity && it.hasNext();) {
				final Map.Entry<Long, float[]> e = it.next();
				if (e.getKey() == key) continue;
				held -= 4L * e.getValue().length;
				it.remove();
			}
		}
		return v;
	}
}
