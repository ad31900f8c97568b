package org.parfocal.cli;

import java.io.IOException;
import java.util.ArrayList;
import java.util.List;

import org.parfocal.blocks.Recipe;

/**
 * The options of the block runners' command lines, read in one place for {@link BlockRunner} and the Spark
 * runner ({@code org.parfocal.spark.SparkRunner}), so both accept the same options with the same values and
 * refuse the same mistakes with the same line:
 *
 * <pre>
 * --budget MB          bytes per block (a positive number of MB); default: from the heap
 * --block X,Y,Z        the tile size in voxels (whole numbers; 0 leaves an axis uncut; fewer sizes: the last repeats)
 * --psf FILE[,FILE]    the PSF file, or one per channel (OME-Zarr inputs with channels)
 * --threads N          threads (a whole number from 1 to {@value #MAX_THREADS})
 * </pre>
 *
 * Every other argument is positional. {@link #parse} refuses an unknown option or a missing value
 * ({@link Usage}); the accessors refuse bad values ({@link IllegalArgumentException}, one line).
 */
public final class RunArgs {

	/** Most threads a run may ask for (ImageJ's and ImgLib2's pools take up to 32767; far more than any machine has cores). */
	public static final int MAX_THREADS = 1024;

	/** The options, as the usage lines and the unknown-option line name them. */
	public static final String OPTIONS = "--budget MB, --block X,Y,Z, --psf FILE[,FILE per channel], --threads N";

	/** A command line that is not of the runner's form (exit code 2). */
	public static final class Usage extends IllegalArgumentException {
		private static final long serialVersionUID = 1L;

		Usage(final String message) {
			super(message);
		}
	}

	private final List<String> positional;
	private final String budget, block, psf, threads;

	private RunArgs(final List<String> positional, final String budget, final String block, final String psf, final String threads) {
		this.positional = List.copyOf(positional);
		this.budget = budget;
		this.block = block;
		this.psf = psf;
		this.threads = threads;
	}

	/** @throws Usage for an unknown option or an option without its value */
	public static RunArgs parse(final String[] args) {
		String budget = null, block = null, psf = null, threads = null;
		final List<String> pos = new ArrayList<>();
		for (int i = 0; i < args.length; i++) {
			final String a = args[i];
			if (!a.startsWith("--")) {
				pos.add(a);
				continue;
			}
			if (!List.of("--budget", "--block", "--psf", "--threads").contains(a))
				throw new Usage("unknown option " + a + " (the options are " + OPTIONS + ")");
			if (i + 1 >= args.length) throw new Usage("missing value after " + a);
			final String v = args[++i];
			switch (a) {
			case "--budget" -> budget = v;
			case "--block" -> block = v;
			case "--psf" -> psf = v;
			default -> threads = v;
			}
		}
		return new RunArgs(pos, budget, block, psf, threads);
	}

	/** The arguments that are not options, in order. */
	public List<String> positional() {
		return positional;
	}

	/** Bytes per block, 0 when {@code --budget} is not given. */
	public long budgetBytes() {
		return budget == null ? 0 : (long) (positive(budget, "--budget") * 1024 * 1024);
	}

	/** The tile sizes of {@code --block} (x, y, z; 0 = the axis uncut; fewer: the last repeats), or null. */
	public int[] tile() {
		if (block == null) return null;
		final String[] p = block.split(",");
		if (p.length > 3) throw new IllegalArgumentException("--block takes at most three sizes X,Y,Z, got " + block);
		final int[] t = new int[p.length];
		for (int i = 0; i < p.length; i++) {
			// 0 leaves an axis uncut (BlockPlan.forTileSize)
			if (p[i].trim().equals("0")) continue;
			final double v = positive(p[i], "--block");
			if (v != Math.rint(v) || v > Integer.MAX_VALUE) throw new IllegalArgumentException("--block takes whole numbers of voxels, got " + p[i]);
			t[i] = (int) v;
		}
		return t;
	}

	/** The PSF files of {@code --psf} (one, or one per channel), empty when not given. */
	public List<String> psfs() {
		return psf == null ? List.of() : List.of(psf.split(","));
	}

	/** The thread count of {@code --threads}, 0 when not given. */
	public int threads() {
		if (threads == null) return 0;
		final double v = positive(threads, "--threads");
		if (v != Math.rint(v) || v > MAX_THREADS)
			throw new IllegalArgumentException("--threads takes a whole number from 1 to " + MAX_THREADS + " (this machine has "
					+ Runtime.getRuntime().availableProcessors() + " cores), got " + threads);
		return (int) v;
	}

	/**
	 * The recipe of the positional argument {@code index} (a file or the options text, {@link BlockRunner#readRecipe}),
	 * with its PSF taken from the first {@code --psf} file when one is given.
	 */
	public Recipe recipe(final int index) throws IOException {
		final Recipe base = BlockRunner.readRecipe(positional.get(index));
		return psf != null ? base.withPsfFile(psfs().get(0)) : base;
	}

	private static double positive(final String s, final String what) {
		try {
			final double v = Double.parseDouble(s.trim());
			if (!(v > 0)) throw new IllegalArgumentException(what + " must be positive, got " + s);
			return v;
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException(what + " takes a number, got '" + s + "'");
		}
	}
}
