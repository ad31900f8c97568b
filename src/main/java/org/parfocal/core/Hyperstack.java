package org.parfocal.core;

import java.util.List;

/**
 * An image of {@code channels × frames} volumes of one shape and calibration, in ImageJ's dimension order
 * (x, y, c, z, t): {@link #get(int, int)} returns the volume of channel c at time point t.
 */
public record Hyperstack(int channels, int frames, List<Volume> volumes) {

	public Hyperstack {
		if (channels < 1 || frames < 1) throw new IllegalArgumentException("A hyperstack needs at least one channel and one frame");
		if (volumes.size() != channels * frames)
			throw new IllegalArgumentException(volumes.size() + " volumes for " + channels + " channels x " + frames + " frames");
		for (final Volume v : volumes)
			if (!v.sameShape(volumes.get(0))) throw new IllegalArgumentException("All volumes of a hyperstack must have one shape");
		volumes = List.copyOf(volumes);
	}

	/** A single volume as a 1-channel, 1-frame hyperstack. */
	public static Hyperstack of(final Volume v) {
		return new Hyperstack(1, 1, List.of(v));
	}

	/** Volume of channel c (0-based) at frame t (0-based). */
	public Volume get(final int c, final int t) {
		return volumes.get(c + channels * t);
	}

	public Volume first() { return volumes.get(0); }

	public int nx() { return first().nx(); }

	public int ny() { return first().ny(); }

	public int nz() { return first().nz(); }

	public VoxelSize voxelSize() { return first().voxelSize(); }
}
