package org.parfocal.zarr;

import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.util.Arrays;
import java.util.Comparator;
import java.util.Locale;
import java.util.stream.Stream;

import com.google.gson.JsonArray;
import com.google.gson.JsonElement;
import com.google.gson.JsonObject;
import com.google.gson.JsonParser;

import org.parfocal.core.SixteenBit;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * An OME-Zarr image (NGFF 0.4): a Zarr group whose {@code .zattrs} {@code multiscales} entry names the arrays of
 * its resolution levels, their axes (name, type, unit) and voxel sizes (a {@code scale} coordinate
 * transformation). Only the full-resolution level (the first dataset) is read; a bare Zarr array (a folder with
 * {@code .zarray}) is read too, its axes taken as (t, c,) z, y, x by their number and uncalibrated.
 * <p>
 * Outputs are written as one 5D float32 array {@code 0} with axes t, c, z, y, x (the order NGFF 0.4 requires),
 * zlib-compressed, the voxel size in micrometres as the scale. The image is made under a hidden name beside the
 * output and renamed to the output's name only by {@link #complete}, which first writes {@code .zattrs} with
 * {@code "parfocal": {"complete": true, "provenance": …}}: under its final name an output is always complete.
 */
public final class OmeZarr {

	/** The attribute key of this project's entry in {@code .zattrs}. */
	public static final String ATTRIBUTE = "parfocal";
	/** Chunk shape {x, y, z} of outputs when the input has none to follow. */
	public static final int[] DEFAULT_CHUNK = { 128, 128, 32 };
	private static final String[] AXES = { "t", "c", "z", "y", "x" };

	private final Path root;
	private final ZarrArray array;
	/** Position in the array's dimensions of t, c, z, y, x (-1 when absent). */
	private final int[] axis;
	private final VoxelSize voxelSize;
	private final String name;

	private OmeZarr(final Path root, final ZarrArray array, final int[] axis, final VoxelSize voxelSize, final String name) {
		this.root = root;
		this.array = array;
		this.axis = axis;
		this.voxelSize = voxelSize;
		this.name = name;
	}

	/** True when {@code p} is a Zarr group or array folder, or named {@code *.zarr}. */
	public static boolean isZarr(final Path p) {
		final String n = p.getFileName() == null ? "" : p.getFileName().toString().toLowerCase(Locale.ROOT);
		return n.endsWith(".zarr") || Files.isRegularFile(p.resolve(".zarray")) || Files.isRegularFile(p.resolve(".zgroup"));
	}

	/**
	 * Opens an OME-Zarr image or a bare Zarr array.
	 *
	 * @throws IllegalArgumentException (one line) for a folder that is neither, an image this project has not
	 *         finished writing, or axes it does not understand
	 */
	public static OmeZarr open(final Path root) throws IOException {
		final String name = root.getFileName() == null ? root.toString() : root.getFileName().toString();
		if (!Files.isDirectory(root)) throw new IllegalArgumentException("Zarr image " + root + " does not exist");
		final JsonObject attrs = attributes(root);
		if (attrs.has(ATTRIBUTE) && attrs.get(ATTRIBUTE).isJsonObject()) {
			final JsonElement c = attrs.getAsJsonObject(ATTRIBUTE).get("complete");
			if (c != null && !c.getAsBoolean()) throw new IllegalArgumentException("Zarr image " + name + " is not complete (its writing did not finish)");
		}
		if (!attrs.has("multiscales")) {
			if (!ZarrArray.isArray(root))
				throw new IllegalArgumentException(root + " is neither an OME-Zarr image (no multiscales in .zattrs) nor a Zarr array (no .zarray)");
			final ZarrArray a = ZarrArray.open(root);
			final int nd = a.shape().length;
			if (nd < 2 || nd > 5) throw new IllegalArgumentException("Zarr array " + name + " has " + nd + " dimensions: 2 to 5 are read (t, c, z, y, x)");
			final int[] axis = new int[5];
			for (int k = 0; k < 5; k++) axis[k] = k - (5 - nd);
			return new OmeZarr(root, a, axis, VoxelSize.UNCALIBRATED, name);
		}
		try {
			final JsonObject ms = attrs.getAsJsonArray("multiscales").get(0).getAsJsonObject();
			final JsonObject ds = ms.getAsJsonArray("datasets").get(0).getAsJsonObject();
			final ZarrArray a = ZarrArray.open(root.resolve(ds.get("path").getAsString()));
			final int nd = a.shape().length;
			final int[] axis = new int[5];
			Arrays.fill(axis, -1);
			final String[] units = new String[5];
			if (ms.has("axes")) {
				final JsonArray ax = ms.getAsJsonArray("axes");
				if (ax.size() != nd) throw new IllegalArgumentException("Zarr image " + name + " lists " + ax.size() + " axes for a " + nd + "D array");
				for (int i = 0; i < nd; i++) {
					final JsonElement e = ax.get(i);
					final String n = (e.isJsonObject() ? e.getAsJsonObject().get("name").getAsString() : e.getAsString()).toLowerCase(Locale.ROOT);
					final int k = Arrays.asList(AXES).indexOf(n);
					if (k < 0 || axis[k] >= 0)
						throw new IllegalArgumentException("Zarr image " + name + " has an axis '" + n + "' that is not read (t, c, z, y, x, each once)");
					axis[k] = i;
					if (e.isJsonObject() && e.getAsJsonObject().has("unit")) units[k] = e.getAsJsonObject().get("unit").getAsString();
				}
			} else for (int k = 0; k < 5; k++) axis[k] = k - (5 - nd) >= 0 ? k - (5 - nd) : -1;
			if (axis[3] < 0 || axis[4] < 0) throw new IllegalArgumentException("Zarr image " + name + " has no y and x axes");
			final double[] scale = scale(ds, nd);
			final double[] global = ms.has("coordinateTransformations") ? scale(ms, nd) : null;
			if (global != null) for (int i = 0; i < nd; i++) scale[i] *= global[i];
			VoxelSize vs = VoxelSize.UNCALIBRATED;
			final String unit = units[4];
			final double dz = axis[2] >= 0 ? scale[axis[2]] : 1;
			if (unit != null || scale[axis[4]] != 1 || dz != 1)
				vs = new VoxelSize(scale[axis[4]], scale[axis[3]], dz, unit == null ? VoxelSize.PIXEL : ijUnit(unit));
			return new OmeZarr(root, a, axis, vs, name);
		} catch (final NullPointerException | ClassCastException | IllegalStateException | IndexOutOfBoundsException e) {
			throw new IllegalArgumentException("The OME-Zarr metadata of " + name + " lacks a required entry or has one of the wrong type");
		}
	}

	private static double[] scale(final JsonObject o, final int nd) {
		final double[] s = new double[nd];
		Arrays.fill(s, 1);
		if (!o.has("coordinateTransformations")) return s;
		for (final JsonElement t : o.getAsJsonArray("coordinateTransformations")) {
			final JsonObject to = t.getAsJsonObject();
			if ("scale".equals(to.get("type").getAsString()) && to.has("scale")) {
				final JsonArray a = to.getAsJsonArray("scale");
				if (a.size() != nd) throw new IllegalArgumentException("An OME-Zarr scale has " + a.size() + " entries for " + nd + " axes");
				for (int i = 0; i < nd; i++) s[i] = a.get(i).getAsDouble();
			}
		}
		return s;
	}

	/** NGFF unit names (UDUNITS-2) to this project's spelling. */
	static String ijUnit(final String u) {
		return switch (u) {
		case "micrometer", "micron" -> "µm";
		case "nanometer" -> "nm";
		case "millimeter" -> "mm";
		case "centimeter" -> "cm";
		case "meter" -> "m";
		default -> u;
		};
	}

	/** This project's unit spellings to NGFF's (null for none). */
	static String ngffUnit(final VoxelSize v) {
		if (!v.isCalibrated()) return null;
		return switch (v.unit()) {
		case "µm", "um", "micron", "microns", "micrometer", "μm" -> "micrometer";
		case "nm", "nanometer" -> "nanometer";
		case "mm", "millimeter" -> "millimeter";
		case "cm" -> "centimeter";
		case "m" -> "meter";
		default -> v.unit();
		};
	}

	static JsonObject attributes(final Path dir) throws IOException {
		final Path f = dir.resolve(".zattrs");
		if (!Files.isRegularFile(f)) return new JsonObject();
		try {
			return JsonParser.parseString(Files.readString(f, StandardCharsets.UTF_8)).getAsJsonObject();
		} catch (final RuntimeException e) {
			throw new IllegalArgumentException("The Zarr attributes " + f + " are not valid JSON");
		}
	}

	public Path root() { return root; }

	public ZarrArray array() { return array; }

	public String name() { return name; }

	public int frames() { return size(0); }

	public int channels() { return size(1); }

	/** {nx, ny, nz} of one channel and frame. */
	public int[] shape() {
		return new int[] { size(4), size(3), size(2) };
	}

	public VoxelSize voxelSize() { return voxelSize; }

	/** Chunk shape {x, y, z} of the array. */
	public int[] chunkShape() {
		final int[] c = array.chunks();
		return new int[] { c[axis[4]], c[axis[3]], axis[2] >= 0 ? c[axis[2]] : 1 };
	}

	private int size(final int k) {
		return axis[k] < 0 ? 1 : array.shape()[axis[k]];
	}

	/** The {@code .zattrs} {@value #ATTRIBUTE} entry's provenance JSON, or null. */
	public String provenanceJson() throws IOException {
		final JsonObject a = attributes(root);
		if (!a.has(ATTRIBUTE) || !a.getAsJsonObject(ATTRIBUTE).has("provenance")) return null;
		return a.getAsJsonObject(ATTRIBUTE).get("provenance").toString();
	}

	/** Array position of chunk {@code (gx, gy, gz)} of frame t, channel c. */
	int[] chunkIndex(final int t, final int c, final int gx, final int gy, final int gz) {
		final int[] idx = new int[array.shape().length];
		final int[] cs = array.chunks();
		if (axis[0] >= 0) idx[axis[0]] = t / cs[axis[0]];
		if (axis[1] >= 0) idx[axis[1]] = c / cs[axis[1]];
		if (axis[2] >= 0) idx[axis[2]] = gz;
		idx[axis[3]] = gy;
		idx[axis[4]] = gx;
		return idx;
	}

	/**
	 * The chunk {@code (gx, gy, gz)} of frame t, channel c as a volume of the chunk shape {x, y, z} (voxels past the
	 * array's edge as stored, usually the fill value).
	 */
	public float[] readChunk(final int t, final int c, final int gx, final int gy, final int gz) throws IOException {
		final float[] raw = array.readChunk(chunkIndex(t, c, gx, gy, gz));
		final int[] cs = array.chunks();
		final int nd = cs.length;
		// C order strides of the chunk
		final long[] stride = new long[nd];
		long s = 1;
		for (int d = nd - 1; d >= 0; d--) {
			stride[d] = s;
			s *= cs[d];
		}
		final boolean natural = axis[4] == nd - 1 && axis[3] == nd - 2 && (axis[2] < 0 || axis[2] == nd - 3);
		final int[] xyz = chunkShape();
		final long base = (axis[0] >= 0 ? (t % cs[axis[0]]) * stride[axis[0]] : 0) + (axis[1] >= 0 ? (c % cs[axis[1]]) * stride[axis[1]] : 0);
		final int n = xyz[0] * xyz[1] * xyz[2];
		if (natural && base == 0 && n == raw.length) return raw;
		final float[] out = new float[n];
		final long sx = stride[axis[4]], sy = stride[axis[3]], sz = axis[2] >= 0 ? stride[axis[2]] : 0;
		int i = 0;
		for (int z = 0; z < xyz[2]; z++)
			for (int y = 0; y < xyz[1]; y++)
				for (int x = 0; x < xyz[0]; x++) out[i++] = raw[(int) (base + z * sz + y * sy + x * sx)];
		return out;
	}

	// -------------------------------------------------------------------------------------------------------------
	// writing

	/**
	 * Starts a new OME-Zarr output: a hidden folder {@code .NAME.writing-<unique>} beside {@code output} with
	 * {@code .zgroup}, the multiscales metadata (marked not complete) and the empty array {@code 0} of shape
	 * (frames, channels, nz, ny, nx), chunks (1, 1, cz, cy, cx).
	 *
	 * @throws IllegalArgumentException when the output exists or its folder is missing or not writable
	 */
	public static Writer create(final Path output, final int frames, final int channels, final int[] xyz, final int[] chunk, final VoxelSize voxelSize)
			throws IOException {
		final Path out = output.toAbsolutePath().normalize(), dir = out.getParent();
		if (Files.exists(out)) throw new IllegalArgumentException("Output " + output + " exists: choose a new name (outputs are never replaced)");
		if (dir == null || !Files.isDirectory(dir)) throw new IllegalArgumentException("Cannot write " + output + ": the folder " + dir + " does not exist");
		if (!Files.isWritable(dir)) throw new IllegalArgumentException("Cannot write " + output + ": the folder " + dir + " is not writable");
		final Path hidden = dir.resolve("." + out.getFileName() + ".writing-" + ProcessHandle.current().pid() + "-" + System.nanoTime());
		Files.createDirectory(hidden);
		try {
			ZarrArray.writeAtomically(hidden.resolve(".zgroup"), "{\n  \"zarr_format\": 2\n}".getBytes(StandardCharsets.UTF_8));
			final int[] c = new int[3];
			for (int d = 0; d < 3; d++) c[d] = Math.max(1, Math.min(chunk[d], xyz[d]));
			ZarrArray.create(hidden.resolve("0"), new int[] { frames, channels, xyz[2], xyz[1], xyz[0] }, new int[] { 1, 1, c[2], c[1], c[0] }, 5);
			final Writer w = new Writer(out, hidden);
			w.writeAttributes(voxelSize, null, false);
			return w;
		} catch (final IOException | RuntimeException e) {
			deleteTree(hidden);
			throw e;
		}
	}

	/**
	 * An output being written: its final name and the hidden folder it is written in. Holds only paths, so it can
	 * travel to cluster tasks ({@link #of}).
	 */
	public record Writer(Path output, Path hidden) implements java.io.Serializable {
		private static final long serialVersionUID = 1L;

		/** Reopens an output being written (on an executor). */
		public static Writer of(final String output, final String hidden) {
			return new Writer(Path.of(output), Path.of(hidden));
		}

		/** The image being written (readable before completion through this object only). */
		public OmeZarr image() throws IOException {
			final ZarrArray a = ZarrArray.open(hidden.resolve("0"));
			return new OmeZarr(hidden, a, new int[] { 0, 1, 2, 3, 4 }, VoxelSize.UNCALIBRATED, output.getFileName().toString());
		}

		void writeAttributes(final VoxelSize v, final String provenanceJson, final boolean complete) throws IOException {
			final JsonObject ms = new JsonObject();
			ms.addProperty("version", "0.4");
			ms.addProperty("name", stem(output.getFileName().toString()));
			final JsonArray axes = new JsonArray();
			final String unit = ngffUnit(v);
			for (final String a : AXES) {
				final JsonObject o = new JsonObject();
				o.addProperty("name", a);
				o.addProperty("type", a.equals("t") ? "time" : a.equals("c") ? "channel" : "space");
				if (unit != null && "zyx".contains(a)) o.addProperty("unit", unit);
				axes.add(o);
			}
			ms.add("axes", axes);
			final JsonObject ds = new JsonObject();
			ds.addProperty("path", "0");
			final JsonObject sc = new JsonObject();
			sc.addProperty("type", "scale");
			final JsonArray s = new JsonArray();
			s.add(1.0);
			s.add(1.0);
			s.add(v.dz());
			s.add(v.dy());
			s.add(v.dx());
			sc.add("scale", s);
			final JsonArray ct = new JsonArray();
			ct.add(sc);
			ds.add("coordinateTransformations", ct);
			final JsonArray dss = new JsonArray();
			dss.add(ds);
			ms.add("datasets", dss);
			final JsonArray mss = new JsonArray();
			mss.add(ms);
			final JsonObject root = new JsonObject();
			root.add("multiscales", mss);
			final JsonObject p = new JsonObject();
			p.addProperty("complete", complete);
			if (provenanceJson != null) p.add("provenance", JsonParser.parseString(provenanceJson));
			root.add(ATTRIBUTE, p);
			ZarrArray.writeAtomically(hidden.resolve(".zattrs"), Json.pretty(root).getBytes(StandardCharsets.UTF_8));
		}

		/** Chunk (gx, gy, gz) of frame t, channel c: {@code values} in the chunk shape, x fastest, then y, then z. */
		public void writeChunk(final ZarrArray a, final int t, final int c, final int gx, final int gy, final int gz, final float[] values) throws IOException {
			a.writeChunk(new int[] { t, c, gz, gy, gx }, values);
		}

		/**
		 * Checks that every chunk is on disk, writes the final {@code .zattrs} (complete, with the provenance) and
		 * renames the hidden folder to the output's name.
		 *
		 * @throws IllegalStateException for a missing chunk, or an output name taken meanwhile (nothing replaced)
		 */
		public void complete(final VoxelSize v, final String provenanceJson) throws IOException {
			requireChunks(ZarrArray.open(hidden.resolve("0")));
			writeAttributes(v, provenanceJson, true);
			if (Files.exists(output)) throw new IllegalStateException("Output " + output.getFileName() + " appeared during the run; it was not replaced");
			try {
				Files.move(hidden, output, StandardCopyOption.ATOMIC_MOVE);
			} catch (final AtomicMoveNotSupportedException e) {
				Files.move(hidden, output);
			} catch (final FileAlreadyExistsException e) {
				throw new IllegalStateException("Output " + output.getFileName() + " appeared during the run; it was not replaced");
			}
		}

		/**
		 * {@link #complete} of a 16-bit output ({@code output=16-bit}): once every float32 chunk is on disk, the
		 * scaling of the whole image (every frame and channel) is taken from its smallest and largest value
		 * ({@link SixteenBit}), every chunk is rewritten as uint16, and the array's {@code .zattrs} holds
		 * {@code scale_factor} and {@code add_offset} (the CF convention, value = add_offset + scale_factor ·
		 * stored, which CF-aware readers such as xarray apply; from memory); {@code provenanceFor} gives the record with the scaling.
		 */
		public SixteenBit.Scaling completeSixteenBit(final VoxelSize v, final java.util.function.Function<SixteenBit.Scaling, String> provenanceFor)
				throws IOException {
			final ZarrArray f = ZarrArray.open(hidden.resolve("0"));
			requireChunks(f);
			final int[] g = f.grid(), shape = f.shape(), ch = f.chunks();
			final SixteenBit.Range range = new SixteenBit.Range();
			final java.util.List<int[]> all = new java.util.ArrayList<>();
			for (int t = 0; t < g[0]; t++)
				for (int c = 0; c < g[1]; c++)
					for (int z = 0; z < g[2]; z++)
						for (int y = 0; y < g[3]; y++)
							for (int x = 0; x < g[4]; x++) all.add(new int[] { t, c, z, y, x });
			for (final int[] i : all) {
				// only the voxels inside the image: an edge chunk's padding is not part of the result
				final float[] vals = f.readChunk(i);
				final int nx = Math.min(ch[4], shape[4] - i[4] * ch[4]), ny = Math.min(ch[3], shape[3] - i[3] * ch[3]),
						nz = Math.min(ch[2], shape[2] - i[2] * ch[2]);
				final float[] inside = new float[nx * ny * nz];
				for (int z = 0, k = 0; z < nz; z++)
					for (int y = 0; y < ny; y++, k += nx) System.arraycopy(vals, ch[4] * (y + ch[3] * z), inside, k, nx);
				range.add(inside);
			}
			final SixteenBit.Scaling s = range.scaling();
			final ZarrArray u = f.asUint16();
			for (final int[] i : all) u.writeChunk(i, s.stored(f.readChunk(i)));
			final JsonObject attrs = new JsonObject();
			attrs.addProperty("scale_factor", s.scale());
			attrs.addProperty("add_offset", s.offset());
			ZarrArray.writeAtomically(hidden.resolve("0").resolve(".zattrs"), Json.pretty(attrs).getBytes(StandardCharsets.UTF_8));
			complete(v, provenanceFor.apply(s));
			return s;
		}

		private void requireChunks(final ZarrArray a) {
			final int[] g = a.grid();
			for (int t = 0; t < g[0]; t++)
				for (int c = 0; c < g[1]; c++)
					for (int z = 0; z < g[2]; z++)
						for (int y = 0; y < g[3]; y++)
							for (int x = 0; x < g[4]; x++)
								if (!Files.isRegularFile(a.chunkFile(new int[] { t, c, z, y, x })))
									throw new IllegalStateException("Chunk " + t + "/" + c + "/" + z + "/" + y + "/" + x + " of " + output.getFileName()
											+ " was not written: the output is not complete");
		}

		/** Removes the hidden folder and everything in it. */
		public void abort() {
			deleteTree(hidden);
		}
	}

	/**
	 * Writes volumes that are in memory as a complete OME-Zarr image ({@code volumes} frame by frame, channel by
	 * channel within a frame, all of one shape and voxel size).
	 */
	public static void write(final Path output, final int frames, final int channels, final java.util.List<Volume> volumes, final int[] chunk,
			final String provenanceJson) throws IOException {
		if (volumes.size() != frames * channels) throw new IllegalArgumentException(frames * channels + " volumes needed, got " + volumes.size());
		final Volume first = volumes.get(0);
		final int[] n = first.shape();
		final Writer w = create(output, frames, channels, n, chunk, first.voxelSize());
		try {
			final ZarrArray a = ZarrArray.open(w.hidden().resolve("0"));
			final int[] cs = w.image().chunkShape(), g = { a.grid()[4], a.grid()[3], a.grid()[2] };
			for (int t = 0; t < frames; t++)
				for (int c = 0; c < channels; c++) {
					final Volume v = volumes.get(t * channels + c);
					if (!Arrays.equals(v.shape(), n)) throw new IllegalArgumentException("All volumes must have one shape");
					for (int gz = 0; gz < g[2]; gz++)
						for (int gy = 0; gy < g[1]; gy++)
							for (int gx = 0; gx < g[0]; gx++) {
								final float[] ch = new float[cs[0] * cs[1] * cs[2]];
								for (int z = gz * cs[2]; z < Math.min(n[2], (gz + 1) * cs[2]); z++)
									for (int y = gy * cs[1]; y < Math.min(n[1], (gy + 1) * cs[1]); y++)
										for (int x = gx * cs[0]; x < Math.min(n[0], (gx + 1) * cs[0]); x++)
											ch[(x - gx * cs[0]) + cs[0] * ((y - gy * cs[1]) + cs[1] * (z - gz * cs[2]))] = v.get(x, y, z);
								w.writeChunk(a, t, c, gx, gy, gz, ch);
							}
				}
			w.complete(first.voxelSize(), provenanceJson);
		} catch (final IOException | RuntimeException e) {
			w.abort();
			throw e;
		}
	}

	static String stem(final String n) {
		final int dot = n.lastIndexOf('.');
		return dot > 0 ? n.substring(0, dot) : n;
	}

	/** Deletes a folder and its contents (quietly: what remains is hidden and safe to delete). */
	public static void deleteTree(final Path dir) {
		if (dir == null || !Files.exists(dir)) return;
		try (Stream<Path> s = Files.walk(dir)) {
			for (final Path p : s.sorted(Comparator.reverseOrder()).toList()) Files.deleteIfExists(p);
		} catch (final IOException e) {
			System.err.println("Could not delete " + dir + ": " + e.getMessage());
		}
	}

	/** Reads box {@code origin + size} {x, y, z} of frame t, channel c (no cache: see {@link ZarrBlockSource}). */
	public Volume read(final int t, final int c, final int[] origin, final int[] size) throws IOException {
		try (ZarrBlockSource s = new ZarrBlockSource(this, t, c, 0)) {
			return s.read(origin, size);
		}
	}
}
