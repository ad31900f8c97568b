package org.parfocal.blocks;

import java.io.Serializable;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;

/**
 * How a stack too large for one deconvolution is cut into blocks that are deconvolved one at a time and blended
 * back.
 * <p>
 * <b>Tiles.</b> Along each axis the stack is cut into {@code m} tiles of nearly equal size (tile j covers
 * ⌊j·n/m⌋ … ⌊(j+1)·n/m⌋ − 1); the tiles partition the stack.
 * <p>
 * <b>Overlap rule</b> (per axis, PSF size k along it; nothing along an axis that is not cut):
 * <ul>
 * <li>blend width {@code w = max(2, k − 1)} rounded up to even: across each inner tile face the estimates of the
 * two neighbours are mixed with raised-cosine weights (0 → 1 over w voxels, centred on the face); the weights
 * of all blocks sum to exactly 1 at every voxel, so a constant is reproduced without seams;</li>
 * <li>halo {@code h = ⌈}{@value #HALO_FACTOR}{@code ·(k − 1)⌉} beyond the blended region, read and deconvolved
 * but discarded. One RL iteration moves information by up to k − 1 voxels (H then Hᵀ), but its influence
 * decays fast; the block's own edges are handled by the run's edge mode (non-circulant by default, which
 * accounts for light from outside the block), and the halo keeps what remains of that edge effect out of the
 * kept region. Measured on a synthetic 96 × 80 × 40 stack, PSF 13 × 13 × 9, 30 iterations, 12 blocks: the
 * largest difference from the whole-stack run, relative to its range, is 1e-3 with a halo of 0.5·(k − 1),
 * 4e-5 with 1·(k − 1) and 1.7e-5 with 1.5·(k − 1) (RL; RL-TV 5e-5, where each block's TV smoothing ε follows
 * its own mean).</li>
 * </ul>
 * A tile must be at least as large as the PSF and as the blend width along each cut axis ("block smaller than
 * the PSF" otherwise).
 * <p>
 * <b>Budget.</b> A block needs {@link Deconvolution#bytesNeeded} for its read region plus three block-sized
 * float arrays (data, starting estimate, weighted result). The planner cuts the axis whose read extent is the
 * largest, one more tile at a time, until the largest block fits.
 * <p>
 * <b>Edges.</b> Faces of a block on the stack's border see the run's edge mode, as the whole-stack run does.
 * With {@link EdgeMode#PERIODIC} the stack's own wrap-around (left face next to right face) cannot be
 * reproduced block-wise; the plan says so in its notes.
 */
public record BlockPlan(int[] shape, int[] psfShape, int[] tiles, int[] halo, int[] blend, List<Block> blocks, long bytesPerBlock, long budget,
		List<String> notes) implements Serializable {

	private static final long serialVersionUID = 1L;
	/** Halo in units of (PSF size − 1) per side. */
	public static final double HALO_FACTOR = 1.5;
	/** Float arrays of the block size that the block run holds besides the engine's own (data, start, result). */
	static final int EXTRA_ARRAYS = 3;
	private static final String[] AXIS = { "x", "y", "z" };

	/**
	 * True when the whole stack does not fit in {@code budget} bytes and should go block-wise: the engine's
	 * {@link Deconvolution#bytesNeeded} plus the input copy and the output (8 bytes per voxel), as
	 * {@code Deconvolve} requires, or more voxels than one volume may hold.
	 */
	public static boolean needed(final int[] shape, final int[] psfShape, final DeconvolutionOptions options, final long budget) {
		final long n = (long) shape[0] * shape[1] * shape[2];
		return n > Volume.MAX_VOXELS || Deconvolution.bytesNeeded(shape, psfShape, options) + 8L * n > budget;
	}

	/** {@link #needed(int[], int[], DeconvolutionOptions, long)} with the heap's free bytes ({@link MemoryBudget#available()}). */
	public static boolean needed(final int[] shape, final int[] psfShape, final DeconvolutionOptions options) {
		return needed(shape, psfShape, options, MemoryBudget.available());
	}

	/**
	 * Half the heap's free bytes, less 8 MB for the I/O: {@link Deconvolution#bytesNeeded} counts the engine's
	 * arrays, not its transient scratch (the measured peak heap of an RL run is about 1.5 times that figure), and
	 * a 64 MB heap ran out of memory with a reserve of 1/8.
	 */
	public static long heapBudget() {
		return Math.max(0, (MemoryBudget.available() - (8L << 20)) / 2);
	}

	/**
	 * The plan with the fewest blocks (cutting the longest read extent first) whose largest block fits in
	 * {@code budget} bytes.
	 *
	 * @throws IllegalArgumentException when even the smallest block allowed (the PSF size, or the blend width,
	 *         along each axis) does not fit
	 */
	public static BlockPlan forBudget(final int[] shape, final int[] psfShape, final DeconvolutionOptions options, final long budget) {
		check(shape, psfShape, options);
		if (!(budget > 0)) throw new IllegalArgumentException("The memory budget must be positive, got " + budget + " bytes");
		final int[] halo = halo(psfShape, HALO_FACTOR), blend = blend(shape, psfShape), minTile = minTile(psfShape, blend);
		final int[] m = { 1, 1, 1 };
		while (true) {
			final long bytes = largestBlockBytes(shape, psfShape, options, m, halo, blend);
			if (bytes <= budget) return build(shape, psfShape, options, m, halo, blend, budget);
			int best = -1;
			long bestExtent = -1;
			for (int d = 2; d >= 0; d--) {
				if (shape[d] / (m[d] + 1) < minTile[d]) continue;
				final long extent = Math.min(shape[d], (shape[d] + m[d] - 1) / m[d] + (m[d] > 1 ? 2 * (blend[d] / 2 + halo[d]) : 0));
				if (extent > bestExtent) {
					bestExtent = extent;
					best = d;
				}
			}
			if (best < 0)
				throw new IllegalArgumentException("The memory budget (" + MemoryBudget.format(budget) + ") is too small for any block: the smallest block ("
						+ readShapeText(shape, m, halo, blend) + " voxels read, tiles " + minTile[0] + " x " + minTile[1] + " x " + minTile[2]
						+ " for a " + text(psfShape) + " PSF) needs " + MemoryBudget.format(bytes) + "; give more memory (-Xmx) or use a smaller PSF");
			m[best]++;
		}
	}

	/**
	 * The plan whose tiles are about {@code tileSize} voxels along each axis (the last value is used for missing
	 * axes; 0 or a size at least the stack's leaves that axis uncut).
	 *
	 * @throws IllegalArgumentException for a tile smaller than the PSF or the blend width along a cut axis
	 */
	public static BlockPlan forTileSize(final int[] shape, final int[] psfShape, final DeconvolutionOptions options, final int[] tileSize) {
		return forTileSize(shape, psfShape, options, tileSize, HALO_FACTOR);
	}

	/** As {@link #forTileSize(int[], int[], DeconvolutionOptions, int[])} with another halo factor (measurements). */
	static BlockPlan forTileSize(final int[] shape, final int[] psfShape, final DeconvolutionOptions options, final int[] tileSize, final double haloFactor) {
		check(shape, psfShape, options);
		final int[] halo = halo(psfShape, haloFactor), blend = blend(shape, psfShape), minTile = minTile(psfShape, blend);
		final int[] m = new int[3];
		for (int d = 0; d < 3; d++) {
			final int t = tileSize[Math.min(d, tileSize.length - 1)];
			if (t < 0) throw new IllegalArgumentException("Block sizes must be 0 (uncut) or positive, got " + t + " along " + AXIS[d]);
			if (t == 0 || t >= shape[d]) {
				m[d] = 1;
				continue;
			}
			if (t < minTile[d])
				throw new IllegalArgumentException("The block size along " + AXIS[d] + " (" + t + ") is smaller than the PSF (" + psfShape[d]
						+ ") or the blend width (" + blend[d] + "): use at least " + minTile[d]);
			m[d] = (shape[d] + t - 1) / t;
			if (shape[d] / m[d] < minTile[d]) m[d]--;
		}
		return build(shape, psfShape, options, m, halo, blend, largestBlockBytes(shape, psfShape, options, m, halo, blend));
	}

	/**
	 * This plan with its tile faces moved to the nearest multiples of {@code chunk} (a chunked output's grid, x, y,
	 * z), so that blocks start and end on chunk boundaries where possible: a face whose nearer (or else farther)
	 * multiple would leave a tile smaller than the PSF or the blend width stays where it was. The number of tiles, the halo and the blend are unchanged; blocks may grow by up to half a chunk, and
	 * {@link #bytesPerBlock()} is recomputed.
	 */
	public BlockPlan alignedTo(final int[] chunk, final DeconvolutionOptions options) {
		final int[] minTile = minTile(psfShape, blend(shape, psfShape));
		final int[][] bounds = new int[3][];
		for (int d = 0; d < 3; d++) {
			final int m = tiles[d];
			final int[] b = new int[m + 1];
			for (int j = 0; j <= m; j++) b[j] = start(j, shape[d], m);
			final int c = chunk[Math.min(d, chunk.length - 1)];
			if (c > 0 && m > 1)
				for (int j = 1; j < m; j++) {
					// the nearer multiple of c first, then the other; a face that fits neither stays
					final int lo = b[j] / c * c, hi = lo + c;
					final int[] cand = b[j] - lo <= hi - b[j] ? new int[] { lo, hi } : new int[] { hi, lo };
					for (final int a : cand)
						if (a - b[j - 1] >= minTile[d] && b[j + 1] - a >= minTile[d] && shape[d] - a >= (m - j) * minTile[d]) {
							b[j] = a;
							break;
						}
				}
			bounds[d] = b;
		}
		final int[] full = halo(psfShape, HALO_FACTOR), fullBlend = blend(shape, psfShape);
		long worst = 0;
		final BlockPlan p = build(shape, psfShape, options, tiles, full, fullBlend, budget, bounds);
		for (final Block b : p.blocks()) worst = Math.max(worst, blockBytes(b.readSize(), psfShape, options));
		return new BlockPlan(p.shape, p.psfShape, p.tiles, p.halo, p.blend, p.blocks, worst, budget, p.notes);
	}

	/** Number of blocks. */
	public int count() {
		return blocks.size();
	}

	/**
	 * Weight of {@code block} at stack position {@code (x, y, z)} (0 outside its blended region): the product
	 * over the axes of raised-cosine ramps across the inner faces. The weights of all blocks sum to 1.
	 */
	public double weight(final Block block, final int x, final int y, final int z) {
		return weight1(block, 0, x) * weight1(block, 1, y) * weight1(block, 2, z);
	}

	/** Weight along one axis at coordinate {@code c}. */
	double weight1(final Block b, final int d, final int c) {
		final int lo = b.coreOrigin()[d], hi = lo + b.coreSize()[d];
		double w = 1;
		if (lo > 0) w *= ramp(c, lo, blend[d]);
		if (hi < shape[d]) w *= 1 - ramp(c, hi, blend[d]);
		return w;
	}

	/** Raised cosine rising from 0 to 1 over the w voxels centred on face t (0 before, 1 after). */
	static double ramp(final int c, final int t, final int w) {
		final int start = t - w / 2;
		if (c < start) return 0;
		if (c >= start + w) return 1;
		return 0.5 - 0.5 * Math.cos(Math.PI * (c - start + 0.5) / w);
	}

	/** Facts of the plan for provenance, in a stable order. */
	public Map<String, Object> describe() {
		final Map<String, Object> m = new LinkedHashMap<>();
		m.put("blocks", tiles[0] + "x" + tiles[1] + "x" + tiles[2] + " = " + blocks.size());
		m.put("stack", text(shape));
		m.put("psf", text(psfShape));
		final Block largest = blocks.stream().max((a, b) -> Long.compare(a.readVoxels(), b.readVoxels())).orElseThrow();
		m.put("largest_block_read", text(largest.readSize()));
		m.put("halo", text(halo));
		m.put("blend", text(blend));
		m.put("overlap_rule", "halo ceil(" + HALO_FACTOR + "*(psf-1)) + raised-cosine blend max(2,psf-1) per cut axis");
		m.put("bytes_per_block", bytesPerBlock);
		m.put("budget", budget);
		if (!notes.isEmpty()) m.put("notes", String.join("; ", notes));
		return m;
	}

	/** One line: "2x2x1 = 4 blocks of at most 136 x 136 x 40 read, halo …". */
	@Override
	public String toString() {
		final Map<String, Object> d = describe();
		return d.get("blocks") + " block(s) of at most " + d.get("largest_block_read") + " voxels read (halo " + d.get("halo") + ", blend "
				+ d.get("blend") + ", about " + MemoryBudget.format(bytesPerBlock) + " each)";
	}

	@Override
	public boolean equals(final Object o) {
		return o instanceof BlockPlan p && Arrays.equals(p.shape, shape) && Arrays.equals(p.psfShape, psfShape) && Arrays.equals(p.tiles, tiles)
				&& Arrays.equals(p.halo, halo) && Arrays.equals(p.blend, blend) && p.blocks.equals(blocks);
	}

	@Override
	public int hashCode() {
		return Arrays.hashCode(shape) * 31 + Arrays.hashCode(tiles);
	}

	// -- construction --

	private static void check(final int[] shape, final int[] psfShape, final DeconvolutionOptions options) {
		if (shape == null || shape.length != 3 || psfShape == null || psfShape.length != 3 || options == null)
			throw new IllegalArgumentException("A block plan needs the stack's and the PSF's {nx, ny, nz} and the options");
		for (int d = 0; d < 3; d++) {
			if (shape[d] < 1 || psfShape[d] < 1) throw new IllegalArgumentException("Sizes must be at least 1, got " + text(shape) + " and " + text(psfShape));
			if (psfShape[d] > shape[d])
				throw new IllegalArgumentException("The PSF (" + text(psfShape) + ") is larger than the stack (" + text(shape) + ") along " + AXIS[d]);
		}
	}

	static int[] halo(final int[] k, final double factor) {
		return new int[] { (int) Math.ceil(factor * (k[0] - 1)), (int) Math.ceil(factor * (k[1] - 1)), (int) Math.ceil(factor * (k[2] - 1)) };
	}

	static int[] blend(final int[] n, final int[] k) {
		final int[] w = new int[3];
		for (int d = 0; d < 3; d++) {
			final int v = Math.max(2, k[d] - 1);
			w[d] = n[d] == 1 ? 0 : v + (v & 1);
		}
		return w;
	}

	private static int[] minTile(final int[] k, final int[] blend) {
		return new int[] { Math.max(k[0], Math.max(1, blend[0])), Math.max(k[1], Math.max(1, blend[1])), Math.max(k[2], Math.max(1, blend[2])) };
	}

	private static int start(final int j, final int n, final int m) {
		return (int) ((long) j * n / m);
	}

	/** Read interval along one axis of tile j of m: {origin, size}. */
	private static int[] read(final int j, final int n, final int m, final int halo, final int blend) {
		final int lo = start(j, n, m), hi = start(j + 1, n, m);
		final int ext = blend / 2 + halo;
		final int a = j == 0 ? 0 : Math.max(0, lo - ext), b = j == m - 1 ? n : Math.min(n, hi + ext);
		return new int[] { a, b - a };
	}

	private static long blockBytes(final int[] readSize, final int[] psfShape, final DeconvolutionOptions options) {
		final long v = (long) readSize[0] * readSize[1] * readSize[2];
		if (v > Volume.MAX_VOXELS) return Long.MAX_VALUE;
		final int[] k = new int[3];
		for (int d = 0; d < 3; d++) k[d] = Math.min(psfShape[d], readSize[d]);
		return Deconvolution.bytesNeeded(readSize, k, options) + 4L * EXTRA_ARRAYS * v;
	}

	private static long largestBlockBytes(final int[] n, final int[] k, final DeconvolutionOptions o, final int[] m, final int[] halo, final int[] blend) {
		// read sizes differ by at most one voxel between tiles: try the largest along each axis
		final int[] r = new int[3];
		for (int d = 0; d < 3; d++)
			for (int j = 0; j < m[d]; j++) r[d] = Math.max(r[d], read(j, n[d], m[d], halo[d], blend[d])[1]);
		return blockBytes(r, k, o);
	}

	private static String readShapeText(final int[] n, final int[] m, final int[] halo, final int[] blend) {
		final int[] r = new int[3];
		for (int d = 0; d < 3; d++)
			for (int j = 0; j < m[d]; j++) r[d] = Math.max(r[d], read(j, n[d], m[d], halo[d], blend[d])[1]);
		return text(r);
	}

	private static BlockPlan build(final int[] n, final int[] k, final DeconvolutionOptions o, final int[] m, final int[] halo, final int[] blend,
			final long budget) {
		final int[][] bounds = new int[3][];
		for (int d = 0; d < 3; d++) {
			bounds[d] = new int[m[d] + 1];
			for (int j = 0; j <= m[d]; j++) bounds[d][j] = start(j, n[d], m[d]);
		}
		return build(n, k, o, m, halo, blend, budget, bounds);
	}

	/** Read interval {origin, size} of the tile between faces lo and hi of an axis of length n. */
	private static int[] read(final int lo, final int hi, final boolean first, final boolean last, final int n, final int halo, final int blend) {
		final int ext = blend / 2 + halo;
		final int a = first ? 0 : Math.max(0, lo - ext), b = last ? n : Math.min(n, hi + ext);
		return new int[] { a, b - a };
	}

	private static BlockPlan build(final int[] n, final int[] k, final DeconvolutionOptions o, final int[] m, final int[] halo, final int[] blend,
			final long budget, final int[][] bounds) {
		final List<Block> blocks = new ArrayList<>();
		final int[] h = new int[3], w = new int[3];
		for (int d = 0; d < 3; d++) {
			h[d] = m[d] > 1 ? halo[d] : 0;
			w[d] = m[d] > 1 ? blend[d] : 0;
		}
		long worst = 0;
		for (int jz = 0; jz < m[2]; jz++)
			for (int jy = 0; jy < m[1]; jy++)
				for (int jx = 0; jx < m[0]; jx++) {
					final int[] j = { jx, jy, jz };
					final int[] co = new int[3], cs = new int[3], oo = new int[3], os = new int[3], ro = new int[3], rs = new int[3];
					for (int d = 0; d < 3; d++) {
						co[d] = bounds[d][j[d]];
						cs[d] = bounds[d][j[d] + 1] - co[d];
						final boolean first = j[d] == 0, last = j[d] == m[d] - 1;
						final int[] out = read(co[d], co[d] + cs[d], first, last, n[d], 0, w[d]);
						oo[d] = out[0];
						os[d] = out[1];
						final int[] rd = read(co[d], co[d] + cs[d], first, last, n[d], h[d], w[d]);
						ro[d] = rd[0];
						rs[d] = rd[1];
					}
					worst = Math.max(worst, blockBytes(rs, k, o));
					blocks.add(new Block(blocks.size(), j, co, cs, oo, os, ro, rs));
				}
		final List<String> notes = new ArrayList<>();
		if (blocks.size() > 1 && o.edges() == EdgeMode.PERIODIC)
			notes.add("periodic edges: each block is taken as periodic; the stack's own wrap-around is not reproduced block-wise");
		if (blocks.size() > 1 && o.method() == org.parfocal.deconv.DeconvolutionMethod.RL_ACCELERATED)
			notes.add("accelerated RL: each block computes its own extrapolation factor");
		if (blocks.size() > 1 && o.stopping() == org.parfocal.deconv.Stopping.RELATIVE_CHANGE)
			notes.add("relative-change stop: each block stops on its own change");
		return new BlockPlan(n.clone(), k.clone(), m.clone(), h, w, List.copyOf(blocks), worst, budget, List.copyOf(notes));
	}

	static String text(final int[] s) {
		return s[0] + " x " + s[1] + " x " + s[2];
	}
}
