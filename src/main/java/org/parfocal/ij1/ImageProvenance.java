package org.parfocal.ij1;

import java.nio.ByteBuffer;
import java.nio.ByteOrder;
import java.security.MessageDigest;
import java.security.NoSuchAlgorithmException;
import java.time.OffsetDateTime;
import java.time.format.DateTimeFormatter;
import java.util.HexFormat;
import java.util.Optional;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.Prefs;
import ij.io.FileInfo;

import org.parfocal.provenance.Provenance.Builder;
import org.parfocal.provenance.Provenance.Input;

/**
 * Reads and writes provenance records ({@link org.parfocal.provenance.Provenance}, the record itself) on
 * ImageJ images: describes input images (with a SHA-256 of their pixels and their own record if they have
 * one), fills in versions and timing, appends the record to an output's "Info", which ImageJ's TIFF writer
 * saves and its reader restores, and finds it there again ({@link #of}).
 */
final class ImageProvenance {

	private ImageProvenance() {}

	/** A builder for {@code command} with {@code macroOptions}; call {@link #attach} when the output exists. */
	static Builder start(final String command, final String macroOptions) {
		return org.parfocal.provenance.Provenance.of(command, macroOptions);
	}

	/** Describes an input image in a role ("image", "psf", …). */
	static Input input(final String role, final ImagePlus imp) {
		final FileInfo fi = imp.getOriginalFileInfo();
		String path = null;
		if (fi != null && fi.fileName != null && !fi.fileName.isEmpty() && fi.directory != null && !fi.directory.isEmpty())
			path = fi.getFilePath();
		final String shape = imp.getWidth() + "x" + imp.getHeight() + " c" + imp.getNChannels() + " z" + imp.getNSlices() + " t"
				+ imp.getNFrames() + " " + imp.getBitDepth() + "-bit";
		return new Input(role, imp.getTitle(), path, sha256(imp), shape, of(imp).orElse(null), calibration(imp));
	}

	/** Voxel size as text, "uncalibrated" when the image has no spatial unit. */
	static String calibration(final ImagePlus imp) {
		final ij.measure.Calibration c = imp.getCalibration();
		if (c == null || !c.scaled()) return "uncalibrated";
		return org.parfocal.provenance.MacroOptions.number(c.pixelWidth) + " x " + org.parfocal.provenance.MacroOptions.number(c.pixelHeight) + " x "
				+ org.parfocal.provenance.MacroOptions.number(c.pixelDepth) + " " + c.getUnit();
	}

	/** The record an image carries in its Info, if Parfocal made it. */
	static Optional<org.parfocal.provenance.Provenance> of(final ImagePlus imp) {
		final Object info = imp.getProperty("Info");
		try {
			return org.parfocal.provenance.Provenance.findIn(info instanceof String s ? s : null);
		} catch (final IllegalArgumentException e) {
			return Optional.empty(); // damaged text in someone's Info is not our record
		}
	}

	/**
	 * The record of an image for commands that work on the record itself (export, report): a damaged record is an
	 * error naming the damage, not "no record". @throws IllegalArgumentException one line
	 */
	static Optional<org.parfocal.provenance.Provenance> ofChecked(final ImagePlus imp) {
		final Object info = imp.getProperty("Info");
		try {
			return org.parfocal.provenance.Provenance.findIn(info instanceof String s ? s : null);
		} catch (final IllegalArgumentException e) {
			throw new IllegalArgumentException("The Parfocal record in the Info of '" + imp.getTitle() + "' is damaged: " + e.getMessage());
		}
	}

	/** Completes the record (versions, time since {@code startNanos}, threads, date) and appends it to {@code out}'s Info. */
	static org.parfocal.provenance.Provenance attach(final ImagePlus out, final Builder builder, final long startNanos) {
		final org.parfocal.provenance.Provenance p = builder.versions(version(), IJ.getFullVersion(), System.getProperty("java.version"))
				.timing((System.nanoTime() - startNanos) / 1e9, Math.max(1, Prefs.getThreads()),
						OffsetDateTime.now().format(DateTimeFormatter.ISO_OFFSET_DATE_TIME))
				.build();
		final Object old = out.getProperty("Info");
		out.setProperty("Info", (old instanceof String s && !s.isBlank() ? s + "\n" : "") + p.toInfoText());
		return p;
	}

	/** SHA-256 of the raw pixel values, plane by plane in stack order, little-endian. */
	static String sha256(final ImagePlus imp) {
		final MessageDigest md;
		try {
			md = MessageDigest.getInstance("SHA-256");
		} catch (final NoSuchAlgorithmException e) {
			throw new IllegalStateException("SHA-256 is not available in this Java", e);
		}
		final ImageStack st = imp.getStack();
		for (int i = 1; i <= st.getSize(); i++) {
			final Object px = st.getPixels(i);
			if (px instanceof byte[] b) md.update(b);
			else if (px instanceof short[] s) {
				final ByteBuffer bb = ByteBuffer.allocate(2 * s.length).order(ByteOrder.LITTLE_ENDIAN);
				bb.asShortBuffer().put(s);
				md.update(bb.array());
			} else if (px instanceof float[] f) {
				final ByteBuffer bb = ByteBuffer.allocate(4 * f.length).order(ByteOrder.LITTLE_ENDIAN);
				bb.asFloatBuffer().put(f);
				md.update(bb.array());
			} else if (px instanceof int[] c) {
				final ByteBuffer bb = ByteBuffer.allocate(4 * c.length).order(ByteOrder.LITTLE_ENDIAN);
				bb.asIntBuffer().put(c);
				md.update(bb.array());
			}
		}
		return HexFormat.of().formatHex(md.digest());
	}

	/** Version from the jar manifest, or "development" when run from classes. */
	static String version() {
		final String v = ImageProvenance.class.getPackage().getImplementationVersion();
		return v == null ? "development" : v;
	}
}
