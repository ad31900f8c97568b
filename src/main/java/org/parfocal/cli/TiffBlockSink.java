package org.parfocal.cli;

import java.io.BufferedOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;

import ij.VirtualStack;
import ij.io.FileInfo;
import ij.io.TiffEncoder;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;
import ij.process.ShortProcessor;

import org.parfocal.blocks.BlockSink;
import org.parfocal.core.OutputFiles;
import org.parfocal.core.SixteenBit;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * A block-wise result written to a 32-bit TIFF stack on disk without holding it in memory (or a 16-bit one with
 * its scale and offset, {@link #sixteenBit}).
 * <p>
 * Blocks are added into a scratch file of raw floats ({@code .NAME.PID-RANDOM.accumulating}, beside the output;
 * PID is this process, so every run has its own). On {@link #commit()} ImageJ's {@link TiffEncoder} writes the
 * TIFF plane by plane from the scratch file into {@code .NAME.PID-RANDOM.partial}, which is then published under
 * the output name with {@link OutputFiles#publish} (atomic, never replacing: if another run took the name
 * meanwhile, {@code NAME-2} …); only a complete TIFF ever carries the name. {@link #abort()} deletes this run's
 * temporary files and no others: hidden files of another run are reported (left over from a stopped run, or
 * in use by a live one), never deleted.
 */
public final class TiffBlockSink implements BlockSink {

	private Path output;
	private final Path scratch, partial;
	private final int nx, ny, nz;
	private final VoxelSize voxelSize;
	private final String info;
	private FileChannel channel;
	private boolean done;
	private java.util.function.Function<SixteenBit.Scaling, String> sixteenBitInfo;
	private SixteenBit.Scaling scaling;

	/**
	 * @param info text for the image's Info (ImageJ shows it with Image &gt; Show Info; provenance goes here)
	 * @throws IllegalArgumentException when the output exists or its folder is missing or not writable
	 */
	public TiffBlockSink(final Path output, final int[] shape, final VoxelSize voxelSize, final String info) {
		this.output = output.toAbsolutePath();
		final Path dir = this.output.getParent();
		if (Files.exists(this.output)) throw new IllegalArgumentException("Output " + output + " exists: choose a new name (outputs are never replaced)");
		if (dir == null || !Files.isDirectory(dir)) throw new IllegalArgumentException("Cannot write " + output + ": the folder " + dir + " does not exist");
		if (!Files.isWritable(dir)) throw new IllegalArgumentException("Cannot write " + output + ": the folder " + dir + " is not writable");
		final String name = this.output.getFileName().toString();
		for (final String note : leftovers(dir, name)) System.err.println(note);
		final String run = ProcessHandle.current().pid() + "-" + java.util.UUID.randomUUID().toString().substring(0, 8);
		scratch = dir.resolve("." + name + "." + run + ".accumulating");
		partial = dir.resolve("." + name + "." + run + ".partial");
		nx = shape[0];
		ny = shape[1];
		nz = shape[2];
		this.voxelSize = voxelSize == null ? VoxelSize.UNCALIBRATED : voxelSize;
		this.info = info;
		try {
			channel = FileChannel.open(scratch, StandardOpenOption.CREATE_NEW, StandardOpenOption.READ, StandardOpenOption.WRITE);
			channel.truncate(0);
			// zeros: a sparse file of the output's size
			channel.write(ByteBuffer.allocate(1), 4L * nx * ny * nz - 1);
		} catch (final IOException e) {
			abort();
			throw new IllegalArgumentException("Cannot write beside " + output + ": " + TiffBlockSource.oneLine(e));
		}
	}

	/**
	 * One line per hidden temporary file of another run beside {@code dir/name}: whether its process still runs
	 * (then it may be writing) or is gone (a left-over of a stopped run, safe to delete). Nothing is deleted.
	 */
	static java.util.List<String> leftovers(final Path dir, final String name) {
		final java.util.List<String> notes = new java.util.ArrayList<>();
		final String prefix = "." + name + ".";
		try (java.util.stream.Stream<Path> files = Files.list(dir)) {
			for (final Path f : files.sorted().toList()) {
				final String n = f.getFileName().toString();
				if (!n.startsWith(prefix) || !(n.endsWith(".accumulating") || n.endsWith(".partial"))) continue;
				final int end = n.lastIndexOf('.');
				final String middle = end > prefix.length() ? n.substring(prefix.length(), end) : "";
				long pid = -1;
				if (middle.indexOf('-') > 0) try {
					pid = Long.parseLong(middle.substring(0, middle.indexOf('-')));
				} catch (final NumberFormatException e) {
					pid = -1;
				}
				final boolean live = pid > 0 && ProcessHandle.of(pid).map(ProcessHandle::isAlive).orElse(false);
				notes.add(live ? "Note: " + f + " belongs to a run that is still going (process " + pid + "); it is left alone"
						: "Note: " + f + " is left over from a run that was stopped" + (pid > 0 ? " (process " + pid + " is gone)" : "")
								+ "; it is not used and safe to delete");
			}
		} catch (final IOException e) {
			// the folder was checked just before; an unlistable folder fails when the scratch file is made
		}
		return notes;
	}

	/**
	 * Stores the output as 16-bit values ({@code output=16-bit}). The scaling is decided once for the whole
	 * volume, at {@link #commit()}, from the smallest and largest value of the assembled result (so the rule of the
	 * menu command's 16-bit output, {@link SixteenBit}, not a guess from the input or one block); blocks are
	 * accumulated as 32-bit floats until then. The TIFF carries it as ImageJ's calibration function (a straight
	 * line: ImageJ shows and measures the real values), and the Info is {@code info(scaling)}: the provenance
	 * record with the scale and offset in it.
	 */
	public TiffBlockSink sixteenBit(final java.util.function.Function<SixteenBit.Scaling, String> info) {
		sixteenBitInfo = info;
		return this;
	}

	/** The 16-bit scaling used (after {@link #commit()} of a {@link #sixteenBit} output), else null. */
	public SixteenBit.Scaling scaling() {
		return scaling;
	}

	/** The output path (exists only after {@link #commit()}; after it, the name actually taken). */
	public Path output() {
		return output;
	}

	@Override
	public synchronized void add(final Volume part, final int[] o) throws IOException {
		if (done) throw new IllegalStateException("The output is already closed");
		final int sx = part.nx(), sy = part.ny(), sz = part.nz();
		if (o[0] < 0 || o[1] < 0 || o[2] < 0 || o[0] + sx > nx || o[1] + sy > ny || o[2] + sz > nz)
			throw new IllegalArgumentException("Block outside the " + nx + " x " + ny + " x " + nz + " output");
		final ByteBuffer buf = ByteBuffer.allocate(4 * sy * nx).order(ByteOrder.BIG_ENDIAN);
		final float[] src = part.data();
		for (int z = 0; z < sz; z++) {
			final long pos = 4L * (nx * (long) ny * (o[2] + z) + (long) nx * o[1]);
			buf.clear();
			readFully(buf, pos);
			for (int y = 0; y < sy; y++) {
				final int b = 4 * (y * nx + o[0]), a = sx * (y + sy * z);
				for (int x = 0; x < sx; x++) buf.putFloat(b + 4 * x, buf.getFloat(b + 4 * x) + src[a + x]);
			}
			buf.rewind();
			while (buf.hasRemaining()) channel.write(buf, pos + buf.position());
		}
	}

	private void readFully(final ByteBuffer buf, final long pos) throws IOException {
		while (buf.hasRemaining()) {
			final int r = channel.read(buf, pos + buf.position());
			if (r < 0) throw new IOException("scratch file ended early");
		}
	}

	/** Plane {@code z} of the accumulated result. */
	float[] plane(final int z) throws IOException {
		final ByteBuffer buf = ByteBuffer.allocate(4 * nx * ny).order(ByteOrder.BIG_ENDIAN);
		readFully(buf, 4L * nx * ny * z);
		buf.rewind();
		final float[] p = new float[nx * ny];
		buf.asFloatBuffer().get(p);
		return p;
	}

	@Override
	public synchronized void commit() throws IOException {
		if (done) throw new IllegalStateException("The output is already closed");
		try {
			final FileInfo fi = new FileInfo();
			fi.fileFormat = FileInfo.TIFF;
			fi.width = nx;
			fi.height = ny;
			fi.nImages = nz;
			String calibration = "";
			if (sixteenBitInfo != null) {
				final SixteenBit.Range range = new SixteenBit.Range();
				for (int z = 0; z < nz; z++) range.add(plane(z));
				scaling = range.scaling();
				fi.fileType = FileInfo.GRAY16_UNSIGNED;
				fi.info = sixteenBitInfo.apply(scaling);
				// what ImageJ's FileSaver writes for a straight-line calibration, and its FileOpener reads back
				calibration = "cf=" + ij.measure.Calibration.STRAIGHT_LINE + "\nc0=" + scaling.offset() + "\nc1=" + scaling.scale() + "\nvunit=intensity\n";
			} else {
				fi.fileType = FileInfo.GRAY32_FLOAT;
				fi.info = info;
			}
			// ImageJ's own spelling of µm, which survives the TIFF's ASCII description
			final String unit = voxelSize.unit().equals("µm") || voxelSize.unit().equals("um") ? "micron" : voxelSize.unit();
			if (voxelSize.isCalibrated()) {
				fi.pixelWidth = voxelSize.dx();
				fi.pixelHeight = voxelSize.dy();
				fi.pixelDepth = voxelSize.dz();
				fi.unit = unit;
			}
			fi.description = "ImageJ=" + ij.IJ.getVersion() + "\n" + (nz > 1 ? "images=" + nz + "\nslices=" + nz + "\n" : "")
					+ (voxelSize.isCalibrated() ? "unit=" + unit + "\nspacing=" + voxelSize.dz() + "\n" : "") + calibration + "loop=false\n";
			if (nz == 1) fi.pixels = scaling != null ? scaling.stored(plane(0)) : plane(0);
			else fi.virtualStack = new ScratchStack();
			try (OutputStream out = new BufferedOutputStream(Files.newOutputStream(partial, StandardOpenOption.CREATE_NEW), 1 << 20)) {
				new TiffEncoder(fi).write(out);
			}
			final Path published = OutputFiles.publish(partial, output.getParent(), output.getFileName().toString());
			if (!published.equals(output)) System.err.println("Note: " + output.getFileName() + " was taken meanwhile; the result is " + published);
			output = published;
			done = true;
		} finally {
			cleanUp();
		}
	}

	@Override
	public synchronized void abort() {
		done = true;
		cleanUp();
	}

	private void cleanUp() {
		try {
			if (channel != null) channel.close();
		} catch (final IOException e) {
			// closing a scratch file that is deleted next: nothing to keep
		}
		try {
			Files.deleteIfExists(scratch);
			Files.deleteIfExists(partial);
		} catch (final IOException e) {
			System.err.println("Could not delete the temporary file beside " + output + ": " + TiffBlockSource.oneLine(e));
		}
	}

	/** The planes of the scratch file, for {@link TiffEncoder} (ImageJ's writer streams virtual stacks plane by plane). */
	private final class ScratchStack extends VirtualStack {
		ScratchStack() {
			super(nx, ny, null, null);
		}

		@Override
		public int getSize() {
			return nz;
		}

		@Override
		public int getBitDepth() {
			return scaling != null ? 16 : 32;
		}

		@Override
		public ImageProcessor getProcessor(final int n) {
			try {
				if (scaling != null) return new ShortProcessor(nx, ny, scaling.stored(plane(n - 1)), null);
				return new FloatProcessor(nx, ny, plane(n - 1));
			} catch (final IOException e) {
				throw new java.io.UncheckedIOException(e);
			}
		}

		@Override
		public String getSliceLabel(final int n) {
			return null;
		}
	}

}
