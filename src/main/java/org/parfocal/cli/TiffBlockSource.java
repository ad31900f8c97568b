package org.parfocal.cli;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.nio.file.attribute.FileTime;

import ij.io.FileInfo;
import ij.io.TiffDecoder;

import org.parfocal.blocks.BlockSource;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * A TIFF stack on disk read a box at a time ({@link BlockSource}), so that it never has to fit in memory.
 * ImageJ's {@link TiffDecoder} reads the TIFF structure (planes, pixel type, byte order, calibration from the
 * ImageJ description); the pixels of a box are then read directly from the planes' offsets. Uncompressed
 * 8-bit, 16-bit and 32-bit float single-channel stacks are supported, as ImageJ writes them (one block of
 * contiguous planes, or one strip run per plane).
 * <p>
 * The file is never written. Every read checks that its size and modification time are those seen at opening,
 * so a stack that changes during a run stops it with one line instead of mixing two versions.
 */
public final class TiffBlockSource implements BlockSource {

	private final Path path;
	private final int nx, ny, nz, bytesPerPixel, type;
	private final boolean intel;
	private final long[] planeOffsets;
	private final VoxelSize voxelSize;
	private final long size;
	private final FileTime modified;
	private final FileChannel channel;

	private TiffBlockSource(final Path path, final FileInfo[] info) throws IOException {
		this.path = path;
		final FileInfo f = info[0];
		if (f.compression > FileInfo.COMPRESSION_NONE)
			throw new IllegalArgumentException(path.getFileName() + " is a compressed TIFF: block-wise runs read uncompressed TIFF (save it again from ImageJ)");
		if (f.samplesPerPixel > 1 || f.fileType == FileInfo.RGB || f.fileType == FileInfo.RGB48)
			throw new IllegalArgumentException(path.getFileName() + " is a colour (RGB) image: give one channel as a grey-level stack");
		type = f.fileType;
		if (type != FileInfo.GRAY8 && type != FileInfo.GRAY16_UNSIGNED && type != FileInfo.GRAY32_FLOAT)
			throw new IllegalArgumentException(path.getFileName() + " has a pixel type block-wise runs do not read (8-bit, 16-bit unsigned or 32-bit float)");
		final String desc = f.description == null ? "" : f.description;
		if (value(desc, "channels") > 1 || value(desc, "frames") > 1)
			throw new IllegalArgumentException(path.getFileName() + " has several channels or frames: block-wise runs take one channel and one time point");
		nx = f.width;
		ny = f.height;
		bytesPerPixel = f.getBytesPerPixel();
		intel = f.intelByteOrder;
		final long planeBytes = (long) nx * ny * bytesPerPixel;
		if (info.length == 1) {
			nz = Math.max(1, f.nImages);
			planeOffsets = new long[nz];
			for (int z = 0; z < nz; z++) planeOffsets[z] = f.getOffset() + z * (planeBytes + f.gapBetweenImages);
		} else {
			nz = info.length;
			planeOffsets = new long[nz];
			for (int z = 0; z < nz; z++) {
				final FileInfo g = info[z];
				if (g.width != nx || g.height != ny || g.fileType != type || g.compression > FileInfo.COMPRESSION_NONE)
					throw new IllegalArgumentException(path.getFileName() + ": plane " + (z + 1) + " differs in size or type from the first");
				if (g.stripOffsets != null && g.stripOffsets.length > 1)
					for (int s = 1; s < g.stripOffsets.length; s++)
						if ((g.stripOffsets[s] & 0xffffffffL) != (g.stripOffsets[s - 1] & 0xffffffffL) + (g.stripLengths[s - 1] & 0xffffffffL))
							throw new IllegalArgumentException(path.getFileName() + ": plane " + (z + 1) + " is not stored in one piece (save it again from ImageJ)");
				planeOffsets[z] = g.getOffset();
			}
		}
		size = Files.size(path);
		modified = Files.getLastModifiedTime(path);
		for (int z = 0; z < nz; z++)
			if (planeOffsets[z] + planeBytes > size)
				throw new IllegalArgumentException(path.getFileName() + " is truncated: plane " + (z + 1) + " of " + nz + " ends past the end of the file");
		Volume.checkedSize(nx, ny, 1);
		// the z spacing and unit are in ImageJ's description (ImageJ's FileOpener reads them from there too)
		// ImageJ writes non-ASCII characters of the unit escaped, e.g. "unit=\\u00B5m" for µm
		final String rawUnit = text(desc, "unit");
		final String descUnit = rawUnit == null ? null : rawUnit.replace("\\u00B5", "µ").replace("\\u00b5", "µ");
		final String unit = descUnit != null ? descUnit : f.unit == null || f.unit.isBlank() ? VoxelSize.PIXEL : f.unit;
		final String spacing = text(desc, "spacing");
		double dz = f.pixelDepth;
		if (spacing != null) try {
			dz = Math.abs(Double.parseDouble(spacing));
		} catch (final NumberFormatException e) {
			dz = f.pixelDepth;
		}
		VoxelSize v;
		try {
			v = new VoxelSize(f.pixelWidth, f.pixelHeight, dz, "micron".equals(unit) ? "µm" : unit);
		} catch (final IllegalArgumentException e) {
			v = VoxelSize.UNCALIBRATED;
		}
		voxelSize = v;
		channel = FileChannel.open(path, StandardOpenOption.READ);
	}

	/**
	 * Opens a TIFF stack (reads its structure only).
	 *
	 * @throws IllegalArgumentException with one line when the file is missing, not a TIFF, or of a kind this
	 *         reader does not handle
	 */
	public static TiffBlockSource open(final Path path) {
		if (!Files.isRegularFile(path)) throw new IllegalArgumentException("Input " + path + " does not exist or is not a file");
		TiffCheck.requireComplete(path);
		final FileInfo[] info;
		try {
			final Path abs = path.toAbsolutePath();
			info = new TiffDecoder(abs.getParent().toString() + java.io.File.separator, abs.getFileName().toString()).getTiffInfo();
		} catch (final IOException | RuntimeException e) {
			throw new IllegalArgumentException(path.getFileName() + " cannot be read as a TIFF stack: " + oneLine(e));
		}
		if (info == null || info.length == 0) throw new IllegalArgumentException(path.getFileName() + " cannot be read as a TIFF stack: no image found");
		try {
			return new TiffBlockSource(path, info);
		} catch (final IOException e) {
			throw new IllegalArgumentException(path.getFileName() + " cannot be read: " + oneLine(e));
		}
	}

	@Override
	public int[] shape() {
		return new int[] { nx, ny, nz };
	}

	@Override
	public VoxelSize voxelSize() {
		return voxelSize;
	}

	@Override
	public String name() {
		return path.getFileName().toString();
	}

	@Override
	public Volume read(final int[] o, final int[] s) throws IOException {
		checkUnchanged();
		for (int d = 0; d < 3; d++)
			if (o[d] < 0 || s[d] < 1 || o[d] + s[d] > shape()[d]) throw new IllegalArgumentException("Box outside the " + nx + " x " + ny + " x " + nz + " stack");
		final Volume out = Volume.zeros(s[0], s[1], s[2], voxelSize);
		final float[] dst = out.data();
		final int rowBytes = nx * bytesPerPixel;
		final ByteBuffer buf = ByteBuffer.allocate(s[1] * rowBytes).order(intel ? ByteOrder.LITTLE_ENDIAN : ByteOrder.BIG_ENDIAN);
		for (int z = 0; z < s[2]; z++) {
			buf.clear();
			long pos = planeOffsets[o[2] + z] + (long) o[1] * rowBytes;
			while (buf.hasRemaining()) {
				final int r = channel.read(buf, pos);
				if (r < 0) throw new IOException(name() + " ended early: it changed on disk during the run");
				pos += r;
			}
			for (int y = 0; y < s[1]; y++) {
				final int base = y * rowBytes + o[0] * bytesPerPixel, d = s[0] * (y + s[1] * z);
				for (int x = 0; x < s[0]; x++) {
					final int p = base + x * bytesPerPixel;
					dst[d + x] = switch (type) {
					case FileInfo.GRAY8 -> buf.get(p) & 0xff;
					case FileInfo.GRAY16_UNSIGNED -> buf.getShort(p) & 0xffff;
					default -> buf.getFloat(p);
					};
				}
			}
		}
		return out;
	}

	/** @throws IllegalStateException when the file's size or modification time changed since it was opened */
	public void checkUnchanged() throws IOException {
		final long now;
		final FileTime t;
		try {
			now = Files.size(path);
			t = Files.getLastModifiedTime(path);
		} catch (final NoSuchFileException e) {
			throw new IllegalStateException(name() + " disappeared during the run: nothing was written");
		}
		if (now != size || !t.equals(modified))
			throw new IllegalStateException(name() + " changed on disk during the run (" + size + " bytes when opened, now " + now
					+ "): nothing was written; run again on a stack that is not being written");
	}

	@Override
	public void close() throws IOException {
		channel.close();
	}

	private static String text(final String desc, final String key) {
		for (final String line : desc.split("\n"))
			if (line.startsWith(key + "=")) return line.substring(key.length() + 1).trim();
		return null;
	}

	private static int value(final String desc, final String key) {
		for (final String line : desc.split("\n"))
			if (line.startsWith(key + "=")) try {
				return Integer.parseInt(line.substring(key.length() + 1).trim());
			} catch (final NumberFormatException e) {
				return 1;
			}
		return 1;
	}

	static String oneLine(final Throwable e) {
		final String m = e.getMessage();
		return (m == null || m.isBlank() ? e.getClass().getSimpleName() : m).replace('\n', ' ');
	}
}
