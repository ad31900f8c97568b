package org.parfocal.ij1;

import java.io.File;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.regex.Pattern;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.YesNoCancelDialog;
import ij.plugin.frame.Recorder;

import org.parfocal.core.VoxelSize;
import org.parfocal.command.CompareRequest;
import org.parfocal.ij1.CompareWithReferences.Reference;

/**
 * The reference images of {@link CompareWithReferences} and of the watch modes: loading (a folder's TIFFs, open
 * images by title pattern), missing calibration, and reference titles in core messages. The commands call these
 * through {@link CompareWithReferences}' static methods.
 */
final class ReferenceImages {

	private ReferenceImages() {}

	static final String NONE = CompareWithReferences.NONE;

	/**
	 * The references: the folder's TIFFs (sorted by name), then the open images matching the pattern (in
	 * window order), never the images in {@code exclude}.
	 */
	static List<Reference> references(final String folder, final String pattern, final List<String> exclude) {
		final List<Reference> out = new ArrayList<>();
		if (!folder.isBlank()) {
			final File dir = new File(folder);
			if (!dir.isDirectory()) throw new IllegalArgumentException("The reference folder '" + folder + "' does not exist");
			final File[] files = dir.listFiles((d, name) -> name.toLowerCase(Locale.ROOT).matches(".*\\.tiff?"));
			if (files == null || files.length == 0) throw new IllegalArgumentException("No TIFF files (.tif, .tiff) in the reference folder '" + folder + "'");
			Arrays.sort(files);
			for (final File f : files) {
				org.parfocal.cli.TiffCheck.requireComplete(f.toPath()); // empty, truncated or not a TIFF: one line
				final ImagePlus imp = IJ.openImage(f.getPath());
				if (imp == null) throw new IllegalArgumentException("Could not read the reference '" + f.getName() + "' in '" + folder + "'");
				out.add(new Reference(imp, ImageBridge.toVolume(imp, "The reference")));
			}
		}
		if (!pattern.isBlank()) {
			final Pattern p = glob(pattern);
			int found = 0;
			for (final String t : Commands.imageTitles())
				if (p.matcher(t).matches() && !exclude.contains(t)) {
					final ImagePlus imp = Commands.image(t, "reference");
					out.add(new Reference(imp, ImageBridge.toVolume(imp, "The reference")));
					found++;
				}
			if (found == 0) throw new IllegalArgumentException("No open image matches the reference pattern '" + pattern + "' (besides the result, input and PSF)");
		}
		return out;
	}

	/** A wildcard pattern ({@code *} any text, {@code ?} one character) as a regular expression. */
	static Pattern glob(final String pattern) {
		final StringBuilder sb = new StringBuilder();
		for (final char c : pattern.toCharArray()) {
			if (c == '*') sb.append(".*");
			else if (c == '?') sb.append('.');
			else sb.append(Pattern.quote(String.valueOf(c)));
		}
		return Pattern.compile(sb.toString());
	}

	/** A line naming the first image whose calibration is missing while the others have one, or null. */
	static String calibrationProblem(final CompareRequest o) {
		final ImagePlus in = NONE.equals(o.input()) ? null : Commands.image(o.input(), "input");
		return calibrationProblem(Commands.image(o.result(), "result"), references(o.referenceFolder(), o.openReferences(), List.of(o.result(), o.input(), o.psf())), in);
	}

	/** The same for a result, its references and (may be null) its input. */
	static String calibrationProblem(final ImagePlus result, final List<Reference> refs, final ImagePlus input) {
		final VoxelSize rv = ImageBridge.voxelSize(result.getCalibration());
		for (final Reference r : refs) {
			final boolean cal = r.volume().voxelSize().isCalibrated();
			if (cal != rv.isCalibrated())
				return rv.isCalibrated() ? "The reference '" + r.image().getTitle() + "' has no calibration but '" + result.getTitle() + "' has (" + rv + ")"
						: "'" + result.getTitle() + "' has no calibration but the reference '" + r.image().getTitle() + "' has (" + r.volume().voxelSize() + ")";
		}
		if (input != null && rv.isCalibrated() && !ImageBridge.voxelSize(input.getCalibration()).isCalibrated())
			return "The input '" + input.getTitle() + "' has no calibration but '" + result.getTitle() + "' has (" + rv + ")";
		return null;
	}

	/**
	 * Interactively asks whether to ignore a calibration problem (and records {@code ignore_calibration} if so);
	 * in a macro throws the one-line error. Returns false when the user cancels.
	 */
	static boolean askIgnoreCalibration(final String command, final String problem) {
		if (Commands.isMacro()) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		final YesNoCancelDialog ask = new YesNoCancelDialog(IJ.getInstance(), command, problem + ".\nCompare voxel for voxel, ignoring all calibrations?",
				"Ignore calibrations", "Cancel");
		if (!ask.yesPressed()) return false;
		Recorder.recordOption("ignore_calibration");
		return true;
	}

	/** Runs {@code work}; a core message about "Reference N" gets that reference's title added. */
	static <T> T named(final List<Reference> refs, final java.util.function.Supplier<T> work) {
		try {
			return work.get();
		} catch (final IllegalArgumentException e) {
			final java.util.regex.Matcher m = Pattern.compile("Reference (\\d+)").matcher(String.valueOf(e.getMessage()));
			if (!m.find()) throw e;
			final int i = Integer.parseInt(m.group(1)) - 1;
			if (i < 0 || i >= refs.size()) throw e;
			final String msg = e.getMessage();
			throw new IllegalArgumentException(msg.substring(0, m.end()) + " ('" + refs.get(i).image().getTitle() + "')" + msg.substring(m.end()), e);
		}
	}

}
