package org.parfocal.zarr;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.InputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.nio.file.StandardOpenOption;
import java.util.Arrays;
import java.util.Locale;
import java.util.concurrent.atomic.AtomicLong;
import java.util.zip.DataFormatException;
import java.util.zip.Deflater;
import java.util.zip.GZIPInputStream;
import java.util.zip.Inflater;

import com.google.gson.JsonArray;
import com.google.gson.JsonElement;
import com.google.gson.JsonNull;
import com.google.gson.JsonObject;
import com.google.gson.JsonParser;

/**
 * One Zarr array (storage specification version 2) in a folder of a file system: the {@code .zarray} metadata and
 * one file per chunk.
 * <p>
 * Why written here rather than taken from a library: the Java Zarr libraries we checked do not resolve from Maven
 * Central alone — {@code dev.zarr:jzarr} needs {@code edu.ucar:cdm-core} (its array type, used by every read and
 * write, so it cannot be excluded) from another repository, and the N5 Zarr reader of the ImgLib2 ecosystem is not
 * published there — and none writes a chunk atomically, which retried cluster tasks need. The format is an open
 * standard of JSON metadata and one compressed file per chunk; the compression is the JDK's zlib (the
 * {@code zlib} and {@code gzip} codecs of numcodecs, which every Zarr reader supports).
 * <p>
 * Supported: C order, no filters, compressors {@code null}, {@code zlib}, {@code gzip}; data types unsigned and
 * signed 8/16/32-bit integers and 32/64-bit floats of either byte order (read), little-endian float32 and uint16
 * (write; uint16 by converting a written float32 array, {@link #asUint16});
 * dimension separators "." and "/". Anything else is refused with one line naming it. Chunk files are written under
 * a temporary name and renamed, so a reader (or a retried writer) sees a chunk whole or not at all; a missing chunk
 * reads as the fill value.
 */
public final class ZarrArray {

	/** The data type this project writes: little-endian IEEE float32. */
	public static final String FLOAT32 = "<f4";
	/** The data type of a 16-bit output ({@code output=16-bit}): little-endian unsigned 16-bit. */
	public static final String UINT16 = "<u2";
	private static final AtomicLong TMP = new AtomicLong();

	private final Path dir;
	private final int[] shape, chunks;
	private final String dtype, compressor, separator;
	private final int level;
	private final double fill;
	private final long modified;

	private ZarrArray(final Path dir, final int[] shape, final int[] chunks, final String dtype, final String compressor, final int level,
			final double fill, final String separator, final long modified) {
		this.dir = dir;
		this.shape = shape;
		this.chunks = chunks;
		this.dtype = dtype;
		this.compressor = compressor;
		this.level = level;
		this.fill = fill;
		this.separator = separator;
		this.modified = modified;
	}

	/** True when {@code dir} holds a Zarr v2 array ({@code .zarray}). */
	public static boolean isArray(final Path dir) {
		return Files.isRegularFile(dir.resolve(".zarray"));
	}

	/**
	 * Opens the array in {@code dir}.
	 *
	 * @throws IllegalArgumentException for a missing or unreadable {@code .zarray}, or a layout not supported (one
	 *         line naming it)
	 */
	public static ZarrArray open(final Path dir) throws IOException {
		final Path meta = dir.resolve(".zarray");
		if (!Files.isRegularFile(meta)) throw new IllegalArgumentException(dir + " is not a Zarr array (no .zarray)");
		final String name = dir.getFileName() == null ? dir.toString() : dir.getFileName().toString();
		final JsonObject o;
		try {
			o = JsonParser.parseString(Files.readString(meta, StandardCharsets.UTF_8)).getAsJsonObject();
		} catch (final RuntimeException e) {
			throw new IllegalArgumentException("The Zarr metadata " + meta + " is not valid JSON");
		}
		try {
			if (o.get("zarr_format").getAsInt() != 2)
				throw new IllegalArgumentException("Zarr array " + name + " is format " + o.get("zarr_format") + ": only version 2 is read");
			final int[] shape = ints(o.getAsJsonArray("shape")), chunks = ints(o.getAsJsonArray("chunks"));
			if (shape.length != chunks.length || shape.length == 0)
				throw new IllegalArgumentException("Zarr array " + name + ": shape and chunks differ in length");
			for (int d = 0; d < shape.length; d++)
				if (shape[d] < 0 || chunks[d] < 1) throw new IllegalArgumentException("Zarr array " + name + ": bad shape or chunks");
			final String dtype = o.get("dtype").getAsString();
			itemSize(dtype, name);
			final String order = o.has("order") ? o.get("order").getAsString() : "C";
			if (!"C".equals(order)) throw new IllegalArgumentException("Zarr array " + name + " is in Fortran order: only C order is read");
			if (o.has("filters") && !o.get("filters").isJsonNull() && o.getAsJsonArray("filters").size() > 0)
				throw new IllegalArgumentException("Zarr array " + name + " uses filters, which are not read: save it without filters");
			String comp = null;
			int level = 1;
			final JsonElement c = o.get("compressor");
			if (c != null && !c.isJsonNull()) {
				comp = c.getAsJsonObject().get("id").getAsString();
				if (!comp.equals("zlib") && !comp.equals("gzip"))
					throw new IllegalArgumentException("Zarr array " + name + " is compressed with '" + comp
							+ "', which is not read: save it with the zlib or gzip compressor, or none");
				if (c.getAsJsonObject().has("level")) level = c.getAsJsonObject().get("level").getAsInt();
			}
			final JsonElement f = o.get("fill_value");
			double fill = 0;
			if (f != null && !f.isJsonNull()) {
				if (f.getAsJsonPrimitive().isNumber()) fill = f.getAsDouble();
				else fill = switch (f.getAsString()) {
				case "NaN" -> Double.NaN;
				case "Infinity" -> Double.POSITIVE_INFINITY;
				case "-Infinity" -> Double.NEGATIVE_INFINITY;
				default -> throw new IllegalArgumentException("Zarr array " + name + ": fill value " + f + " is not a number");
				};
			}
			final String sep = o.has("dimension_separator") ? o.get("dimension_separator").getAsString() : ".";
			if (!sep.equals(".") && !sep.equals("/")) throw new IllegalArgumentException("Zarr array " + name + ": unknown dimension separator " + sep);
			return new ZarrArray(dir, shape, chunks, dtype, comp, level, fill, sep, Files.getLastModifiedTime(meta).toMillis());
		} catch (final NullPointerException | ClassCastException | IllegalStateException | UnsupportedOperationException e) {
			throw new IllegalArgumentException("The Zarr metadata " + meta + " lacks a required entry or has one of the wrong type");
		}
	}

	/**
	 * Creates an empty float32 array in {@code dir} (made, must not exist): zlib at {@code level}, fill value 0,
	 * dimension separator "/" (as OME-Zarr 0.4 asks).
	 */
	public static ZarrArray create(final Path dir, final int[] shape, final int[] chunks, final int level) throws IOException {
		Files.createDirectory(dir);
		final JsonObject o = new JsonObject();
		o.addProperty("zarr_format", 2);
		o.add("shape", json(shape));
		o.add("chunks", json(chunks));
		o.addProperty("dtype", FLOAT32);
		final JsonObject c = new JsonObject();
		c.addProperty("id", "zlib");
		c.addProperty("level", level);
		o.add("compressor", c);
		o.addProperty("fill_value", 0.0);
		o.addProperty("order", "C");
		o.add("filters", JsonNull.INSTANCE);
		o.addProperty("dimension_separator", "/");
		writeAtomically(dir.resolve(".zarray"), Json.pretty(o).getBytes(StandardCharsets.UTF_8));
		return open(dir);
	}

	public Path dir() { return dir; }

	public int[] shape() { return shape.clone(); }

	public int[] chunks() { return chunks.clone(); }

	public String dtype() { return dtype; }

	/** The compressor's id, or null for none. */
	public String compressor() { return compressor; }

	/** Number of chunks along each axis. */
	public int[] grid() {
		final int[] g = new int[shape.length];
		for (int d = 0; d < g.length; d++) g[d] = (shape[d] + chunks[d] - 1) / chunks[d];
		return g;
	}

	/** Voxels in one chunk (edge chunks are stored whole, as the specification says). */
	public int chunkVoxels() {
		long n = 1;
		for (final int c : chunks) n *= c;
		if (n > Integer.MAX_VALUE - 8) throw new IllegalArgumentException("Zarr chunks of " + n + " elements are too large to read");
		return (int) n;
	}

	/** The file of chunk {@code index} (grid coordinates, array order). */
	public Path chunkFile(final int[] index) {
		final StringBuilder sb = new StringBuilder();
		for (int d = 0; d < index.length; d++) {
			if (d > 0) sb.append(separator);
			sb.append(index[d]);
		}
		return dir.resolve(sb.toString());
	}

	/** Throws when the metadata changed on disk since the array was opened. */
	public void checkUnchanged() throws IOException {
		final Path meta = dir.resolve(".zarray");
		if (!Files.isRegularFile(meta) || Files.getLastModifiedTime(meta).toMillis() != modified)
			throw new IllegalStateException("Zarr array " + dir + " changed on disk during the run; run again on data that is not being written");
	}

	/**
	 * Chunk {@code index} as floats in C order of the chunk shape (a missing chunk is the fill value).
	 *
	 * @throws IllegalArgumentException for a chunk that does not decompress to the chunk size
	 */
	public float[] readChunk(final int[] index) throws IOException {
		final int n = chunkVoxels(), item = itemSize(dtype, dir.toString());
		final float[] out = new float[n];
		final byte[] raw;
		try {
			raw = Files.readAllBytes(chunkFile(index));
		} catch (final NoSuchFileException e) {
			Arrays.fill(out, (float) fill);
			return out;
		}
		final byte[] bytes = decode(raw, n * item, index);
		final ByteBuffer b = ByteBuffer.wrap(bytes).order(dtype.charAt(0) == '>' ? ByteOrder.BIG_ENDIAN : ByteOrder.LITTLE_ENDIAN);
		final char kind = dtype.charAt(1);
		for (int i = 0; i < n; i++) {
			out[i] = switch (item) {
			case 1 -> kind == 'u' ? b.get(i) & 0xff : b.get(i);
			case 2 -> kind == 'u' ? b.getShort(2 * i) & 0xffff : b.getShort(2 * i);
			case 4 -> kind == 'f' ? b.getFloat(4 * i) : kind == 'u' ? (float) (b.getInt(4 * i) & 0xffffffffL) : b.getInt(4 * i);
			default -> kind == 'f' ? (float) b.getDouble(8 * i) : kind == 'u' ? (float) unsigned(b.getLong(8 * i)) : b.getLong(8 * i);
			};
		}
		return out;
	}

	private static double unsigned(final long v) {
		return v >= 0 ? v : (double) (v >>> 1) * 2 + (v & 1);
	}

	/**
	 * Writes chunk {@code index} ({@link #chunkVoxels()} floats, C order of the chunk shape) as float32: compressed
	 * into a temporary file beside it, then renamed over the chunk's name (a retried task writes the same values,
	 * so replacing its chunk is harmless; a reader never sees half a chunk).
	 */
	public void writeChunk(final int[] index, final float[] values) throws IOException {
		final ByteBuffer b = buffer(FLOAT32, values.length, 4);
		b.asFloatBuffer().put(values);
		write(index, b);
	}

	/** A little-endian buffer for one chunk of {@code count} values of {@code type}. */
	private ByteBuffer buffer(final String type, final int count, final int item) {
		if (!type.equals(dtype)) throw new IllegalStateException("This Zarr array is " + dtype + ", not " + type);
		if (count != chunkVoxels()) throw new IllegalArgumentException("A chunk has " + chunkVoxels() + " values, got " + count);
		return ByteBuffer.allocate(item * count).order(ByteOrder.LITTLE_ENDIAN);
	}

	private void write(final int[] index, final ByteBuffer b) throws IOException {
		final Path file = chunkFile(index);
		Files.createDirectories(file.getParent());
		writeAtomically(file, encode(b.array()));
	}

	/**
	 * Rewrites this array's {@code .zarray} with the data type {@link #UINT16} (fill value 0) and returns the array
	 * as it now is; this object still reads its chunks as the type it was opened with, so a float32 array's chunks
	 * can be read here and rewritten through the returned one ({@link #writeChunk(int[], short[])}).
	 */
	public ZarrArray asUint16() throws IOException {
		final Path meta = dir.resolve(".zarray");
		final JsonObject o = com.google.gson.JsonParser.parseString(Files.readString(meta, StandardCharsets.UTF_8)).getAsJsonObject();
		o.addProperty("dtype", UINT16);
		o.addProperty("fill_value", 0);
		writeAtomically(meta, Json.pretty(o).getBytes(StandardCharsets.UTF_8));
		return open(dir);
	}

	/** Writes chunk {@code index} as uint16 (ImageJ's unsigned values in shorts), as {@link #writeChunk(int[], float[])} does. */
	public void writeChunk(final int[] index, final short[] values) throws IOException {
		final ByteBuffer b = buffer(UINT16, values.length, 2);
		b.asShortBuffer().put(values);
		write(index, b);
	}

	private byte[] encode(final byte[] raw) {
		if (compressor == null) return raw;
		if (!"zlib".equals(compressor)) throw new IllegalStateException("Only zlib-compressed Zarr arrays are written");
		final Deflater d = new Deflater(level);
		try {
			d.setInput(raw);
			d.finish();
			final ByteArrayOutputStream out = new ByteArrayOutputStream(raw.length / 4 + 64);
			final byte[] buf = new byte[1 << 16];
			while (!d.finished()) out.write(buf, 0, d.deflate(buf));
			return out.toByteArray();
		} finally {
			d.end();
		}
	}

	private byte[] decode(final byte[] raw, final int expected, final int[] index) throws IOException {
		final String where = "Zarr chunk " + chunkFile(index);
		byte[] out;
		if (compressor == null) out = raw;
		else if (compressor.equals("gzip")) {
			try (InputStream in = new GZIPInputStream(new java.io.ByteArrayInputStream(raw))) {
				out = in.readNBytes(expected + 1);
			} catch (final IOException e) {
				throw new IllegalArgumentException(where + " is not valid gzip data");
			}
		} else {
			final Inflater inf = new Inflater();
			try {
				inf.setInput(raw);
				out = new byte[expected];
				int n = 0;
				while (n < expected && !inf.finished()) {
					final int r = inf.inflate(out, n, expected - n);
					if (r == 0 && (inf.needsInput() || inf.needsDictionary())) break;
					n += r;
				}
				if (n != expected) out = Arrays.copyOf(out, n);
			} catch (final DataFormatException e) {
				throw new IllegalArgumentException(where + " is not valid zlib data");
			} finally {
				inf.end();
			}
		}
		if (out.length != expected)
			throw new IllegalArgumentException(String.format(Locale.ROOT, "%s holds %d bytes, the chunk shape needs %d (cut short or not this array's)", where,
					out.length, expected));
		return out;
	}

	/** Writes {@code bytes} to a temporary file beside {@code file} and renames it to {@code file}. */
	static void writeAtomically(final Path file, final byte[] bytes) throws IOException {
		final Path tmp = file.resolveSibling("." + file.getFileName() + ".tmp-" + ProcessHandle.current().pid() + "-" + TMP.incrementAndGet());
		try {
			Files.write(tmp, bytes, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE);
			try {
				Files.move(tmp, file, StandardCopyOption.ATOMIC_MOVE, StandardCopyOption.REPLACE_EXISTING);
			} catch (final AtomicMoveNotSupportedException e) {
				Files.move(tmp, file, StandardCopyOption.REPLACE_EXISTING);
			}
		} finally {
			Files.deleteIfExists(tmp);
		}
	}

	static int itemSize(final String dtype, final String name) {
		if (dtype.length() == 3 && "<>|".indexOf(dtype.charAt(0)) >= 0) {
			final char k = dtype.charAt(1), s = dtype.charAt(2);
			if ((k == 'u' || k == 'i') && (s == '1' || s == '2' || s == '4' || s == '8')) return s - '0';
			if (k == 'f' && (s == '4' || s == '8')) return s - '0';
		}
		throw new IllegalArgumentException("Zarr array " + name + " has data type " + dtype + ", which is not read (integers or floats)");
	}

	private static int[] ints(final JsonArray a) {
		final int[] v = new int[a.size()];
		for (int i = 0; i < v.length; i++) {
			final long x = a.get(i).getAsLong();
			if (x > Integer.MAX_VALUE) throw new IllegalArgumentException("Zarr sizes above " + Integer.MAX_VALUE + " are not read");
			v[i] = (int) x;
		}
		return v;
	}

	static JsonArray json(final int[] v) {
		final JsonArray a = new JsonArray();
		for (final int x : v) a.add(x);
		return a;
	}
}
