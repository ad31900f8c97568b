package org.parfocal.blocks;

import java.io.IOException;
import java.io.Serializable;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.HoldOutStop;
import org.parfocal.deconv.IterationListener;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Preprocessing;
import org.parfocal.deconv.Stopping;

/**
 * Block-wise deconvolution: the stack is read, deconvolved and written one {@link BlockPlan} block at a time
 * with the same engine ({@link Deconvolution#run}) as a whole-stack run, so a stack larger than the heap works
 * end to end.
 * <p>
 * What must be the same for every block is decided once for the whole stack, in streaming passes over its
 * planes, exactly as the whole-stack run decides it ({@link Levels}): the camera offset and the background
 * (the estimators of {@link Preprocessing} on the same evenly strided sample of voxels), and the constant
 * starting estimate (mean of y − b). Each block then runs with these values given, so away from the block
 * faces a block reproduces the whole-stack run (Richardson–Lucy is local: an iteration only mixes voxels
 * within one PSF size). Remaining differences: see {@link BlockPlan} (accelerated RL and the relative-change
 * stop decide per block; periodic edges).
 * <p>
 * Threads come from the caller's {@link net.imglib2.parallel.Parallelization} context, as for the engine.
 */
public final class BlockDeconvolution {

	/** Same sample size as the whole-stack estimators ({@code Preprocessing}), so the estimates agree. */
	static final int SAMPLE = 1 << 21;

	private BlockDeconvolution() {}

	/**
	 * Levels shared by every block.
	 *
	 * @param offset camera offset subtracted from the data
	 * @param background background b of the model Hx + b
	 * @param start constant starting estimate, mean of y − b over the whole stack
	 */
	public record Levels(double offset, double background, float start, List<String> notes) implements Serializable {
		private static final long serialVersionUID = 1L;

		/** The run's options with these levels given, as every block uses them. */
		public DeconvolutionOptions apply(final DeconvolutionOptions o) {
			return o.withOffset(Level.of(offset)).withBackground(Level.of(background));
		}
	}

	/** What a block-wise run did. */
	public record Result(BlockPlan plan, Levels levels, int minIterations, int maxIterations, int emptyBlocks, List<String> notes) {}

	/**
	 * Decides offset, background and starting estimate for the whole stack as {@link Deconvolution#run}
	 * would, reading it plane by plane (one pass, two when the offset is estimated).
	 *
	 * @throws IllegalArgumentException as the whole-stack run would (non-finite values, nothing above the
	 *         offset, background at or above the brightest voxel)
	 */
	public static Levels levels(final BlockSource source, final Volume psf, final DeconvolutionOptions options, final Monitor monitor) throws IOException {
		if (options.background().kind() != Level.Kind.BY_PSF) return levels(source, options, monitor);
		final Level resolved = Preprocessing.forPsf(options.background(), psf);
		final Levels l = levels(source, options.withBackground(resolved), monitor);
		final List<String> notes = new ArrayList<>();
		notes.add(Preprocessing.byPsfReason(resolved));
		notes.addAll(l.notes());
		return new Levels(l.offset(), l.background(), l.start(), List.copyOf(notes));
	}

	/** As above for options whose background does not depend on the PSF (not {@code by-psf}). */
	public static Levels levels(final BlockSource source, final DeconvolutionOptions options, final Monitor monitor) throws IOException {
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		final int[] n = source.shape();
		final long total = (long) n[0] * n[1] * n[2];
		final long step = Math.max(1, (total + SAMPLE - 1) / SAMPLE);
		final List<String> notes = new ArrayList<>();
		final double offset;
		switch (options.offset().kind()) {
		case VALUE -> offset = options.offset().value();
		case ESTIMATED -> {
			final float[] s = sample(source, step, Double.NaN, mon);
			offset = Preprocessing.estimateOffset(Volume.wrap(s, s.length, 1, 1, null));
			notes.add(String.format(Locale.ROOT, "Camera offset estimated as %.4g (0.1%% quantile of the image)", offset));
		}
		default -> offset = 0;
		}
		// y = max(0, (float)(v - offset)): its sum (in stack order, as the engine sums it), maximum and sample
		final double[] stats = new double[3]; // sum, max, clipped
		final Level.Kind bk = options.background().kind();
		final DarkBoxes dark = bk == Level.Kind.DARK || bk == Level.Kind.DARK_OR_MEDIAN ? new DarkBoxes(n) : null;
		final float[] ys = sampleY(source, step, offset, stats, dark, mon);
		if (!(stats[0] > 0))
			throw new IllegalArgumentException(offset == 0 ? "The image is all zero (or negative): nothing to deconvolve"
					: String.format(Locale.ROOT, "The image is at or below the camera offset (%.4g) everywhere: nothing to deconvolve", offset));
		if (stats[2] > 0)
			notes.add(String.format(Locale.ROOT, "%d voxels (%.2g%%) below %s set to zero", (long) stats[2], 100.0 * stats[2] / total,
					offset == 0 ? "zero" : "the camera offset"));
		final double background;
		switch (options.background().kind()) {
		case VALUE -> background = options.background().value();
		case ESTIMATED -> {
			background = Preprocessing.estimateBackground(ys);
			notes.add(String.format(Locale.ROOT, "Background estimated as %.4g (sigma-clipped median)", background));
		}
		case DARK -> {
			background = dark.level();
			notes.add(String.format(Locale.ROOT, "Background estimated as %.4g (darkest region)", background));
		}
		case DARK_OR_MEDIAN -> {
			final double median = Preprocessing.estimateBackground(ys);
			background = Math.max(dark.level(), median);
			notes.add(Preprocessing.darkOrMedianNote(dark.level(), median));
		}
		case BY_PSF -> throw new IllegalArgumentException("background=by-psf needs the PSF: resolve it with Preprocessing.forPsf first");
		case FIT, FIT_SMOOTH -> throw new IllegalArgumentException("background=fit is not available block by block yet: give a number (e.g. the fitted value of a run on a crop) or auto");
		default -> background = 0;
		}
		if (background >= stats[1])
			throw new IllegalArgumentException(String.format(Locale.ROOT,
					"The background (%.4g) is at or above the brightest offset-corrected voxel (%.4g): nothing is left to deconvolve", background, stats[1]));
		final double mean = stats[0] / total;
		// the engine's own start (RichardsonLucyEngine: max(mean − b, floor), floor = 1e-6·mean)
		final float start = (float) Math.max(mean - background, Math.max(1e-6 * mean, Float.MIN_NORMAL));
		return new Levels(offset, background, start, List.copyOf(notes));
	}

	/**
	 * Deconvolves one block with the shared levels and returns its weighted estimate over
	 * {@link Block#outOrigin()} + {@link Block#outSize()} (add it into the output there). A block whose data are
	 * all at or below the background gives zeros (the engine refuses such data; where a block's whole read
	 * region is dark, the whole-stack run also goes to zero there).
	 *
	 * @param iterations if not null, receives the iterations done in [0] (0 for an empty block)
	 */
	public static Volume deconvolve(final BlockSource source, final Volume psf, final DeconvolutionOptions options, final BlockPlan plan,
			final Levels levels, final Block block, final Monitor monitor, final int[] iterations) throws IOException {
		final Volume data = source.read(block.readOrigin(), block.readSize());
		final int[] s = block.outSize(), o = block.outOrigin(), r = block.readOrigin();
		final Volume out = Volume.zeros(s[0], s[1], s[2], source.voxelSize());
		float max = 0;
		for (final float v : data.data()) max = Math.max(max, (float) (v - levels.offset()));
		if (!(max > levels.background())) {
			if (iterations != null) iterations[0] = 0;
			return out;
		}
		final Volume start = Volume.zeros(data.nx(), data.ny(), data.nz(), data.voxelSize());
		Arrays.fill(start.data(), levels.start());
		final DeconvolutionResult res = Deconvolution.run(data, psf, levels.apply(options), start, monitor, IterationListener.NONE);
		if (iterations != null) iterations[0] = res.iterations();
		final Volume est = res.estimate();
		final float[] e = est.data(), dst = out.data();
		final double[] wx = new double[s[0]], wy = new double[s[1]];
		for (int x = 0; x < s[0]; x++) wx[x] = plan.weight1(block, 0, o[0] + x);
		for (int y = 0; y < s[1]; y++) wy[y] = plan.weight1(block, 1, o[1] + y);
		for (int z = 0; z < s[2]; z++) {
			final double wz = plan.weight1(block, 2, o[2] + z);
			for (int y = 0; y < s[1]; y++) {
				final int a = (o[0] - r[0]) + est.nx() * (o[1] - r[1] + y + est.ny() * (o[2] - r[2] + z)), b = s[0] * (y + s[1] * z);
				for (int x = 0; x < s[0]; x++) dst[b + x] = (float) (e[a + x] * (wx[x] * wy[y] * wz));
			}
		}
		return out;
	}

	/**
	 * The whole block-wise run: levels, then each block in turn into {@code sink}; commits the sink at the end,
	 * aborts it (nothing left looking complete) on any failure or cancellation.
	 */
	public static Result run(final BlockSource source, final Volume psf, final DeconvolutionOptions given, final BlockPlan plan, final BlockSink sink,
			final Monitor monitor) throws IOException {
		final Monitor mon = monitor == null ? Monitor.NONE : monitor;
		if (!Arrays.equals(plan.shape(), source.shape()))
			throw new IllegalArgumentException("The block plan is for a " + BlockPlan.text(plan.shape()) + " stack, but " + source.name() + " is "
					+ BlockPlan.text(source.shape()));
		// background=by-psf: the level the PSF's shape calls for, decided once for every block
		final DeconvolutionOptions options = given.withBackground(Preprocessing.forPsf(given.background(), psf));
		try {
			final Levels levels = levels(source, psf, given, mon);
			final List<String> stopNotes = new ArrayList<>();
			final DeconvolutionOptions opts = plan.count() > 1 ? heldOutOnce(source, psf, options, plan, levels, mon, stopNotes) : options;
			int min = Integer.MAX_VALUE, max = 0, empty = 0;
			final int nb = plan.count();
			final int[] it = new int[1];
			for (final Block b : plan.blocks()) {
				mon.checkCancelled();
				final Monitor sub = new Monitor() {
					@Override
					public void progress(final int done, final int total, final String status) {
						mon.progress(b.index() * total + done, nb * total, status + " (block " + (b.index() + 1) + " of " + nb + ")");
					}

					@Override
					public boolean isCancelled() {
						return mon.isCancelled();
					}
				};
				final Volume part = deconvolve(source, psf, opts, plan, levels, b, sub, it);
				sink.add(part, b.outOrigin());
				if (it[0] == 0) empty++;
				else {
					min = Math.min(min, it[0]);
					max = Math.max(max, it[0]);
				}
			}
			sink.commit();
			final List<String> notes = new ArrayList<>(levels.notes());
			notes.addAll(plan.notes());
			notes.addAll(stopNotes);
			if (empty > 0) notes.add(empty + " block(s) at or below the background set to 0");
			return new Result(plan, levels, min == Integer.MAX_VALUE ? 0 : min, max, empty, notes);
		} catch (final IOException | RuntimeException | Error e) {
			sink.abort();
			throw e;
		}
	}

	/**
	 * With the held-out stop, the number of iterations is decided once, on the block holding the stack's centre
	 * ({@link HoldOutStop}, with the shared levels), and every block runs that many: blocks that stopped on their own
	 * would meet at seams after different numbers of iterations. Other options, and a dark centre block (then each
	 * block decides for itself, with a note), are returned unchanged.
	 */
	public static DeconvolutionOptions heldOutOnce(final BlockSource source, final Volume psf, final DeconvolutionOptions options, final BlockPlan plan,
			final Levels levels, final Monitor monitor, final List<String> notes) throws IOException {
		if (options.stopping() != Stopping.HELD_OUT || !options.method().isIterative()) return options;
		final int[] n = source.shape();
		Block centre = plan.blocks().get(0);
		for (final Block b : plan.blocks()) {
			boolean inside = true;
			for (int d = 0; d < 3; d++) inside &= b.outOrigin()[d] <= n[d] / 2 && n[d] / 2 < b.outOrigin()[d] + b.outSize()[d];
			if (inside) centre = b;
		}
		final Volume data = source.read(centre.readOrigin(), centre.readSize());
		float top = 0;
		for (final float v : data.data()) top = Math.max(top, (float) (v - levels.offset()));
		if (!(top > levels.background())) {
			notes.add("held-out stop: the centre block is dark, so each block finds its own stopping point");
			return options;
		}
		final HoldOutStop.Result h = HoldOutStop.suggest(data, psf, levels.apply(options), monitor);
		notes.add("held-out stop decided once, on block " + (centre.index() + 1) + " (the stack's centre): " + h.reason() + "; every block ran "
				+ h.fullIterations() + " iteration(s)");
		return new DeconvolutionOptions(options.method(), h.fullIterations(), options.regularization(), Stopping.FIXED, options.changeThreshold(),
				options.edges(), options.offset(), options.background());
	}

	/** Block-wise run of a stack in memory (tests, comparisons); the input is not modified. */
	public static Volume run(final Volume image, final Volume psf, final DeconvolutionOptions options, final BlockPlan plan, final Monitor monitor) {
		final BlockSink.Memory sink = BlockSink.memory(image.shape(), image.voxelSize());
		try {
			run(BlockSource.of(image), psf, options, plan, sink, monitor);
		} catch (final IOException e) {
			throw new UncheckedIOException(e);
		}
		return sink.result();
	}

	/**
	 * The chunk shape to stream by, or null to stream by planes: chunks when the source has them and one layer of
	 * them (nx · ny · chunk depth floats) would take more than a sixteenth of the free heap (what a chunked source
	 * may cache, so that plane-wise passes decode each chunk once).
	 */
	static int[] streamChunks(final BlockSource source) {
		final int[] c = source.chunkShape(), n = source.shape();
		if (c == null || c[2] <= 1) return null;
		final long limit = streamLimit >= 0 ? streamLimit : org.parfocal.core.MemoryBudget.available() / 16;
		return 4L * n[0] * n[1] * Math.min(c[2], n[2]) > limit ? c : null;
	}

	/** Bytes of one chunk layer above which passes stream by chunks; negative: a sixteenth of the free heap (tests set 0). */
	static volatile long streamLimit = -1;

	/**
	 * The streaming pass chunk by chunk: each value {@code v} at stack index i goes to {@code each.accept(i, v)} in
	 * chunk order (not stack order).
	 */
	private static void forEachByChunk(final BlockSource source, final int[] c, final Monitor mon, final VoxelVisitor each) throws IOException {
		final int[] n = source.shape();
		for (int z0 = 0; z0 < n[2]; z0 += c[2]) {
			mon.checkCancelled();
			mon.progress(z0, n[2], "Reading levels");
			for (int y0 = 0; y0 < n[1]; y0 += c[1])
				for (int x0 = 0; x0 < n[0]; x0 += c[0]) {
					final int[] s = { Math.min(c[0], n[0] - x0), Math.min(c[1], n[1] - y0), Math.min(c[2], n[2] - z0) };
					final float[] p = source.read(new int[] { x0, y0, z0 }, s).data();
					int k = 0;
					for (int z = 0; z < s[2]; z++)
						for (int y = 0; y < s[1]; y++) {
							final long row = (long) n[0] * ((y0 + y) + (long) n[1] * (z0 + z)) + x0;
							for (int x = 0; x < s[0]; x++, k++) each.accept(row + x, p[k], x0 + x, y0 + y, z0 + z);
						}
				}
		}
	}

	@FunctionalInterface
	private interface VoxelVisitor {
		void accept(long index, float v, int x, int y, int z);
	}

	private static float[] sample(final BlockSource source, final long step, final double unused, final Monitor mon) throws IOException {
		final int[] n = source.shape();
		final int[] chunks = streamChunks(source);
		if (chunks != null) {
			final long total = (long) n[0] * n[1] * n[2];
			final float[] s = new float[(int) ((total + step - 1) / step)];
			forEachByChunk(source, chunks, mon, (i, v, x, y, z) -> {
				if (i % step == 0) s[(int) (i / step)] = v;
			});
			return s;
		}
		final long total = (long) n[0] * n[1] * n[2];
		final float[] s = new float[(int) ((total + step - 1) / step)];
		final long plane = (long) n[0] * n[1];
		int j = 0;
		for (int z = 0; z < n[2]; z++) {
			mon.checkCancelled();
			final long first = z * plane, next = ((first + step - 1) / step) * step;
			if (next >= first + plane) continue;
			final float[] p = source.read(new int[] { 0, 0, z }, new int[] { n[0], n[1], 1 }).data();
			for (long i = next; i < first + plane; i += step) s[j++] = p[(int) (i - first)];
		}
		return s;
	}

	private static float[] sampleY(final BlockSource source, final long step, final double offset, final double[] stats, final Monitor mon)
			throws IOException {
		return sampleY(source, step, offset, stats, null, mon);
	}

	/**
	 * Sums of y over the boxes of {@link Preprocessing#estimateDarkBackground} (about 8×8×4 voxels, whole boxes
	 * only, x fastest), so that {@code background=dark} gives the whole-stack run's value from the one streaming
	 * pass (a double per box: 1/32 of the input's bytes).
	 */
	static final class DarkBoxes {
		final int bx, by, bz, gx, gy, gz;
		final double[] sums;

		DarkBoxes(final int[] n) {
			bx = Math.min(8, n[0]);
			by = Math.min(8, n[1]);
			bz = Math.min(4, n[2]);
			gx = n[0] / bx;
			gy = n[1] / by;
			gz = n[2] / bz;
			sums = new double[Math.multiplyExact(Math.multiplyExact(gx, gy), gz)];
		}

		void add(final int x, final int y, final int z, final float v) {
			final int cx = x / bx, cy = y / by, cz = z / bz;
			if (cx < gx && cy < gy && cz < gz) sums[(cz * gy + cy) * gx + cx] += v;
		}

		/** The 2 % quantile of the box means, as {@link Preprocessing#estimateDarkBackground}. */
		double level() {
			final double[] means = new double[sums.length];
			for (int i = 0; i < means.length; i++) means[i] = sums[i] / (bx * by * bz);
			java.util.Arrays.sort(means);
			return means[(int) Math.floor(0.02 * (means.length - 1))];
		}
	}

	private static float[] sampleY(final BlockSource source, final long step, final double offset, final double[] stats, final DarkBoxes dark,
			final Monitor mon) throws IOException {
		final int[] n = source.shape();
		final long total = (long) n[0] * n[1] * n[2];
		final float[] s = new float[(int) ((total + step - 1) / step)];
		final long plane = (long) n[0] * n[1];
		double sum = 0;
		float max = 0;
		long clipped = 0;
		int j = 0;
		final int[] chunks = streamChunks(source);
		if (chunks != null) {
			// chunk order: the same sample and maximum; the sum in another order (differences of the order of 1e-16 relative)
			final double[] acc = new double[3];
			forEachByChunk(source, chunks, mon, (i, v0, x, y, z) -> {
				if (!Float.isFinite(v0)) throw new IllegalArgumentException("The image has a non-finite value (" + v0 + ") at (" + x + ", " + y + ", " + z + ")");
				final float v = (float) (v0 - offset);
				if (v < 0) acc[2]++;
				final float yv = v > 0 ? v : 0f;
				acc[0] += yv;
				if (yv > acc[1]) acc[1] = yv;
				if (i % step == 0) s[(int) (i / step)] = yv;
				if (dark != null) dark.add(x, y, z, yv);
			});
			stats[0] = acc[0];
			stats[1] = acc[1];
			stats[2] = acc[2];
			return s;
		}
		for (int z = 0; z < n[2]; z++) {
			mon.checkCancelled();
			mon.progress(z, n[2], "Reading levels");
			final Volume pv = source.read(new int[] { 0, 0, z }, new int[] { n[0], n[1], 1 });
			final float[] p = pv.data();
			final int bad = pv.firstNonFinite();
			if (bad >= 0)
				throw new IllegalArgumentException("The image has a non-finite value (" + p[bad] + ") at (" + bad % n[0] + ", " + bad / n[0] + ", " + z + ")");
			final long first = z * plane;
			long next = ((first + step - 1) / step) * step;
			for (int i = 0; i < p.length; i++) {
				final float v = (float) (p[i] - offset);
				if (v < 0) clipped++;
				final float y = v > 0 ? v : 0f;
				sum += y;
				if (y > max) max = y;
				if (first + i == next) {
					s[j++] = y;
					next += step;
				}
				if (dark != null) dark.add(i % n[0], i / n[0], z, y);
			}
		}
		stats[0] = sum;
		stats[1] = max;
		stats[2] = clipped;
		return s;
	}
}
