package org.parfocal.ij1;

import java.awt.Choice;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;
import java.util.Set;

import ij.ImagePlus;
import ij.ImageStack;
import ij.WindowManager;

import org.parfocal.command.MacroExport;

/**
 * The PSF list of a deconvolution dialog: only images that can be the PSF of the chosen image. First the PSFs
 * Parfocal made (their record says PSF from Optics, PSF from Beads, a Blind Deconvolve final PSF, or a sample
 * PSF of Make Sample Stacks), newest first; then other small stacks that can be normalised to unit sum (a
 * positive total, no strongly negative values, at most half the image's voxels), newest first. Never an RGB
 * image, never the image itself, never one whose channels or planes cannot match it (one channel or one per
 * image channel; a 2D PSF for a 2D image; one frame). The first entry is the default, so the PSF just
 * computed is preselected. Macros are not limited to this list: in a macro every open image is listed, and the
 * command checks the one given.
 */
final class PsfChoices {

	private PsfChoices() {}

	/** Commands whose output is a PSF. */
	private static final Set<String> PSF_COMMANDS = Set.of(PsfFromOptics.COMMAND, PsfFromBeads.COMMAND);

	/** Largest stack whose values are summed to judge it (voxels); bigger ones are not small. */
	static final long MAX_SCANNED = 16L << 20;

	/** How an image qualifies. */
	enum Kind {
		/** a PSF Parfocal made */
		PARFOCAL,
		/** a small stack with a positive sum */
		STACK
	}

	/** One plausible PSF. */
	/** {@code ownChannels}: one PSF channel per channel of the image (a single-channel PSF of a single-channel image too). */
	record Candidate(String title, Kind kind, int id, boolean ownChannels) {}

	/** The plausible PSFs for {@code image} among the open images, in list order. */
	static List<Candidate> candidates(final ImagePlus image) {
		final int[] ids = WindowManager.getIDList();
		final List<ImagePlus> open = new ArrayList<>();
		if (ids != null) for (final int id : ids) {
			final ImagePlus imp = WindowManager.getImage(id);
			if (imp != null) open.add(imp);
		}
		return candidates(image, open);
	}

	/** The plausible PSFs for {@code image} among {@code open}, in list order (Parfocal PSFs first, newest first). */
	static List<Candidate> candidates(final ImagePlus image, final List<ImagePlus> open) {
		final List<Candidate> out = new ArrayList<>();
		for (final ImagePlus p : open) {
			if (p == null || p == image || (image != null && p.getID() == image.getID())) continue;
			final Kind k = kind(p, image);
			if (k != null) out.add(new Candidate(p.getTitle(), k, p.getID(), image == null || p.getNChannels() == image.getNChannels()));
		}
		// ImageJ numbers images -1, -2, … in the order they are made: the most negative ID is the newest; a PSF with
		// a channel per image channel before one PSF for all channels
		out.sort(Comparator.comparing(Candidate::kind).thenComparing(c -> !c.ownChannels())
				.thenComparing(c -> !c.title().toLowerCase(Locale.ROOT).contains("psf")).thenComparingInt(Candidate::id));
		return out;
	}

	/** Whether {@code p} can be the PSF of {@code image}, and why; null if not. */
	static Kind kind(final ImagePlus p, final ImagePlus image) {
		if (p.getType() == ImagePlus.COLOR_RGB || p.getStackSize() == 0) return null;
		if (p.getNFrames() != 1) return null;
		if (image != null) {
			if (p.getNChannels() != 1 && p.getNChannels() != image.getNChannels()) return null;
			if (image.getNSlices() == 1 && p.getNSlices() > 1) return null; // a 3D PSF for a 2D image
		}
		if (madeAsPsf(p)) return Kind.PARFOCAL;
		final long voxels = (long) p.getWidth() * p.getHeight() * p.getNSlices();
		if (image != null && 2 * voxels > (long) image.getWidth() * image.getHeight() * image.getNSlices()) return null;
		if (voxels * p.getNChannels() > MAX_SCANNED) return null;
		return normalisable(p) ? Kind.STACK : null;
	}

	/** True when the open image of this title was made by Parfocal as a PSF. */
	static boolean madeAsPsf(final String title) {
		final ImagePlus p = WindowManager.getImage(title);
		return p != null && madeAsPsf(p);
	}

	/** True when the image's record says a Parfocal command made it as a PSF. */
	static boolean madeAsPsf(final ImagePlus p) {
		final var rec = ImageProvenance.of(p);
		if (rec.isEmpty()) return false;
		final var r = rec.get();
		if (PSF_COMMANDS.contains(r.command())) return true;
		if (BlindDeconvolve.COMMAND.equals(r.command()) && "final PSF".equals(String.valueOf(r.run().get("output")))) return true;
		return MacroExport.SAMPLE_COMMAND.equals(r.command())
				&& String.valueOf(r.run().get(MacroExport.SAMPLE_TITLE)).toLowerCase(Locale.ROOT).contains("psf");
	}

	/**
	 * A positive total and no value below −1 % of the largest (a little noise below zero is normal for a measured
	 * PSF after background subtraction), so dividing by the sum gives a PSF.
	 */
	static boolean normalisable(final ImagePlus p) {
		final ImageStack st = p.getStack();
		double sum = 0, max = Double.NEGATIVE_INFINITY, min = Double.POSITIVE_INFINITY;
		for (int i = 1; i <= st.getSize(); i++) {
			final var ip = st.getProcessor(i);
			for (int k = 0, n = p.getWidth() * p.getHeight(); k < n; k++) {
				final float v = ip.getf(k);
				if (!Float.isFinite(v)) return false;
				sum += v;
				max = Math.max(max, v);
				min = Math.min(min, v);
			}
		}
		return sum > 0 && max > 0 && min >= -0.01 * max;
	}

	/** The items of the PSF choice for {@code image}: plausible titles, then {@link Deconvolve#FROM_OPTICS}. */
	static String[] items(final ImagePlus image) {
		return items(image, Deconvolve.FROM_OPTICS);
	}

	/** The items of a PSF choice for {@code image}: plausible titles, then {@code after} (choices that are not images). */
	static String[] items(final ImagePlus image, final String... after) {
		final List<String> t = new ArrayList<>();
		if (Commands.isMacro()) {
			// a macro names its PSF; the list is not shown, so it is not filtered (nor are the images scanned)
			for (final String title : Commands.imageTitles()) t.add(title);
		} else for (final Candidate c : candidates(image)) t.add(c.title());
		t.addAll(List.of(after));
		return t.toArray(new String[0]);
	}

	/**
	 * Keeps an on-screen PSF choice in step with the image choice: when another image is chosen, the list is
	 * made again for it (the selection is kept when it is still plausible, else the first entry is taken).
	 */
	static void follow(final ij.gui.GenericDialog gd) {
		follow(gd, Deconvolve.FROM_OPTICS);
	}

	/** As {@link #follow(ij.gui.GenericDialog)}, for a list that ends with {@code after} (see {@link #items(ImagePlus, String...)}). */
	static void follow(final ij.gui.GenericDialog gd, final String... after) {
		if (java.awt.GraphicsEnvironment.isHeadless() || Commands.isMacro() || gd.getChoices() == null || gd.getChoices().size() < 2) return;
		follow((Choice) gd.getChoices().get(0), (Choice) gd.getChoices().get(1), after);
	}

	/** See {@link #follow(ij.gui.GenericDialog)}: the image choice and the PSF choice. */
	static void follow(final Choice imageChoice, final Choice psfChoice) {
		follow(imageChoice, psfChoice, Deconvolve.FROM_OPTICS);
	}

	private static void follow(final Choice imageChoice, final Choice psfChoice, final String... after) {
		imageChoice.addItemListener(e -> {
			final ImagePlus imp = WindowManager.getImage(imageChoice.getSelectedItem());
			final String selected = psfChoice.getSelectedItem();
			final String[] items = items(imp, after);
			psfChoice.removeAll();
			for (final String it : items) psfChoice.add(ChoiceWords.word("psf", it));
			if (selected != null) psfChoice.select(selected);
			if (psfChoice.getSelectedIndex() < 0 || !psfChoice.getSelectedItem().equals(selected)) psfChoice.select(0);
		});
	}
}
