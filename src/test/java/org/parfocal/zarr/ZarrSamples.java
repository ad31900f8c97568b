package org.parfocal.zarr;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.Provenance;

/**
 * The small OME-Zarr image this project writes for the independent-reader check: 2 channels of 20 x 12 x 6
 * voxels of 0.12 x 0.12 x 0.3 µm, chunks 8 x 8 x 4 (so the edge chunks are partly outside), value
 * {@code 1000·c + 100·z + 10·y + 0.5·x}, with a fixed provenance record. {@code main} writes it to
 * {@code src/test/resources/zarr/written-here.zarr} (run from the repository root; then run
 * {@code tools/zarr/read_with_python_zarr.py}).
 */
public final class ZarrSamples {

	static final VoxelSize VOXEL = VoxelSize.microns(0.12, 0.12, 0.3);
	static final int[] SHAPE = { 20, 12, 6 }, CHUNK = { 8, 8, 4 };

	private ZarrSamples() {}

	static float value(final int c, final int x, final int y, final int z) {
		return 1000f * c + 100f * z + 10f * y + 0.5f * x;
	}

	static String provenance() {
		return Provenance.of("Deconvolve", "method=richardson-lucy iterations=5 offset=100 background=auto").run("runner", "ZarrSamples").build().toJson();
	}

	static void writeSample(final Path out) throws Exception {
		final List<Volume> vs = new ArrayList<>();
		for (int c = 0; c < 2; c++) {
			final Volume v = Volume.zeros(SHAPE[0], SHAPE[1], SHAPE[2], VOXEL);
			for (int z = 0; z < SHAPE[2]; z++)
				for (int y = 0; y < SHAPE[1]; y++)
					for (int x = 0; x < SHAPE[0]; x++) v.set(x, y, z, value(c, x, y, z));
			vs.add(v);
		}
		OmeZarr.write(out, 1, 2, vs, CHUNK, provenance());
	}

	public static void main(final String[] args) throws Exception {
		final Path out = Path.of(args.length > 0 ? args[0] : "src/test/resources/zarr/written-here.zarr");
		OmeZarr.deleteTree(out);
		writeSample(out);
		System.out.println("wrote " + out);
	}
}
