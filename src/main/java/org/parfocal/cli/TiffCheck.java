package org.parfocal.cli;

import java.io.File;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;

import ij.io.FileInfo;
import ij.io.TiffDecoder;

/**
 * Checks, before a TIFF is opened from a path, that the file holds every plane its header declares. ImageJ's
 * opener reads a truncated stack as a shorter one without a word, so a half-copied file would be processed
 * as if complete. Every path Parfocal reads a TIFF from goes through {@link #requireComplete} (batch inputs and
 * PSFs, reference folders, the blocks runner's input and PSF, the Spark runner through them).
 * <p>
 * The header is read by ImageJ's own {@link TiffDecoder}; no TIFF parsing here. Checked: the file exists and is
 * not empty, it is a TIFF, the planes of ImageJ's description ({@code images=}) are all there, and every plane's
 * pixels (ImageJ's contiguous planes from the first offset, or each image's strip offsets plus byte counts) end
 * inside the file.
 */
public final class TiffCheck {

	private TiffCheck() {}

	/**
	 * @throws IllegalArgumentException one line naming the file and what is missing, when the file is not a
	 *         complete TIFF
	 */
	public static void requireComplete(final Path file) {
		final String p = problem(file);
		if (p != null) throw new IllegalArgumentException(p);
	}

	/** True for {@code .tif}/{@code .tiff} names (any case): files the other formats' openers never get. */
	public static boolean hasTiffName(final Path file) {
		return file.getFileName() != null && file.getFileName().toString().toLowerCase(java.util.Locale.ROOT).matches(".*\\.tiff?");
	}

	/** Why {@code file} is not a complete TIFF (one line naming it), or null when it is. */
	public static String problem(final Path file) {
		final String name = file.toString();
		if (!Files.isRegularFile(file)) return name + " does not exist or is not a file";
		final long size;
		try {
			size = Files.size(file);
		} catch (final IOException e) {
			return name + " cannot be read: " + TiffBlockSource.oneLine(e);
		}
		if (size == 0) return name + " is empty (0 bytes)";
		if (!tiffSignature(file)) return name + " is not a TIFF file (it does not start with a TIFF header)";
		final FileInfo[] info;
		try {
			final Path abs = file.toAbsolutePath();
			info = new TiffDecoder(abs.getParent().toString() + File.separator, abs.getFileName().toString()).getTiffInfo();
		} catch (final IOException | RuntimeException e) {
			return name + " is not a readable TIFF: " + TiffBlockSource.oneLine(e);
		}
		if (info == null || info.length == 0 || info[0].width <= 0 || info[0].height <= 0) return name + " is not a readable TIFF: no image in it";
		final FileInfo f = info[0];
		final int declared = Math.max(descriptionValue(f.description, "images"), 1);
		if (info.length == 1 && f.compression <= FileInfo.COMPRESSION_NONE && f.fileType != FileInfo.BITMAP) {
			// ImageJ's stack layout: nImages planes, one after the other, from the first plane's offset
			final int n = Math.max(1, f.nImages);
			final long plane = (long) f.width * f.height * f.getBytesPerPixel(), step = plane + Math.max(0, f.gapBetweenImages);
			final long need = f.getOffset() + (n - 1) * step + plane;
			if (need > size) {
				final long whole = size < f.getOffset() + plane ? 0 : (size - f.getOffset() - plane) / step + 1;
				return truncated(name, Math.max(n, declared), whole, size, need);
			}
			if (declared > n) return truncated(name, declared, n, size, -1);
			if (stripsEnd(f) > size) return truncated(name, n, 0, size, stripsEnd(f));
			return n > 1 ? null : chainProblem(file, name, size); // ImageJ's own stacks keep planes 2.. in the description
		}
		// one IFD per plane (or a compressed image): every strip must end inside the file
		for (int i = 0; i < info.length; i++) {
			final long end = stripsEnd(info[i]);
			if (end > size) return truncated(name, Math.max(info.length, declared), i, size, end);
		}
		if (declared > info.length) return truncated(name, declared, info.length, size, -1);
		return chainProblem(file, name, size);
	}

	/**
	 * ImageJ's decoder ends the chain of image headers (IFDs) silently where the next one lies past the end of
	 * the file, so a plain multi-page TIFF cut after its first page reads as one page. This walks the chain
	 * (TIFF 6.0: 8-byte header with the first IFD's offset; each IFD a 2-byte entry count, 12-byte entries, the
	 * next IFD's 4-byte offset) only to see that each header is inside the file; ImageJ reads everything else.
	 */
	private static String chainProblem(final Path file, final String name, final long size) {
		try (FileChannel ch = FileChannel.open(file, StandardOpenOption.READ)) {
			final ByteBuffer head = read(ch, 0, 8, null);
			if (head.get(2) == '+' || head.get(3) == '+') return null; // BigTIFF: ImageJ does not read it anyway
			final ByteOrder order = head.get(0) == 'I' ? ByteOrder.LITTLE_ENDIAN : ByteOrder.BIG_ENDIAN;
			long ifd = head.order(order).getInt(4) & 0xffffffffL;
			for (int images = 0; ifd != 0 && images < 1_000_000; images++) {
				if (ifd + 2 > size) return name + " is truncated: the header of image " + (images + 1) + " lies past the end of the file (" + size + " bytes)";
				final int entries = read(ch, ifd, 2, order).getShort(0) & 0xffff;
				final long next = ifd + 2 + 12L * entries;
				if (next + 4 > size) return name + " is truncated: the header of image " + (images + 1) + " ends past the end of the file (" + size + " bytes)";
				ifd = read(ch, next, 4, order).getInt(0) & 0xffffffffL;
			}
			return null;
		} catch (final IOException e) {
			return name + " cannot be read: " + TiffBlockSource.oneLine(e);
		}
	}

	private static ByteBuffer read(final FileChannel ch, final long pos, final int n, final ByteOrder order) throws IOException {
		final ByteBuffer b = ByteBuffer.allocate(n);
		while (b.hasRemaining())
			if (ch.read(b, pos + b.position()) < 0) throw new IOException("ended early");
		return order == null ? b : b.order(order);
	}

	private static String truncated(final String name, final long declared, final long whole, final long size, final long need) {
		return name + " is truncated: its header declares " + declared + (declared == 1 ? " plane" : " planes") + ", the file holds "
				+ (whole == declared ? "them only in part" : whole + " complete") + " (" + size + " bytes"
				+ (need > 0 ? " of the " + need + " needed" : "") + ")";
	}

	/** End of the last strip of one image (offsets and byte counts are unsigned 32-bit), or 0 without strips. */
	private static long stripsEnd(final FileInfo f) {
		if (f.stripOffsets == null || f.stripLengths == null) return 0;
		long end = 0;
		for (int s = 0; s < Math.min(f.stripOffsets.length, f.stripLengths.length); s++)
			end = Math.max(end, (f.stripOffsets[s] & 0xffffffffL) + (f.stripLengths[s] & 0xffffffffL));
		return end;
	}

	/** "II*\0" or "MM\0*" (classic TIFF), or "II+\0"/"MM\0+" (BigTIFF): TIFF 6.0 and BigTIFF headers. */
	private static boolean tiffSignature(final Path file) {
		final byte[] b = new byte[4];
		try (var in = Files.newInputStream(file)) {
			if (in.readNBytes(b, 0, 4) < 4) return false;
		} catch (final IOException e) {
			return false;
		}
		final String s = new String(b, StandardCharsets.ISO_8859_1);
		return s.equals("II*\0") || s.equals("MM\0*") || s.equals("II+\0") || s.equals("MM\0+");
	}

	private static int descriptionValue(final String desc, final String key) {
		if (desc == null || !desc.startsWith("ImageJ")) return 0;
		for (final String line : desc.split("\n"))
			if (line.startsWith(key + "=")) try {
				return Integer.parseInt(line.substring(key.length() + 1).trim());
			} catch (final NumberFormatException e) {
				return 0;
			}
		return 0;
	}
}
