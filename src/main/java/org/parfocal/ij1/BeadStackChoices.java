package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;

import ij.ImagePlus;
import ij.WindowManager;

/**
 * The image list of PSF from Beads: only images the command can measure (one channel, one frame, not RGB), the
 * recordings before the PSF-like stacks. First the recordings whose title names beads, then the other recordings,
 * then the PSF-like stacks (a PSF Parfocal made, {@link PsfChoices#madeAsPsf}; a 32-bit stack that already sums to 1;
 * or one at most {@value #TINY} pixels wide and high, too small to hold several beads with their boxes); newest
 * first within each group (ImageJ numbers images −1, −2, … in the order they are made). The current image is
 * preselected when it is a recording named for beads, else the top of the list. Macros are not limited to this
 * list: in a macro every open image is listed and the command checks the one given.
 */
final class BeadStackChoices {

	private BeadStackChoices() {}

	/** Widest and highest stack (pixels) that counts as a PSF box rather than a bead recording. */
	static final int TINY = 64;

	/** How an image ranks in the list, best first. */
	enum Rank {
		/** a recording whose title names beads */
		BEADS,
		/** another recording */
		RECORDING,
		/** a PSF or a stack as small as one */
		PSF_LIKE
	}

	/** One listed image. */
	record Candidate(String title, Rank rank, int id) {}

	/** The listed images among {@code open}, in list order; RGB, multi-channel and multi-frame images are left out. */
	static List<Candidate> candidates(final List<ImagePlus> open) {
		final List<Candidate> out = new ArrayList<>();
		for (final ImagePlus p : open) {
			final Rank r = p == null ? null : rank(p);
			if (r != null) out.add(new Candidate(p.getTitle(), r, p.getID()));
		}
		out.sort(Comparator.comparing(Candidate::rank).thenComparingInt(Candidate::id));
		return out;
	}

	/** The rank of {@code p}, or null when the command cannot measure it. */
	static Rank rank(final ImagePlus p) {
		if (p.getType() == ImagePlus.COLOR_RGB || p.getStackSize() == 0 || p.getNChannels() != 1 || p.getNFrames() != 1) return null;
		if (psfLike(p)) return Rank.PSF_LIKE;
		return p.getTitle().toLowerCase(Locale.ROOT).contains("bead") ? Rank.BEADS : Rank.RECORDING;
	}

	/** A PSF Parfocal made, a stack no larger than {@value #TINY} × {@value #TINY} pixels, or a 32-bit stack summing to 1 (±1 %). */
	static boolean psfLike(final ImagePlus p) {
		if (PsfChoices.madeAsPsf(p)) return true;
		if (p.getWidth() <= TINY && p.getHeight() <= TINY) return true;
		if (p.getBitDepth() != 32 || (long) p.getWidth() * p.getHeight() * p.getStackSize() > PsfChoices.MAX_SCANNED) return false;
		double sum = 0;
		for (int i = 1; i <= p.getStackSize(); i++) {
			final float[] px = (float[]) p.getStack().getPixels(i);
			for (final float v : px) sum += v;
		}
		return Math.abs(sum - 1) <= 0.01;
	}

	/** The items of the image choice: the listed titles (every open image in a macro, unfiltered and unscanned). */
	static String[] items() {
		if (Commands.isMacro()) return Commands.imageTitles();
		return candidates(open()).stream().map(Candidate::title).toArray(String[]::new);
	}

	/**
	 * The preselected item: the current image when it is a recording named for beads, else the first item; in a
	 * macro the current image (as before the list was filtered).
	 */
	static String preselected(final String[] items) {
		final ImagePlus cur = WindowManager.getCurrentImage();
		if (Commands.isMacro()) return Commands.currentTitle(items);
		if (cur != null && rank(cur) == Rank.BEADS && List.of(items).contains(cur.getTitle())) return cur.getTitle();
		return items.length > 0 ? items[0] : "";
	}

	private static List<ImagePlus> open() {
		final int[] ids = WindowManager.getIDList();
		final List<ImagePlus> open = new ArrayList<>();
		if (ids != null) for (final int id : ids) open.add(WindowManager.getImage(id));
		return open;
	}
}
