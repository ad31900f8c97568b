package org.parfocal.deconv;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import org.parfocal.conv.ConvolutionOperator;
import org.parfocal.conv.Psfs;
import org.parfocal.core.RobustStats;
import org.parfocal.core.Volume;

/**
 * Preparation of the recorded data and of the PSF before deconvolution. Inputs are never modified.
 * <p>
 * <b>Data</b>, in this order:
 * <ol>
 * <li>non-finite values are rejected;</li>
 * <li>the camera offset o (a constant the camera adds without noise) is subtracted: given, or estimated by
 * {@link #estimateOffset} as the 0.1 % quantile of the recorded values, which assumes the darkest voxels
 * received almost no light (give the value from a dark frame when the whole field has background);</li>
 * <li>values that fall below zero (read noise around the offset) are set to zero: the Poisson model needs
 * y ≥ 0; how many is reported;</li>
 * <li>the background b (light that is not from the in-focus object, with shot noise) is kept in the model
 * Hx + b rather than subtracted, which would bias dim regions after clipping: given, or estimated by
 * {@link #estimateBackground} as a sigma-clipped median, or from the darkest region
 * ({@link #estimateDarkBackground}); for {@link Level.Kind#FIT} this is the start of the fit
 * ({@link BackgroundFit#start}), which the engine then updates.</li>
 * </ol>
 * <b>PSF</b>: negative values are set to zero and the PSF is scaled to unit sum, each with a note, so that RL
 * keeps the flux.
 */
public final class Preprocessing {

	/** At most this many voxels are sorted by the estimators (an evenly strided sample of larger images). */
	static final int SAMPLE = 1 << 21;

	private Preprocessing() {}

	/** Prepared data: y on the image grid (a new array) and the levels used. */
	public record Data(float[] y, double offset, double background, List<String> notes) {}

	/** Prepared PSF (a new volume) and notes. */
	record Psf(Volume psf, List<String> notes) {}

	/** The data prepared as the class comment says (a new array; the image is not modified). */
	public static Data data(final Volume image, final Level offsetLevel, final Level backgroundLevel) {
		final List<String> notes = new ArrayList<>();
		final int bad = image.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException("The image has a non-finite value (" + image.data()[bad] + ") at " + image.position(bad));
		final float[] in = image.data();
		final double offset;
		switch (offsetLevel.kind()) {
		case VALUE:
			offset = offsetLevel.value();
			break;
		case ESTIMATED:
			offset = estimateOffset(image);
			notes.add(String.format(Locale.ROOT, "Camera offset estimated as %.4g (0.1%% quantile of the image)", offset));
			break;
		default:
			offset = 0;
		}
		final float[] y = new float[in.length];
		int clipped = 0;
		double sum = 0;
		for (int i = 0; i < in.length; i++) {
			final float v = (float) (in[i] - offset);
			if (v < 0) clipped++;
			y[i] = v > 0 ? v : 0f;
			sum += y[i];
		}
		if (!(sum > 0))
			throw new IllegalArgumentException(offset == 0 ? "The image is all zero (or negative): nothing to deconvolve"
					: String.format(Locale.ROOT, "The image is at or below the camera offset (%.4g) everywhere: nothing to deconvolve", offset));
		if (clipped > 0)
			notes.add(String.format(Locale.ROOT, "%d voxels (%.2g%%) below %s set to zero", clipped, 100.0 * clipped / in.length,
					offset == 0 ? "zero" : "the camera offset"));
		final double background;
		switch (backgroundLevel.kind()) {
		case VALUE:
			background = backgroundLevel.value();
			break;
		case ESTIMATED:
			background = estimateBackground(y);
			notes.add(String.format(Locale.ROOT, "Background estimated as %.4g (sigma-clipped median)", background));
			break;
		case DARK:
			background = estimateDarkBackground(y, image.nx(), image.ny(), image.nz());
			notes.add(String.format(Locale.ROOT, "Background estimated as %.4g (darkest region)", background));
			break;
		case DARK_OR_MEDIAN: {
			final double dark = estimateDarkBackground(y, image.nx(), image.ny(), image.nz()), median = estimateBackground(y);
			background = Math.max(dark, median);
			notes.add(darkOrMedianNote(dark, median));
			break;
		}
		case BY_PSF:
			throw new IllegalArgumentException("background=by-psf needs the PSF: resolve it with Preprocessing.forPsf first");
		case FIT:
		case FIT_SMOOTH:
			background = BackgroundFit.start(y, image.nx(), image.ny(), image.nz());
			break;
		default:
			background = 0;
		}
		float max = 0;
		for (final float v : y) max = Math.max(max, v);
		if (background >= max)
			throw new IllegalArgumentException(String.format(Locale.ROOT,
					"The background (%.4g) is at or above the brightest offset-corrected voxel (%.4g): nothing is left to deconvolve", background, max));
		return new Data(y, offset, background, notes);
	}

	/**
	 * {@code background=by-psf} made concrete for a PSF: {@link Level#DARK_OR_MEDIAN} when the PSF's out-of-focus
	 * light fades ({@link #fadesOutOfFocus}: confocal-like, so no out-of-focus haze can pass for background and the
	 * sigma-clipped median is a fair level, where the darkest region underestimates a sloping or noisy background),
	 * {@link Level#DARK} otherwise (widefield: the median would take the haze for background). Other levels are
	 * returned as they are. Chosen on the independent scenes (README, "The background by the PSF").
	 */
	public static Level forPsf(final Level background, final Volume psf) {
		if (background.kind() != Level.Kind.BY_PSF) return background;
		return fadesOutOfFocus(psf) ? Level.DARK_OR_MEDIAN : Level.DARK;
	}

	/** The Log line of a {@code dark-or-median} level from its two estimates (whole-stack and block-wise runs). */
	public static String darkOrMedianNote(final double dark, final double median) {
		return String.format(Locale.ROOT, "Background estimated as %.4g (the larger of the darkest region, %.4g, and the sigma-clipped median, %.4g)",
				Math.max(dark, median), dark, median);
	}

	/** The note that says which level {@code background=by-psf} took, and why. */
	public static String byPsfReason(final Level resolved) {
		return resolved.kind() == Level.Kind.DARK_OR_MEDIAN
				? "Background by the PSF: its light fades out of focus (confocal-like), so the larger of the darkest region and the sigma-clipped median"
				: "Background by the PSF: it keeps light out of focus (widefield-like, or too few planes to tell), so the darkest region";
	}

	/**
	 * True when the PSF has at least 3 planes, the fainter of its two outer planes carries less than
	 * {@link org.parfocal.psf.PsfExtent#OUTER_PLANE_SHARE} of its brightest plane's light (a widefield PSF keeps every
	 * plane's sum, common practice; a confocal one loses it with defocus) and its light fades inside the lateral
	 * box ({@link org.parfocal.psf.PsfExtent#edgeLevel} at most {@link org.parfocal.psf.PsfExtent#EDGE_LEVEL}: a
	 * widefield PSF cut by too small a box also loses its outer planes' light, but not inside the box). 2D PSFs
	 * and short boxes: false.
	 */
	public static boolean fadesOutOfFocus(final Volume psf) {
		if (psf.nz() < 3 || psf.nx() >= 3 && psf.ny() >= 3 && org.parfocal.psf.PsfExtent.edgeLevel(psf) > org.parfocal.psf.PsfExtent.EDGE_LEVEL) return false;
		final double[] s = org.parfocal.psf.PsfExtent.planeSums(psf);
		double max = 0;
		for (final double v : s) max = Math.max(max, v);
		return max > 0 && Math.min(s[0], s[s.length - 1]) < org.parfocal.psf.PsfExtent.OUTER_PLANE_SHARE * max;
	}

	static Psf psf(final Volume psf, final int[] imageShape) {
		ConvolutionOperator.checkPsfFor(psf, imageShape);
		final List<String> notes = new ArrayList<>();
		final int[] clipped = new int[1];
		Volume p = Psfs.clipNegative(psf, clipped);
		if (clipped[0] > 0) notes.add("The PSF had " + clipped[0] + " negative values; they were set to zero");
		final double s = p.sum();
		if (!(s > 0)) throw new IllegalArgumentException("The PSF has no positive values");
		if (Math.abs(s - 1) > 1e-4) {
			p = Psfs.normalized(p);
			notes.add(String.format(Locale.ROOT, "The PSF was scaled to unit sum (its sum was %.6g)", s));
		}
		return new Psf(p, notes);
	}

	/** Camera offset estimate: the 0.1 % quantile of the image values. */
	public static double estimateOffset(final Volume image) {
		final float[] s = sortedSample(image.data());
		return s[(int) Math.floor(0.001 * (s.length - 1))];
	}

	/**
	 * Background estimate of offset-corrected data: the median, then five times the median of the values below
	 * median + 3σ with σ = 1.4826·MAD (the median absolute deviation scaled to a normal standard deviation).
	 * Bright structures are excluded step by step, so for a sparse specimen the result is the level most
	 * voxels share.
	 */
	public static double estimateBackground(final float[] y) {
		float[] s = sortedSample(y);
		double med = RobustStats.medianOfSorted(s, s.length);
		for (int round = 0; round < 5; round++) {
			final float[] dev = new float[s.length];
			for (int i = 0; i < s.length; i++) dev[i] = (float) Math.abs(s[i] - med);
			Arrays.sort(dev);
			final double sigma = RobustStats.MAD_TO_SIGMA * RobustStats.medianOfSorted(dev, dev.length);
			final double cut = med + 3 * sigma;
			int keep = s.length;
			while (keep > 1 && s[keep - 1] > cut) keep--;
			final double next = RobustStats.medianOfSorted(s, keep);
			s = Arrays.copyOf(s, keep);
			if (next == med) break;
			med = next;
		}
		return med;
	}

	/**
	 * Background estimate from the darkest region of offset-corrected data: the image is cut into blocks of
	 * about 8×8×4 voxels (whole planes of thin stacks) and the 2nd-percentile block mean is returned. The model
	 * Hx + b puts every block mean at b or above, and out-of-focus light raises all blocks, so unlike the
	 * median this does not take the haze for background; it can only overestimate b by the light of the
	 * darkest blocks.
	 */
	public static double estimateDarkBackground(final float[] y, final int nx, final int ny, final int nz) {
		final int bx = Math.min(8, nx), by = Math.min(8, ny), bzs = Math.min(4, nz);
		final int gx = nx / bx, gy = ny / by, gz = nz / bzs;
		final double[] means = new double[gx * gy * gz];
		int k = 0;
		for (int cz = 0; cz < gz; cz++)
			for (int cy = 0; cy < gy; cy++)
				for (int cx = 0; cx < gx; cx++) {
					double s = 0;
					for (int z = cz * bzs; z < (cz + 1) * bzs; z++)
						for (int yy = cy * by; yy < (cy + 1) * by; yy++)
							for (int x = cx * bx, i = (z * ny + yy) * nx + x; x < (cx + 1) * bx; x++, i++) s += y[i];
					means[k++] = s / (bx * by * bzs);
				}
		Arrays.sort(means);
		return means[(int) Math.floor(0.02 * (means.length - 1))];
	}

	private static float[] sortedSample(final float[] a) {
		final int step = Math.max(1, (int) Math.ceil((double) a.length / SAMPLE));
		final float[] s = new float[(a.length + step - 1) / step];
		for (int i = 0, j = 0; i < a.length; i += step) s[j++] = a[i];
		Arrays.sort(s);
		return s;
	}
}
