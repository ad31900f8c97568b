package org.parfocal.quality;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;
import java.util.SplittableRandom;

import org.parfocal.core.Monitor;
import org.parfocal.core.Parallel;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * The distribution-matching check: how far the local content of a result lies from that of a set of sharp,
 * unmatched reference images, with the scale to read it by.
 * <p>
 * <b>Pipeline.</b> With {@link Options#resolution}, every reference is first blurred to the result's expected
 * resolution ({@link MatchedResolution}: so that references sharper than any result can be, e.g. confocal ones for
 * a widefield result, cannot rank a blurrier result higher). Every image is resampled to the result's voxel size
 * (anti-aliased linear interpolation, {@link Resampling}) and normalised to its own robust percentiles ({@link Normalization}). Then
 * <ul>
 * <li><i>patches</i>: sliced Wasserstein distance SW_p ({@link SlicedWasserstein}, p = {@link Options#power}) between
 * random patch features ({@link Patches}) of the result and of the pooled references;</li>
 * <li><i>intensity, gradient magnitude, Laplacian</i>: 1D Wasserstein-1 distances ({@link Wasserstein1D}) between
 * values sampled at random voxels ({@link Marginals}).</li>
 * </ul>
 * <b>Calibration of the numbers.</b> Two finite samples of the same distribution are not at distance 0. The
 * <i>floor</i> is the same distance, with the same sample counts, between two halves of the reference set (split
 * by image, seeded, averaged over {@link Options#floorSplits} splits; a single reference is split into its two
 * halves along its longer axis): a result indistinguishable from the references scores about the floor. The
 * <i>confidence interval</i> (95 %) comes from {@link Options#bootstrap} bootstrap resamples (Efron 1979) of both
 * samples and, for the patches, of the projection directions; the replicates' percentile interval is shifted by
 * their median bias so that it contains the estimate ({@link #interval}); it shows the sampling spread of the
 * distance at these sample counts. The <i>baseline</i> is the distance of the
 * blurred input, with the same sample positions as the result; <i>gap closed</i> = (d_input − d_result) /
 * (d_input − floor): 0 = no better than the input, 1 = as close as the references are to each other, &lt; 0
 * worse than the input, &gt; 1 closer than the floor (within noise of 1).
 * <p>
 * <b>Reuse.</b> {@link #prepare} does all the work on the references once (including the floor); {@link #compare}
 * then costs only the result's side, so a deconvolution can be checked every few iterations.
 * <p>
 * Everything is seeded ({@link Options#seed}) and independent of the thread count. Inputs are never modified.
 */
public final class ReferenceComparison {

	private ReferenceComparison() {}

	/** Row names of the report, in order. */
	public static final String PATCHES = "patches";

	/**
	 * @param patches patch features
	 * @param patchCount patches drawn from the result, and (in total) from the references
	 * @param directions number of random projection directions of the sliced distance
	 * @param power order p of the sliced distance (the marginals always use p = 1)
	 * @param marginalSamples voxels drawn for the 1D properties, from the result and (in total) the references
	 * @param lowPercentile intensity percentile mapped to 0 (per image)
	 * @param highPercentile intensity percentile mapped to 1 (per image)
	 * @param bootstrap bootstrap resamples for the confidence intervals (0: none)
	 * @param floorSplits splits of the reference set for the noise floor (≥ 1)
	 * @param ignoreCalibration compare voxel for voxel without resampling, even if calibrations differ or are missing
	 * @param seed seed of every random choice
	 * @param resolution the result's expected resolution, to which the references are blurred before any feature
	 *        is taken ({@link MatchedResolution}); null: references used at their own resolution
	 */
	public record Options(PatchOptions patches, int patchCount, int directions, double power, int marginalSamples, double lowPercentile,
			double highPercentile, int bootstrap, int floorSplits, boolean ignoreCalibration, long seed, MatchedResolution resolution) {

		/** Without matched resolution. */
		public Options(final PatchOptions patches, final int patchCount, final int directions, final double power, final int marginalSamples,
				final double lowPercentile, final double highPercentile, final int bootstrap, final int floorSplits, final boolean ignoreCalibration,
				final long seed) {
			this(patches, patchCount, directions, power, marginalSamples, lowPercentile, highPercentile, bootstrap, floorSplits, ignoreCalibration, seed, null);
		}

		public Options {
			if (patches == null) throw new IllegalArgumentException("No patch options given");
			if (patchCount < 16 || patchCount > 1 << 20) throw new IllegalArgumentException("Number of patches must be 16 to 1048576, got " + patchCount);
			if (directions < 1 || directions > 4096) throw new IllegalArgumentException("Number of directions must be 1 to 4096, got " + directions);
			Wasserstein1D.checkPower(power);
			if (marginalSamples < 16 || marginalSamples > 1 << 24)
				throw new IllegalArgumentException("Number of voxel samples must be 16 to 16777216, got " + marginalSamples);
			if (!(lowPercentile >= 0 && lowPercentile < highPercentile && highPercentile <= 100))
				throw new IllegalArgumentException("Percentiles must satisfy 0 ≤ low < high ≤ 100, got " + lowPercentile + " and " + highPercentile);
			if (bootstrap < 0 || bootstrap > 10000) throw new IllegalArgumentException("Bootstrap resamples must be 0 to 10000, got " + bootstrap);
			if (floorSplits < 1 || floorSplits > 100) throw new IllegalArgumentException("Floor splits must be 1 to 100, got " + floorSplits);
		}

		/**
		 * 7 × 7 (× 3 in 3D) patches at 2 scales, not contrast-normalised; 8192 patches, 64 directions, p = 2;
		 * 65536 voxel samples; percentiles 1 and 99.5; 50 bootstrap resamples; 4 floor splits; seed 1; no matched
		 * resolution.
		 */
		public static Options defaults() {
			return new Options(new PatchOptions(7, 3, 2, false, true), 8192, 64, 2, 65536, 1, 99.5, 50, 4, false, 1);
		}

		public Options withSeed(final long s) {
			return new Options(patches, patchCount, directions, power, marginalSamples, lowPercentile, highPercentile, bootstrap, floorSplits, ignoreCalibration, s, resolution);
		}

		public Options withPatches(final PatchOptions p) {
			return new Options(p, patchCount, directions, power, marginalSamples, lowPercentile, highPercentile, bootstrap, floorSplits, ignoreCalibration, seed, resolution);
		}

		public Options withCounts(final int patches, final int samples, final int boot) {
			return new Options(this.patches, patches, directions, power, samples, lowPercentile, highPercentile, boot, floorSplits, ignoreCalibration, seed, resolution);
		}

		public Options withIgnoreCalibration(final boolean ignore) {
			return new Options(patches, patchCount, directions, power, marginalSamples, lowPercentile, highPercentile, bootstrap, floorSplits, ignore, seed, resolution);
		}

		/** The references blurred to {@code r} (null: not matched). */
		public Options withResolution(final MatchedResolution r) {
			return new Options(patches, patchCount, directions, power, marginalSamples, lowPercentile, highPercentile, bootstrap, floorSplits, ignoreCalibration, seed, r);
		}
	}

	/**
	 * One property: its distance result ↔ references with a bootstrap interval [low, high] (NaN without
	 * bootstrap), the floor, the input's distance (NaN without input) and the gap closed (NaN without input, or
	 * when the input is already within the floor).
	 */
	public record Row(String property, double distance, double low, double high, double floor, double baseline, double gapClosed) {}

	/**
	 * The table of the check.
	 *
	 * @param rows {@link #PATCHES} first, then the {@link Marginals#NAMES}
	 * @param volumetricPatches whether the patches were 3D
	 * @param grid the common voxel size (the result's), or null when calibrations were ignored
	 * @param notes warnings about the references (e.g. pixel sizes far from the result's), one line each
	 */
	public record Report(List<Row> rows, boolean volumetricPatches, VoxelSize grid, int patchDimension, List<String> notes) {

		public Row row(final String property) {
			for (final Row r : rows)
				if (r.property().equals(property)) return r;
			throw new IllegalArgumentException("No row '" + property + "' in the report");
		}

		/** The headline number: the sliced distance of the patches. */
		public double distance() {
			return rows.get(0).distance();
		}

		/** Tab-separated table with a header line, for logs and tests. */
		public String toText() {
			final StringBuilder sb = new StringBuilder("property\tdistance\tlow\thigh\tfloor\tbaseline\tgap closed\n");
			for (final Row r : rows)
				sb.append(String.format(Locale.ROOT, "%s\t%.5g\t%.5g\t%.5g\t%.5g\t%.5g\t%.3f%n", r.property(), r.distance(), r.low(), r.high(), r.floor(),
						r.baseline(), r.gapClosed()));
			return sb.toString();
		}
	}

	/** The references, prepared once: resampled, normalised, sampled, projected and sorted; and the floor. */
	public static final class References {
		final Options options;
		final VoxelSize grid;
		final boolean threeD, volumetric;
		final double[] spacing;
		final double[][] directions;
		final SlicedWasserstein.Projected patches;
		final SlicedWasserstein.Projected[] marginals;
		final double[] floor;
		final int count;
		final List<String> notes;

		References(final Options options, final VoxelSize grid, final boolean threeD, final boolean volumetric, final double[] spacing, final double[][] directions,
				final SlicedWasserstein.Projected patches, final SlicedWasserstein.Projected[] marginals, final double[] floor, final int count, final List<String> notes) {
			this.notes = List.copyOf(notes);
			this.options = options;
			this.grid = grid;
			this.threeD = threeD;
			this.volumetric = volumetric;
			this.spacing = spacing;
			this.directions = directions;
			this.patches = patches;
			this.marginals = marginals;
			this.floor = floor;
			this.count = count;
		}

		public Options options() { return options; }

		/** Number of reference images. */
		public int count() { return count; }

		/**
		 * Warnings about the references, one line each: a reference whose voxels differ from the result's by more
		 * than {@link ReferenceComparison#SAMPLING_MISMATCH}× along an axis (it was resampled with anti-aliasing,
		 * but a reference of much finer or coarser sampling, or of another modality, shows structure at another
		 * resolution, which moves the distance); and a reference whose apparent resolution differs from the
		 * expected one (or, unmatched, from the result's) by more than {@link MatchedResolution#MISMATCH}×.
		 */
		public List<String> notes() { return notes; }

		/** Floor of each row, in report order. */
		public double[] floor() { return floor.clone(); }
	}

	/** {@link #prepare} then {@link #compare}; {@code blurredInput} may be null. */
	public static Report compare(final Volume result, final List<Volume> references, final Volume blurredInput, final Options options, final Monitor monitor) {
		return compare(prepare(references, result, options, monitor), result, blurredInput, monitor);
	}

	/**
	 * Prepares {@code references} (not modified) for comparisons with results shaped and calibrated like
	 * {@code resultLike} (only its dimensionality and voxel size are used).
	 *
	 * @throws IllegalArgumentException with one line for: no references, a reference of the other
	 *         dimensionality, calibrated and uncalibrated images mixed (unless calibrations are ignored), an
	 *         unknown length unit, an image smaller than the patch, a constant image, a non-finite value
	 */
	public static References prepare(final List<Volume> references, final Volume resultLike, final Options o, final Monitor monitor) {
		if (references == null || references.isEmpty())
			throw new IllegalArgumentException("No reference images given: give at least one sharp image of the same kind of structure");
		final boolean threeD = resultLike.is3D();
		for (int i = 0; i < references.size(); i++) {
			final Volume r = references.get(i);
			if (r.is3D() != threeD)
				throw new IllegalArgumentException(refName(i) + " is " + (r.is3D() ? "3D (" + r.nz() + " slices)" : "2D") + " but the result is "
						+ (threeD ? "3D (" + resultLike.nz() + " slices)" : "2D") + ": use references of the same dimensionality");
		}
		final VoxelSize grid = grid(references, resultLike.voxelSize(), o.ignoreCalibration());
		final double[] spacing = spacing(grid == null ? resultLike.voxelSize() : grid);
		final int total = 2 + o.floorSplits();
		int step = 0;
		monitor.progress(step++, total, "Preparing the references");
		final List<Volume> prepared = new ArrayList<>(references.size());
		final List<String> names = new ArrayList<>(references.size());
		final List<String> notes = samplingNotes(references, grid, threeD);
		final double resultFwhm = o.resolution() == null ? MatchedResolution.apparentLateral(resultLike, grid) : Double.NaN;
		for (int i = 0; i < references.size(); i++) {
			monitor.checkCancelled();
			final Volume r = references.get(i);
			checkFinite(r, refName(i));
			if (o.resolution() != null) prepared.add(onGrid(o.resolution().blurred(r, grid, refName(i), notes), grid, o, refName(i)));
			else {
				MatchedResolution.compareUnmatched(r, resultFwhm, grid, refName(i), notes);
				prepared.add(onGrid(r, grid, o, refName(i)));
			}
			names.add(refName(i));
		}
		final boolean volumetric = o.patches().volumetric() && threeD;
		final double[][] directions = SlicedWasserstein.randomDirections(o.patches().dimension(volumetric), o.directions(), mix(o.seed(), 1));
		monitor.progress(step++, total, "Sampling the references");
		final SlicedWasserstein.Projected patches = new SlicedWasserstein.Projected(Patches.sample(prepared, names, o.patches(), o.patchCount(), mix(o.seed(), 2)),
				directions);
		final SlicedWasserstein.Projected[] marginals = marginals(prepared, spacing, o.marginalSamples(), mix(o.seed(), 3));
		// Noise floor: distances between two halves of the reference set, with the sample counts of a comparison.
		final double[] floor = new double[1 + Marginals.NAMES.size()];
		for (int s = 0; s < o.floorSplits(); s++) {
			monitor.checkCancelled();
			monitor.progress(step++, total, "Noise floor " + (s + 1) + " of " + o.floorSplits());
			final List<Volume> a = new ArrayList<>(), b = new ArrayList<>();
			final List<String> an = new ArrayList<>(), bn = new ArrayList<>();
			split(prepared, names, s, mix(o.seed(), 100 + s), a, an, b, bn);
			final long sa = mix(o.seed(), 1000 + 2L * s), sb = mix(o.seed(), 1001 + 2L * s);
			final SlicedWasserstein.Projected pa = new SlicedWasserstein.Projected(Patches.sample(a, an, o.patches(), o.patchCount(), mix(sa, 4)), directions);
			final SlicedWasserstein.Projected pb = new SlicedWasserstein.Projected(Patches.sample(b, bn, o.patches(), o.patchCount(), mix(sb, 2)), directions);
			floor[0] += pa.distance(pb, o.power());
			final SlicedWasserstein.Projected[] ma = marginals(a, spacing, o.marginalSamples(), mix(sa, 5)), mb = marginals(b, spacing, o.marginalSamples(), mix(sb, 3));
			for (int k = 0; k < ma.length; k++) floor[1 + k] += ma[k].distance(mb[k], 1);
		}
		for (int k = 0; k < floor.length; k++) floor[k] /= o.floorSplits();
		monitor.progress(total, total, "References ready");
		return new References(o, grid, threeD, volumetric, spacing, directions, patches, marginals, floor, references.size(), notes);
	}

	/**
	 * The check of {@code result} against prepared references; {@code blurredInput} (may be null) gives the
	 * baseline. Neither is modified.
	 */
	public static Report compare(final References refs, final Volume result, final Volume blurredInput, final Monitor monitor) {
		final Options o = refs.options;
		if (result.is3D() != refs.threeD)
			throw new IllegalArgumentException("The result is " + (result.is3D() ? "3D" : "2D") + " but the references were prepared for " + (refs.threeD ? "3D" : "2D") + " images");
		monitor.checkCancelled();
		final Side out = side(refs, result, "The result", monitor);
		final Side in = blurredInput == null ? null : side(refs, checkedInput(blurredInput, result, refs), "The blurred input", monitor);
		final int rows = 1 + Marginals.NAMES.size();
		final double[] d = new double[rows], base = new double[rows];
		d[0] = out.patches.distance(refs.patches, o.power());
		for (int k = 0; k < out.marginals.length; k++) d[1 + k] = out.marginals[k].distance(refs.marginals[k], 1);
		Arrays.fill(base, Double.NaN);
		if (in != null) {
			base[0] = in.patches.distance(refs.patches, o.power());
			for (int k = 0; k < in.marginals.length; k++) base[1 + k] = in.marginals[k].distance(refs.marginals[k], 1);
		}
		// Bootstrap: resample both samples with replacement (multiplicities). Each resample has its own generator,
		// seeded in order from one stream, so the resamples run in parallel and the result does not depend on the
		// number of threads.
		final double[][] boot = new double[rows][o.bootstrap()];
		final SplittableRandom rnd = new SplittableRandom(mix(o.seed(), 6));
		final long[] seeds = new long[o.bootstrap()];
		for (int b = 0; b < seeds.length; b++) seeds[b] = rnd.nextLong();
		Parallel.forRange(o.bootstrap(), b -> {
			monitor.checkCancelled();
			final SplittableRandom r = new SplittableRandom(seeds[b]);
			final int[] cr = counts(r, out.patches.count()), cf = counts(r, refs.patches.count()), cd = counts(r, refs.patches.directions());
			boot[0][b] = out.patches.distance(refs.patches, cr, cf, cd, o.power());
			for (int k = 0; k < out.marginals.length; k++) {
				final int[] mr = counts(r, out.marginals[k].count()), mf = counts(r, refs.marginals[k].count());
				boot[1 + k][b] = out.marginals[k].distance(refs.marginals[k], mr, mf, 1);
			}
		});
		final List<Row> table = new ArrayList<>(rows);
		for (int k = 0; k < rows; k++) {
			double lo = Double.NaN, hi = Double.NaN;
			if (o.bootstrap() > 0) {
				final double[] i = interval(d[k], boot[k], 0.95);
				lo = i[0];
				hi = i[1];
			}
			final double gap = base[k] - refs.floor[k] > 0 ? (base[k] - d[k]) / (base[k] - refs.floor[k]) : Double.NaN;
			table.add(new Row(k == 0 ? PATCHES : Marginals.NAMES.get(k - 1), d[k], lo, hi, refs.floor[k], base[k], gap));
		}
		return new Report(List.copyOf(table), refs.volumetric, refs.grid, o.patches().dimension(refs.volumetric), refs.notes);
	}

	/** The sliced patch distance of {@code result} alone, without marginals or bootstrap (the cheap watch-mode number). */
	public static double patchDistance(final References refs, final Volume result) {
		final Volume v = onGrid(result, refs.grid, refs.options, "The result");
		final PointSet p = Patches.sample(List.of(v), List.of("The result"), refs.options.patches(), refs.options.patchCount(), mix(refs.options.seed(), 4));
		return new SlicedWasserstein.Projected(p, refs.directions).distance(refs.patches, refs.options.power());
	}

	// -- internals --

	private record Side(SlicedWasserstein.Projected patches, SlicedWasserstein.Projected[] marginals) {}

	private static Side side(final References refs, final Volume image, final String name, final Monitor monitor) {
		final Options o = refs.options;
		final Volume v = onGrid(image, refs.grid, o, name);
		monitor.checkCancelled();
		final PointSet p = Patches.sample(List.of(v), List.of(name), o.patches(), o.patchCount(), mix(o.seed(), 4));
		return new Side(new SlicedWasserstein.Projected(p, refs.directions), marginals(List.of(v), refs.spacing, o.marginalSamples(), mix(o.seed(), 5)));
	}

	private static Volume checkedInput(final Volume input, final Volume result, final References refs) {
		if (input.is3D() != result.is3D())
			throw new IllegalArgumentException("The blurred input is " + (input.is3D() ? "3D" : "2D") + " but the result is " + (result.is3D() ? "3D" : "2D"));
		if (refs.grid != null && !input.voxelSize().isCalibrated())
			throw new IllegalArgumentException("The blurred input has no calibration but the result has (" + refs.grid + "): calibrate the input, or ignore calibrations");
		return input;
	}

	private static SlicedWasserstein.Projected[] marginals(final List<Volume> images, final double[] spacing, final int count, final long seed) {
		final double[][] m = Marginals.sample(images, spacing, count, seed);
		final SlicedWasserstein.Projected[] p = new SlicedWasserstein.Projected[m.length];
		for (int k = 0; k < m.length; k++) p[k] = SlicedWasserstein.Projected.ofValues(m[k]);
		return p;
	}

	/** Resampled to the grid (when there is one) and normalised. */
	static Volume onGrid(final Volume v, final VoxelSize grid, final Options o, final String name) {
		checkFinite(v, name);
		Volume g = v;
		if (grid != null) {
			if (!v.voxelSize().isCalibrated())
				throw new IllegalArgumentException(name + " has no calibration but the result has (" + grid + "): calibrate it, or ignore calibrations");
			g = Resampling.toVoxelSize(v, grid);
		}
		return Normalization.robust(g, o.lowPercentile(), o.highPercentile(), name);
	}

	private static void checkFinite(final Volume v, final String name) {
		final int bad = v.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException(name + " has a non-finite value (" + v.data()[bad] + ") at " + v.position(bad));
	}

	/** The common grid: the result's voxel size, or null when nothing is resampled. */
	static VoxelSize grid(final List<Volume> refs, final VoxelSize result, final boolean ignore) {
		if (ignore) return null;
		for (int i = 0; i < refs.size(); i++) {
			final VoxelSize r = refs.get(i).voxelSize();
			if (r.isCalibrated() != result.isCalibrated())
				throw new IllegalArgumentException(result.isCalibrated()
						? refName(i) + " has no calibration but the result has (" + result + "): calibrate the reference, or ignore calibrations to compare voxel for voxel"
						: "The result has no calibration but " + refName(i).toLowerCase(Locale.ROOT) + " has (" + r + "): calibrate the result, or ignore calibrations to compare voxel for voxel");
			if (r.isCalibrated()) Resampling.microns(r, refName(i));
		}
		if (!result.isCalibrated()) return null;
		Resampling.microns(result, "The result");
		return result;
	}

	/** Voxel-size ratio between a reference and the result above which {@link References#notes} warn. */
	public static final double SAMPLING_MISMATCH = 1.5;

	private static List<String> samplingNotes(final List<Volume> refs, final VoxelSize grid, final boolean threeD) {
		final List<String> notes = new ArrayList<>();
		if (grid == null) return notes;
		for (int i = 0; i < refs.size(); i++) {
			final double[] f = Resampling.scaleFactors(refs.get(i).voxelSize(), grid);
			double worst = 1;
			for (int d = 0; d < (threeD ? 3 : 2); d++) worst = Math.max(worst, Math.max(f[d], 1 / f[d]));
			if (worst > SAMPLING_MISMATCH) {
				final double[] um = Resampling.microns(refs.get(i).voxelSize(), refName(i)), g = Resampling.microns(grid, "The result");
				notes.add(String.format(Locale.ROOT, "%s has %s x %s%s µm voxels, %.2g times %s than the result's %s x %s%s µm; it was resampled with"
						+ " anti-aliasing, but references of a very different sampling or modality show structure at another resolution: prefer references"
						+ " recorded like the result", refName(i), num(um[0]), num(um[1]), threeD ? " x " + num(um[2]) : "", worst,
						f[0] < 1 || f[1] < 1 ? "finer" : "coarser", num(g[0]), num(g[1]), threeD ? " x " + num(g[2]) : ""));
			}
		}
		return notes;
	}

	/** Four significant digits, no trailing zeros. */
	private static String num(final double v) {
		return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).stripTrailingZeros().toPlainString();
	}

	/** {1, dy/dx, dz/dx}. */
	static double[] spacing(final VoxelSize v) {
		return new double[] { 1, v.dy() / v.dx(), v.dz() / v.dx() };
	}

	/** Two halves of the reference set for split s: by image (seeded shuffle), or a single image cut in two. */
	private static void split(final List<Volume> imgs, final List<String> names, final int s, final long seed, final List<Volume> a, final List<String> an,
			final List<Volume> b, final List<String> bn) {
		final int n = imgs.size();
		if (n >= 2) {
			final int[] order = new int[n];
			for (int i = 0; i < n; i++) order[i] = i;
			final SplittableRandom r = new SplittableRandom(seed);
			for (int i = n - 1; i > 0; i--) {
				final int j = r.nextInt(i + 1), t = order[i];
				order[i] = order[j];
				order[j] = t;
			}
			for (int i = 0; i < n; i++) {
				(i < n / 2 ? a : b).add(imgs.get(order[i]));
				(i < n / 2 ? an : bn).add(names.get(order[i]));
			}
			return;
		}
		final Volume v = imgs.get(0);
		final boolean alongX = v.nx() >= v.ny();
		final Volume first = half(v, alongX, false), second = half(v, alongX, true);
		final String axis = alongX ? (s % 2 == 0 ? "left" : "right") : (s % 2 == 0 ? "top" : "bottom");
		final String other = alongX ? (s % 2 == 0 ? "right" : "left") : (s % 2 == 0 ? "bottom" : "top");
		a.add(s % 2 == 0 ? first : second);
		an.add(names.get(0) + " (" + axis + " half, for the noise floor with a single reference)");
		b.add(s % 2 == 0 ? second : first);
		bn.add(names.get(0) + " (" + other + " half, for the noise floor with a single reference)");
	}

	private static Volume half(final Volume v, final boolean alongX, final boolean second) {
		final int nx = alongX ? v.nx() / 2 : v.nx(), ny = alongX ? v.ny() : v.ny() / 2;
		final int ox = alongX && second ? v.nx() - nx : 0, oy = !alongX && second ? v.ny() - ny : 0;
		final Volume h = Volume.zeros(nx, ny, v.nz(), v.voxelSize());
		for (int z = 0; z < v.nz(); z++)
			for (int y = 0; y < ny; y++)
				System.arraycopy(v.data(), ox + v.nx() * (y + oy + v.ny() * z), h.data(), nx * (y + ny * z), nx);
		return h;
	}

	/**
	 * The two-sided {@code level} interval of {@code estimate} from its bootstrap replicates: the percentile
	 * interval of the replicates shifted by their median bias, [d − (m* − q*_lo), d + (q*_hi − m*)] with m* the
	 * replicates' median and q* their (1 ∓ level)/2 quantiles, clamped at 0 (a distance). The percentile interval
	 * itself (Efron &amp; Tibshirani, An Introduction to the Bootstrap, 1993, ch. 13) assumes replicates centred on
	 * the estimate; for a transport distance they are not: a resample with replacement repeats points, which adds
	 * its own sampling distance, so the replicates sit above the estimate (the bootstrap bias estimate of ch. 10)
	 * and the plain percentile interval often missed the estimate. Removing the median bias keeps the spread
	 * and its asymmetry, always contains the estimate, and covers the expected distance at the same sample counts
	 * at about the nominal rate ({@code ReferenceComparisonTest.intervalsHaveNominalCoverage}). It is not an
	 * interval for the population distance at infinite sample size, which the finite-sample estimate overstates
	 * when the two distributions are close: the noise floor is the scale for that (the plain bootstrap is not
	 * consistent at distance 0 either: Sommerfeld &amp; Munk, J. R. Stat. Soc. B 80, 2018).
	 */
	static double[] interval(final double estimate, final double[] replicates, final double level) {
		final double[] sorted = replicates.clone();
		Arrays.sort(sorted);
		final double a = 50 * (1 - level), median = percentileOfSorted(sorted, 50);
		final double lo = estimate - (median - percentileOfSorted(sorted, a)), hi = estimate + (percentileOfSorted(sorted, 100 - a) - median);
		return new double[] { Math.max(0, lo), hi };
	}

	private static int[] counts(final SplittableRandom r, final int n) {
		final int[] c = new int[n];
		for (int i = 0; i < n; i++) c[r.nextInt(n)]++;
		return c;
	}

	/** NumPy's "linear" percentile of an ascending array. */
	static double percentileOfSorted(final double[] s, final double q) {
		return org.parfocal.core.RobustStats.percentileOfSorted(s, q);
	}

	static String refName(final int i) {
		return "Reference " + (i + 1);
	}

	/** SplitMix64 finaliser of seed + stream·φ: independent, reproducible sub-seeds (Steele, Lea &amp; Flood, OOPSLA 2014). */
	static long mix(final long seed, final long stream) {
		long z = seed + stream * 0x9E3779B97F4A7C15L;
		z = (z ^ (z >>> 30)) * 0xBF58476D1CE4E5B9L;
		z = (z ^ (z >>> 27)) * 0x94D049BB133111EBL;
		return z ^ (z >>> 31);
	}
}
