package org.parfocal.zarr;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.stream.Stream;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.Volume;
import org.parfocal.provenance.Provenance;

import com.google.gson.JsonArray;
import com.google.gson.JsonObject;
import com.google.gson.JsonParser;

/**
 * OME-Zarr against an independent implementation, Python {@code zarr} 2.13 with {@code numcodecs} 0.11 (Debian
 * {@code python3-zarr}), through the committed files of {@code tools/zarr/read_with_python_zarr.py}: what Python
 * zarr found in the image this project writes ({@code written-here.python.json}), and an image Python zarr wrote
 * itself ({@code python-written.zarr}, uint16, zlib, "." separator). The expected values are the formula of
 * {@link ZarrSamples} and the NGFF 0.4 specification's metadata layout (axes with type and unit, a scale
 * transformation per dataset), not numbers copied from the output.
 */
class ZarrInteropTest {

	static final Path RES = Path.of("src/test/resources/zarr");

	@TempDir
	Path dir;

	@Test
	void pythonZarrOpensOurOutputWithItsShapeCalibrationAndValues() throws Exception {
		final JsonObject r = JsonParser.parseString(Files.readString(RES.resolve("written-here.python.json"))).getAsJsonObject();
		assertEquals(List.of(1, 2, 6, 12, 20), ints(r.getAsJsonArray("shape")), "t, c, z, y, x as Python zarr sees them");
		assertEquals(List.of(1, 1, 4, 8, 8), ints(r.getAsJsonArray("chunks")));
		assertEquals("float32", r.get("dtype").getAsString());
		assertEquals("zlib", r.getAsJsonObject("compressor").get("id").getAsString());
		assertEquals("0.4", r.get("ngff_version").getAsString());
		final JsonArray axes = r.getAsJsonArray("axes");
		final String[] names = { "t", "c", "z", "y", "x" }, types = { "time", "channel", "space", "space", "space" };
		for (int i = 0; i < 5; i++) {
			final JsonObject a = axes.get(i).getAsJsonObject();
			assertEquals(names[i], a.get("name").getAsString());
			assertEquals(types[i], a.get("type").getAsString());
			if (i >= 2) assertEquals("micrometer", a.get("unit").getAsString(), "NGFF units are UDUNITS-2 names");
		}
		final JsonArray scale = r.getAsJsonArray("scale");
		final double[] want = { 1, 1, 0.3, 0.12, 0.12 };
		for (int i = 0; i < 5; i++) assertEquals(want[i], scale.get(i).getAsDouble(), 1e-12, "scale " + names[i]);
		double sum = 0;
		for (int c = 0; c < 2; c++)
			for (int z = 0; z < 6; z++)
				for (int y = 0; y < 12; y++)
					for (int x = 0; x < 20; x++) sum += ZarrSamples.value(c, x, y, z);
		assertEquals(sum, r.get("sum").getAsDouble(), 1e-6 * sum, "sum of every voxel (edge chunks cut to the shape)");
		final JsonObject s = r.getAsJsonObject("samples");
		assertEquals(ZarrSamples.value(1, 19, 11, 5), s.get("0,1,5,11,19").getAsFloat());
		assertEquals(ZarrSamples.value(0, 8, 8, 4), s.get("0,0,4,8,8").getAsFloat());
		assertEquals(ZarrSamples.value(1, 17, 3, 2), s.get("0,1,2,3,17").getAsFloat());
		assertTrue(r.get("complete").getAsBoolean());
		assertEquals("Deconvolve", r.get("provenance_command").getAsString());
	}

	/** The committed image is what the current writer writes: same metadata text, same chunk contents. */
	@Test
	void theCommittedImageIsWhatTheWriterWritesToday() throws Exception {
		final Path now = dir.resolve("written-here.zarr"); // the image name comes from the file name
		ZarrSamples.writeSample(now);
		for (final String m : List.of(".zgroup", ".zattrs", "0/.zarray"))
			assertEquals(Files.readString(RES.resolve("written-here.zarr").resolve(m)), Files.readString(now.resolve(m)), m);
		final OmeZarr a = OmeZarr.open(RES.resolve("written-here.zarr")), b = OmeZarr.open(now);
		for (int c = 0; c < 2; c++) {
			final Volume va = a.read(0, c, new int[3], a.shape()), vb = b.read(0, c, new int[3], b.shape());
			assertArrayEquals(va.data(), vb.data());
			for (int z = 0; z < 6; z++)
				for (int y = 0; y < 12; y++)
					for (int x = 0; x < 20; x++) assertEquals(ZarrSamples.value(c, x, y, z), va.get(x, y, z));
		}
		assertEquals(ZarrSamples.VOXEL.dx(), a.voxelSize().dx(), 1e-12);
		assertEquals(ZarrSamples.VOXEL.dz(), a.voxelSize().dz(), 1e-12);
		assertEquals("µm", a.voxelSize().unit());
		assertEquals("Deconvolve", Provenance.fromJson(a.provenanceJson()).command());
		try (Stream<Path> l = Files.list(dir)) {
			assertEquals(List.of("written-here.zarr"), l.map(p -> p.getFileName().toString()).toList(), "no hidden folder left");
		}
	}

	@Test
	void readsAnImagePythonZarrWrote() throws Exception {
		final JsonObject r = JsonParser.parseString(Files.readString(RES.resolve("python-written.json"))).getAsJsonObject();
		final OmeZarr img = OmeZarr.open(RES.resolve("python-written.zarr"));
		assertArrayEquals(new int[] { 11, 9, 7 }, img.shape(), "x, y, z of a (7, 9, 11) z, y, x array");
		assertEquals(1, img.frames());
		assertEquals(1, img.channels());
		assertEquals(0.12, img.voxelSize().dx(), 1e-12);
		assertEquals(0.3, img.voxelSize().dz(), 1e-12);
		assertEquals("µm", img.voxelSize().unit());
		final Volume v = img.read(0, 0, new int[3], img.shape());
		double sum = 0;
		for (final float f : v.data()) sum += f;
		assertEquals(r.get("sum").getAsLong(), (long) sum);
		final JsonObject s = r.getAsJsonObject("samples");
		assertEquals(s.get("6,8,10").getAsInt(), (int) v.get(10, 8, 6));
		assertEquals(s.get("3,4,5").getAsInt(), (int) v.get(5, 4, 3));
		assertEquals(s.get("0,0,0").getAsInt(), (int) v.get(0, 0, 0));
		// a box across chunk borders (chunks 5 x 4 x 3) equals the same box of the whole
		final Volume box = img.read(0, 0, new int[] { 3, 2, 1 }, new int[] { 7, 6, 5 });
		for (int z = 0; z < 5; z++)
			for (int y = 0; y < 6; y++)
				for (int x = 0; x < 7; x++) assertEquals(v.get(3 + x, 2 + y, 1 + z), box.get(x, y, z));
	}

	@Test
	void unsupportedCodecsAndUnfinishedOutputsGetOneLine() throws Exception {
		final Path copy = dir.resolve("blosc.zarr");
		copyTree(RES.resolve("python-written.zarr"), copy);
		final Path meta = copy.resolve("scale0/.zarray");
		Files.writeString(meta, Files.readString(meta).replace("\"zlib\"", "\"blosc\""));
		final IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> OmeZarr.open(copy));
		assertTrue(e.getMessage().contains("'blosc'") && !e.getMessage().contains("\n"), e.getMessage());
		// an output whose writing did not finish
		final Path half = dir.resolve("half.zarr");
		copyTree(RES.resolve("written-here.zarr"), half);
		final Path attrs = half.resolve(".zattrs");
		Files.writeString(attrs, Files.readString(attrs).replace("\"complete\": true", "\"complete\": false"));
		final IllegalArgumentException f = assertThrows(IllegalArgumentException.class, () -> OmeZarr.open(half));
		assertTrue(f.getMessage().contains("not complete"), f.getMessage());
		// a chunk cut short
		final Path cut = dir.resolve("cut.zarr");
		copyTree(RES.resolve("python-written.zarr"), cut);
		final Path chunk = cut.resolve("scale0/1.1.1");
		final byte[] b = Files.readAllBytes(chunk);
		Files.write(chunk, java.util.Arrays.copyOf(b, b.length / 2));
		final OmeZarr img = OmeZarr.open(cut);
		final IllegalArgumentException g = assertThrows(IllegalArgumentException.class, () -> img.read(0, 0, new int[3], img.shape()));
		assertTrue(g.getMessage().contains("1.1.1"), g.getMessage());
		assertFalse(Files.readString(RES.resolve("python-written.zarr/scale0/.zarray"), StandardCharsets.UTF_8).contains("blosc"), "input untouched");
	}

	static void copyTree(final Path from, final Path to) throws Exception {
		try (Stream<Path> s = Files.walk(from)) {
			for (final Path p : s.toList()) {
				final Path q = to.resolve(from.relativize(p).toString());
				if (Files.isDirectory(p)) Files.createDirectories(q);
				else Files.copy(p, q);
			}
		}
	}

	private static List<Integer> ints(final JsonArray a) {
		return a.asList().stream().map(e -> e.getAsInt()).toList();
	}
}
