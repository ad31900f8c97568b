package org.parfocal.beads;

import java.util.ArrayList;
import java.util.Collections;
import java.util.EnumMap;
import java.util.HashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Monitor;
import org.parfocal.core.Parallel;
import org.parfocal.core.RobustStats;
import org.parfocal.core.Smoothing;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

/**
 * Measures a PSF from a recording of sub-resolution fluorescent beads.
 * <ol>
 * <li><b>Detection</b>: the stack is smoothed with a Gaussian of σ = 1 voxel per axis; its background and noise are the
 * median and 1.4826 × MAD of the smoothed voxels (robust: beads are a small fraction of the stack). Every local maximum
 * (26 neighbours; 8 in 2D) above median + {@code threshold} × noise is a candidate. A candidate fainter than
 * {@link #SATELLITE_FRACTION} of a brighter candidate whose box contains it is taken for a side lobe or ring of that
 * bead's PSF and dropped (counted as a satellite); so is one within twice the box of a brighter bead (axial side
 * lobes of a widefield PSF lie beyond a short box).</li>
 * <li><b>Localisation</b>: a Gaussian plus constant is fitted by least squares to the raw voxels around the brightest
 * voxel, first in a ±3 voxel window, then in a window of ±2.5 fitted σ (within the box).</li>
 * <li><b>Rejection</b>, first rule that applies ({@link BeadStatus}): the box leaves the image; the brightest voxel is
 * at the bit-depth maximum; another candidate lies in the box; the fit failed (no convergence, centre more than 2
 * voxels from the brightest voxel, σ wider than half the box); then, among the beads left (at least 4), a modified
 * z-score (Iglewicz &amp; Hoaglin 1993; spread at least {@link #OUTLIER_FLOOR} of the median) of the integrated
 * intensity, then of any of the fitted widths, above {@code outlierZ}.</li>
 * <li><b>Averaging</b>: each accepted bead's box is centred on the voxel nearest its fitted centre, its background
 * (median of the box's faces, or of the stack) is subtracted, it is translated by the remaining sub-voxel offset with the Fourier shift
 * theorem and scaled to unit sum (background: {@link BackgroundMode}); the boxes are combined by mean or median. Negative values (noise after background
 * subtraction) are set to 0, the result is optionally averaged over rings around the axis, and scaled to unit sum.
 * The fitted centre of the beads lands on the centre voxel, the PSF origin of the code base.</li>
 * </ol>
 * Everything is deterministic; loops over voxels and beads run on the caller's {@code Parallelization} context and give
 * the same result for any thread count.
 */
public final class BeadPsf {

	/** A local maximum fainter than this fraction of a brighter bead whose box holds it belongs to that bead's PSF. */
	public static final double SATELLITE_FRACTION = 0.1;
	/** Fewest beads for the robust outlier tests (a median and a MAD of fewer values mean little). */
	public static final int MIN_FOR_OUTLIERS = 4;
	/** Least spread, as a fraction of the median, of the intensity and width z-scores (see {@code RobustStats.modifiedZ}). */
	public static final double OUTLIER_FLOOR = 0.02;
	/** Smoothing before detection, in voxels per axis. */
	static final double DETECTION_SIGMA = 1.0;
	/** FWHM / σ of a Gaussian, 2·√(2 ln 2). */
	static final double FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.log(2));

	private BeadPsf() {}

	/**
	 * What a measurement gives.
	 *
	 * @param psf the averaged PSF, unit sum, odd box, calibrated in µm (null never: no accepted bead is an error)
	 * @param beads every candidate after satellite removal, in order of decreasing brightness
	 * @param background median of the smoothed stack
	 * @param noise robust noise standard deviation of the smoothed stack
	 * @param threshold detection level on the smoothed stack
	 * @param satellites local maxima dropped as parts of a brighter bead's PSF
	 * @param clipped voxels of the average set from negative to 0
	 * @param fwhm lateral x, lateral y and axial FWHM (µm) of the average through its brightest voxel (axial NaN in 2D)
	 * @param fwhmCorrected the same corrected for the bead size ({@link BeadSize}); equal to {@code fwhm} for point-like beads
	 * @param warnings lines for the user (a single bead, large beads)
	 */
	public record Result(Volume psf, List<Bead> beads, double background, double noise, double threshold, int satellites, int clipped,
			double[] fwhm, double[] fwhmCorrected, List<String> warnings) {

		/** Beads that went into the average. */
		public List<Bead> accepted() { return beads.stream().filter(Bead::accepted).toList(); }

		/** Number of beads per status. */
		public Map<BeadStatus, Integer> counts() { return BeadPsf.counts(beads); }
	}

	/**
	 * Default box from the optics: laterally 8 × 0.51·λ/NA (about four Airy rings across), axially 6 axial zero spacings
	 * λ/(n·(1 − cos α)) (Born &amp; Wolf, from memory), both in µm. λ is the longest wavelength in use.
	 */
	public static double[] defaultBox(final Optics o) {
		final double lambda = o.longestWavelength();
		final double n = o.immersionIndex();
		return new double[] { 8 * 0.51 * lambda / o.na(), 6 * lambda / (n * (1 - Math.cos(o.apertureAngle()))) };
	}

	/**
	 * The optics model on the measured PSF's grid (same size and voxel sizes, centred on its centre voxel): what the
	 * measured average should be compared with ({@link #fwhm}, {@link #outerShare}).
	 */
	public static Volume model(final String model, final Optics optics, final Volume psf) {
		return PsfModels.get(model).compute(optics, PsfGrid.of(psf.nx(), psf.ny(), psf.nz(), psf.voxelSize()));
	}

	/** FWHM (µm, x y z; z NaN in 2D) of a PSF through its peak. */
	public static double[] fwhm(final Volume m) {
		return new double[] { Fwhm.lateral(m), Fwhm.lateralY(m), m.nz() > 1 ? Fwhm.axial(m) : Double.NaN };
	}

	/**
	 * Share of a PSF's light (of its sum) farther than {@code radius} µm from the axis through its centre voxel, all
	 * planes together. A flat level left under the beads (a background the estimate missed) puts light everywhere in
	 * the box, so it shows here next to an optics model's share.
	 */
	public static double outerShare(final Volume psf, final double radius) {
		final double dx = psf.voxelSize().dx() * PsfGrid.micronsPer(psf.voxelSize()), dy = psf.voxelSize().dy() * PsfGrid.micronsPer(psf.voxelSize());
		final int nx = psf.nx(), ny = psf.ny(), cx = (nx - 1) / 2, cy = (ny - 1) / 2;
		final float[] d = psf.data();
		double out = 0, all = 0;
		for (int i = 0; i < d.length; i++) {
			final int x = i % nx, y = (i / nx) % ny;
			all += d[i];
			if (Math.hypot((x - cx) * dx, (y - cy) * dy) > radius) out += d[i];
		}
		return all > 0 ? out / all : Double.NaN;
	}

	/**
	 * Measures the averaged PSF of the beads in {@code stack} (not changed).
	 *
	 * @throws IllegalArgumentException one line: uncalibrated stack, a 2D stack for a 3D box or the reverse, a box larger
	 *         than the stack, no bead found (with the threshold) or none accepted (with the count per reason)
	 */
	public static Result measure(final Volume stack, final BeadOptions o, final Monitor monitor) {
		final double um;
		try {
			um = PsfGrid.micronsPer(stack.voxelSize());
		} catch (final IllegalArgumentException e) {
			throw new IllegalArgumentException("The bead stack has no voxel size in nm, µm or mm: give the voxel size in µm (positions and the PSF need it)");
		}
		final boolean is3D = stack.nz() > 1;
		if (!is3D && o.boxZ() > 0)
			throw new IllegalArgumentException("The bead stack has one plane but the box is " + BeadOptions.fmt(o.boxZ())
					+ " µm deep: give a z-stack, or set the axial box to 0 for a 2D PSF");
		if (is3D && o.boxZ() == 0)
			throw new IllegalArgumentException("The bead stack has " + stack.nz() + " planes but the axial box is 0 (2D): give the axial box size in µm");
		final int bad = stack.firstNonFinite();
		if (bad >= 0) throw new IllegalArgumentException("The bead stack has a non-finite value (" + stack.data()[bad] + ") at " + stack.position(bad));
		final double dx = stack.voxelSize().dx() * um, dy = stack.voxelSize().dy() * um, dz = stack.voxelSize().dz() * um;
		final int[] h = { Math.max(2, (int) Math.round(o.boxXY() / (2 * dx))), Math.max(2, (int) Math.round(o.boxXY() / (2 * dy))),
				is3D ? Math.max(1, (int) Math.round(o.boxZ() / (2 * dz))) : 0 };
		final int[] n = stack.shape();
		if (2 * h[0] + 1 > n[0] || 2 * h[1] + 1 > n[1] || 2 * h[2] + 1 > n[2])
			throw new IllegalArgumentException("No beads can be measured: the box (" + (2 * h[0] + 1) + " x " + (2 * h[1] + 1) + " x " + (2 * h[2] + 1)
					+ " voxels) is larger than the stack (" + n[0] + " x " + n[1] + " x " + n[2] + "); make the box smaller");
		MemoryBudget.require(8L * stack.size(), "smoothing the bead stack");
		monitor.progress(0, 4, "detecting beads");

		// -- detection --
		final Volume smooth = Smoothing.gaussian(stack, DETECTION_SIGMA, DETECTION_SIGMA, is3D ? DETECTION_SIGMA : 0);
		final double[] noise = backgroundAndNoise(smooth.data());
		final double stackBackground = o.background() == BackgroundMode.STACK ? stackMode(smooth.data()) : Double.NaN;
		final double level = noise[0] + o.threshold() * noise[1];
		monitor.checkCancelled();
		final List<int[]> maxima = localMaxima(smooth, level);
		if (maxima.isEmpty())
			throw new IllegalArgumentException(String.format(Locale.ROOT,
					"No beads found: no local maximum of the smoothed stack rises above the threshold %.4g (background %.4g + %s x noise %.4g); lower the threshold",
					level, noise[0], BeadOptions.fmt(o.threshold()), noise[1]));
		if (maxima.size() > 200_000)
			throw new IllegalArgumentException("Over 200000 local maxima above the threshold: the stack is not a sparse bead recording, or the threshold is far too low");
		final float[] s = smooth.data();
		maxima.sort((a, b) -> Float.compare(s[b[3]], s[a[3]]));
		final List<int[]> kept = new ArrayList<>();
		final CellIndex cells = new CellIndex(h);
		int satellites = 0;
		final int[] twice = { 2 * h[0], 2 * h[1], 2 * h[2] };
		for (final int[] c : maxima) {
			boolean satellite = false;
			for (final int[] k : cells.near(c))
				if (inBox(c, k, twice) && s[c[3]] - noise[0] < SATELLITE_FRACTION * (s[k[3]] - noise[0])) {
					satellite = true;
					break;
				}
			if (satellite) satellites++;
			else {
				kept.add(c);
				cells.add(c);
			}
		}
		monitor.progress(1, 4, "localising " + kept.size() + " beads");

		// -- localisation and per-bead rules --
		final Bead[] beads = new Bead[kept.size()];
		final double[][] sigmas = new double[kept.size()][];
		final double sat = o.saturationLevel();
		Parallel.forRange(kept.size(), i -> {
			monitor.checkCancelled();
			final int[] c = kept.get(i);
			boolean crowded = false;
			for (final int[] k : cells.near(c))
				if (k != c && inBox(c, k, h)) crowded = true;
			final BeadAndSigma b = measureOne(stack, i + 1, c, h, sat, crowded, new double[] { dx, dy, dz }, stackBackground);
			beads[i] = b.bead;
			sigmas[i] = b.sigma;
		});
		monitor.checkCancelled();

		// -- robust outliers among the beads left --
		final List<Integer> left = new ArrayList<>();
		for (int i = 0; i < beads.length; i++) if (beads[i].accepted()) left.add(i);
		if (o.outlierZ() > 0 && left.size() >= MIN_FOR_OUTLIERS) {
			final double[] flux = new double[left.size()];
			for (int j = 0; j < flux.length; j++) flux[j] = beads[left.get(j)].flux();
			final double[] zf = RobustStats.modifiedZ(flux, OUTLIER_FLOOR);
			final double[][] zw = new double[3][];
			for (int d = 0; d < (is3D ? 3 : 2); d++) {
				final double[] w = new double[left.size()];
				for (int j = 0; j < w.length; j++) w[j] = sigmas[left.get(j)][d];
				zw[d] = RobustStats.modifiedZ(w, OUTLIER_FLOOR);
			}
			for (int j = 0; j < flux.length; j++) {
				final int i = left.get(j);
				if (Math.abs(zf[j]) > o.outlierZ()) {
					beads[i] = beads[i].with(BeadStatus.INTENSITY_OUTLIER, String.format(Locale.ROOT, "intensity outlier: robust z %.1f (limit %s)", zf[j],
							BeadOptions.fmt(o.outlierZ())));
					continue;
				}
				int worst = -1;
				for (int d = 0; d < 3; d++)
					if (zw[d] != null && Math.abs(zw[d][j]) > o.outlierZ() && (worst < 0 || Math.abs(zw[d][j]) > Math.abs(zw[worst][j]))) worst = d;
				if (worst >= 0)
					beads[i] = beads[i].with(BeadStatus.WIDTH_OUTLIER, String.format(Locale.ROOT, "width outlier: robust z %.1f of the %s width (limit %s)",
							zw[worst][j], "xyz".charAt(worst), BeadOptions.fmt(o.outlierZ())));
			}
		}
		final List<Bead> all = List.of(beads);
		final List<Integer> use = new ArrayList<>();
		for (int i = 0; i < beads.length; i++) if (beads[i].accepted()) use.add(i);
		if (use.isEmpty()) throw new IllegalArgumentException(noneAccepted(all, h, new double[] { dx, dy, dz }));
		final List<String> warnings = new ArrayList<>();
		if (use.size() == 1)
			warnings.add("Only one bead was accepted: the PSF carries all of that bead's noise; record more beads, or loosen the rejection settings");
		monitor.progress(2, 4, "aligning and averaging " + use.size() + " beads");

		// -- alignment and averaging --
		final int bx = 2 * h[0] + 1, by = 2 * h[1] + 1, bz = 2 * h[2] + 1, bn = bx * by * bz;
		MemoryBudget.require(4L * bn * (use.size() + 2), "the aligned bead boxes");
		final float[][] boxes = new float[use.size()][];
		for (int j = 0; j < use.size(); j++) {
			monitor.checkCancelled();
			final Bead b = beads[use.get(j)];
			final int[] c = { (int) Math.round(b.x()), (int) Math.round(b.y()), (int) Math.round(b.z()) };
			final float[] box = extract(stack, c, h);
			final float bg = (float) b.background();
			for (int i = 0; i < bn; i++) box[i] -= bg;
			final float[] shifted = FourierShift.shift(box, bx, by, bz, b.x() - c[0], b.y() - c[1], is3D ? b.z() - c[2] : 0);
			double sum = 0;
			for (final float v : shifted) sum += v;
			if (!(sum > 0)) throw new IllegalStateException("Bead " + b.id() + " has no intensity above its background");
			final float inv = (float) (1 / sum);
			for (int i = 0; i < bn; i++) shifted[i] *= inv;
			boxes[j] = shifted;
		}
		final float[] avg = new float[bn];
		if (o.averaging() == Averaging.MEAN || boxes.length == 1) {
			Parallel.forRange(bn, i -> {
				double a = 0;
				for (final float[] b : boxes) a += b[i];
				avg[i] = (float) (a / boxes.length);
			});
		} else {
			Parallel.forRange(bn, i -> {
				final float[] col = new float[boxes.length];
				for (int j = 0; j < col.length; j++) col[j] = boxes[j][i];
				avg[i] = (float) RobustStats.median(col, col.length);
			});
		}
		int clipped = 0;
		for (int i = 0; i < bn; i++)
			if (avg[i] < 0) {
				avg[i] = 0;
				clipped++;
			}
		Volume psf = Volume.wrap(avg, bx, by, bz, VoxelSize.microns(dx, dy, dz));
		if (o.symmetrize()) psf = Symmetry.radial(psf);
		final double total = psf.sum();
		final float[] p = psf.data();
		for (int i = 0; i < p.length; i++) p[i] = (float) (p[i] / total);
		monitor.progress(3, 4, "measuring the average");
		final double[] fwhm = { Fwhm.lateral(psf), Fwhm.lateralY(psf), is3D ? Fwhm.axial(psf) : Double.NaN };
		final double[] corrected = fwhm.clone();
		final String size = BeadSize.check(o.beadDiameter(), fwhm[0]);
		if (size != null) {
			warnings.add(size);
			for (int d = 0; d < 3; d++) corrected[d] = BeadSize.corrected(fwhm[d], o.beadDiameter());
		}
		monitor.progress(4, 4, "done");
		return new Result(psf, all, noise[0], noise[1], level, satellites, clipped, fwhm, corrected, Collections.unmodifiableList(warnings));
	}

	/** Number of beads per status, every status present (0 when none). */
	static Map<BeadStatus, Integer> counts(final List<Bead> beads) {
		final Map<BeadStatus, Integer> m = new EnumMap<>(BeadStatus.class);
		for (final BeadStatus st : BeadStatus.values()) m.put(st, 0);
		for (final Bead b : beads) m.merge(b.status(), 1, Integer::sum);
		return m;
	}

	private static String noneAccepted(final List<Bead> beads, final int[] h, final double[] d) {
		final StringBuilder s = new StringBuilder("None of the " + beads.size() + " beads found could be used (");
		boolean first = true;
		for (final Map.Entry<BeadStatus, Integer> e : counts(beads).entrySet()) {
			if (e.getValue() == 0) continue;
			if (!first) s.append(", ");
			s.append(e.getKey().key()).append(' ').append(e.getValue());
			first = false;
		}
		s.append(")");
		final Map<BeadStatus, Integer> c = counts(beads);
		if (2 * (c.get(BeadStatus.EDGE) + c.get(BeadStatus.NEIGHBOUR)) >= beads.size())
			s.append(String.format(Locale.ROOT, "; the box (%.3g x %.3g x %.3g µm) is too large for this stack: make it smaller", (2 * h[0] + 1) * d[0],
					(2 * h[1] + 1) * d[1], (2 * h[2] + 1) * d[2]));
		else s.append("; loosen the rejection settings");
		return s.toString();
	}

	private record BeadAndSigma(Bead bead, double[] sigma) {}

	private static BeadAndSigma measureOne(final Volume v, final int id, final int[] cand, final int[] h, final double sat, final boolean crowded,
			final double[] d, final double stackBackground) {
		final boolean is3D = v.nz() > 1;
		// the brightest raw voxel next to the smoothed maximum
		int[] c = { cand[0], cand[1], cand[2] };
		float peak = Float.NEGATIVE_INFINITY;
		for (int z = Math.max(0, cand[2] - 1); z <= Math.min(v.nz() - 1, cand[2] + 1); z++)
			for (int y = Math.max(0, cand[1] - 1); y <= Math.min(v.ny() - 1, cand[1] + 1); y++)
				for (int x = Math.max(0, cand[0] - 1); x <= Math.min(v.nx() - 1, cand[0] + 1); x++)
					if (v.get(x, y, z) > peak) {
						peak = v.get(x, y, z);
						c = new int[] { x, y, z };
					}
		GaussianFit.Fit f = GaussianFit.fit(v, c, new int[] { Math.min(3, h[0]), Math.min(3, h[1]), Math.min(3, h[2]) },
				new double[] { 1.5, 1.5, 1.5 });
		if (f != null) {
			final int[] w = { window(f.sx(), h[0]), window(f.sy(), h[1]), is3D ? window(f.sz(), h[2]) : 0 };
			final GaussianFit.Fit g = GaussianFit.fit(v, c, w, new double[] { f.sx(), f.sy(), is3D ? f.sz() : 1 });
			f = g;
		}
		String fitProblem = null;
		if (f == null) fitProblem = "the Gaussian fit did not converge";
		else {
			final double off = Math.max(Math.abs(f.cx() - c[0]), Math.max(Math.abs(f.cy() - c[1]), Math.abs(f.cz() - c[2])));
			if (off > 2) fitProblem = String.format(Locale.ROOT, "the fitted centre is %.1f voxels from the brightest voxel", off);
			else if (f.sx() > h[0] || f.sy() > h[1] || (is3D && f.sz() > h[2]))
				fitProblem = "the fitted width is more than half the box";
			else if (!(f.amplitude() > 0)) fitProblem = "the fitted amplitude is not positive";
		}
		final double px = fitProblem == null ? f.cx() : c[0], py = fitProblem == null ? f.cy() : c[1], pz = fitProblem == null ? f.cz() : c[2];
		final int[] r = { (int) Math.round(px), (int) Math.round(py), (int) Math.round(pz) };
		final boolean inside = r[0] - h[0] >= 0 && r[1] - h[1] >= 0 && r[2] - h[2] >= 0 && r[0] + h[0] < v.nx() && r[1] + h[1] < v.ny()
				&& r[2] + h[2] < v.nz();
		double bg = Double.NaN, flux = Double.NaN;
		if (inside) {
			final float[] box = extract(v, r, h);
			bg = Double.isNaN(stackBackground) ? borderMedian(box, 2 * h[0] + 1, 2 * h[1] + 1, 2 * h[2] + 1) : stackBackground;
			double sum = 0;
			for (final float x : box) sum += x - bg;
			flux = sum;
		}
		final double fx = f == null ? Double.NaN : FWHM_PER_SIGMA * f.sx() * d[0], fy = f == null ? Double.NaN : FWHM_PER_SIGMA * f.sy() * d[1];
		final double fz = f == null || !is3D ? Double.NaN : FWHM_PER_SIGMA * f.sz() * d[2];
		BeadStatus st = BeadStatus.ACCEPTED;
		String why = "accepted";
		if (!inside) {
			st = BeadStatus.EDGE;
			why = "edge: the PSF box crosses the image border";
		} else if (peak >= sat) {
			st = BeadStatus.SATURATED;
			why = "saturated: the brightest voxel is at the bit-depth maximum " + BeadOptions.fmt(sat);
		} else if (crowded) {
			st = BeadStatus.NEIGHBOUR;
			why = "neighbour: another bead lies inside the PSF box";
		} else if (fitProblem != null) {
			st = BeadStatus.FIT_FAILED;
			why = "fit failed: " + fitProblem;
		}
		final double[] sigma = f == null ? new double[] { Double.NaN, Double.NaN, Double.NaN } : new double[] { f.sx(), f.sy(), f.sz() };
		final Bead b = new Bead(id, px, py, pz, px * d[0], py * d[1], pz * d[2], peak, bg, flux, fx, fy, fz, st, why);
		return new BeadAndSigma(b, sigma);
	}

	private static int window(final double sigma, final int half) {
		return Math.max(2, Math.min(half, (int) Math.ceil(2.5 * sigma)));
	}

	/** The box of half-sizes h centred on voxel c, which must lie inside the volume. */
	static float[] extract(final Volume v, final int[] c, final int[] h) {
		final int bx = 2 * h[0] + 1, by = 2 * h[1] + 1, bz = 2 * h[2] + 1;
		final float[] box = new float[bx * by * bz];
		final float[] d = v.data();
		for (int z = 0; z < bz; z++)
			for (int y = 0; y < by; y++)
				System.arraycopy(d, (c[0] - h[0]) + v.nx() * ((c[1] - h[1] + y) + v.ny() * (c[2] - h[2] + z)), box, bx * (y + by * z), bx);
		return box;
	}

	/** Median of the voxels on the faces of a box (the four sides of each plane, and the first and last planes in 3D). */
	static double borderMedian(final float[] box, final int bx, final int by, final int bz) {
		final float[] f = new float[box.length];
		int m = 0;
		for (int z = 0; z < bz; z++)
			for (int y = 0; y < by; y++)
				for (int x = 0; x < bx; x++)
					if (x == 0 || y == 0 || x == bx - 1 || y == by - 1 || (bz > 1 && (z == 0 || z == bz - 1))) f[m++] = box[x + bx * (y + by * z)];
		return RobustStats.median(f, m);
	}

	/** Median and robust noise σ (1.4826 × MAD; the mean absolute deviation × 1.2533 when the MAD is 0) of at most ~4 M voxels taken at a fixed stride. */
	static double[] backgroundAndNoise(final float[] v) {
		final int stride = Math.max(1, v.length / 4_000_000);
		final int m = (v.length + stride - 1) / stride;
		final float[] sample = new float[m];
		for (int i = 0, j = 0; j < m; i += stride, j++) sample[j] = v[i];
		final double med = RobustStats.median(sample, m);
		final float[] dev = new float[m];
		double meanAd = 0;
		for (int j = 0; j < m; j++) {
			dev[j] = (float) Math.abs(sample[j] - med);
			meanAd += dev[j];
		}
		double sigma = RobustStats.MAD_TO_SIGMA * RobustStats.median(dev, m);
		if (!(sigma > 0)) sigma = 1.2533 * meanAd / m;
		return new double[] { med, sigma };
	}

	/** Half-sample mode of at most ~4 M voxels taken at a fixed stride: the background level of a sparse bead stack. */
	static double stackMode(final float[] v) {
		final int stride = Math.max(1, v.length / 4_000_000);
		final int m = (v.length + stride - 1) / stride;
		final float[] sample = new float[m];
		for (int i = 0, j = 0; j < m; i += stride, j++) sample[j] = v[i];
		return RobustStats.halfSampleMode(sample, m);
	}

	/** {x, y, z, index} of every voxel above {@code level} that is a maximum of its 26 (8 in 2D) neighbours; ties go to the first in storage order. */
	static List<int[]> localMaxima(final Volume v, final double level) {
		final int nx = v.nx(), ny = v.ny(), nz = v.nz();
		final float[] d = v.data();
		final List<List<int[]>> perPlane = new ArrayList<>(Collections.nCopies(nz, null));
		Parallel.forRange(nz, z -> {
			final List<int[]> found = new ArrayList<>();
			for (int y = 0; y < ny; y++)
				for (int x = 0; x < nx; x++) {
					final int i = x + nx * (y + ny * z);
					final float c = d[i];
					if (!(c > level)) continue;
					boolean max = true;
					for (int zz = Math.max(0, z - 1); max && zz <= Math.min(nz - 1, z + 1); zz++)
						for (int yy = Math.max(0, y - 1); max && yy <= Math.min(ny - 1, y + 1); yy++)
							for (int xx = Math.max(0, x - 1); xx <= Math.min(nx - 1, x + 1); xx++) {
								final int j = xx + nx * (yy + ny * zz);
								if (j == i) continue;
								if (d[j] > c || (d[j] == c && j < i)) {
									max = false;
									break;
								}
							}
					if (max) found.add(new int[] { x, y, z, i });
				}
			perPlane.set(z, found);
		});
		final List<int[]> all = new ArrayList<>();
		for (final List<int[]> l : perPlane) all.addAll(l);
		return all;
	}

	private static boolean inBox(final int[] a, final int[] b, final int[] h) {
		return Math.abs(a[0] - b[0]) <= h[0] && Math.abs(a[1] - b[1]) <= h[1] && Math.abs(a[2] - b[2]) <= h[2];
	}

	/** Candidates hashed by box-sized cells, so that "is there another one in my box" looks at 27 cells only. */
	private static final class CellIndex {
		private final int[] size;
		private final Map<Long, List<int[]>> cells = new HashMap<>();

		CellIndex(final int[] h) {
			size = new int[] { 2 * h[0] + 1, 2 * h[1] + 1, 2 * h[2] + 1 };
		}

		private long key(final int cx, final int cy, final int cz) {
			return ((long) cx * 2_000_003L + cy) * 2_000_003L + cz;
		}

		void add(final int[] c) {
			cells.computeIfAbsent(key(c[0] / size[0], c[1] / size[1], c[2] / size[2]), k -> new ArrayList<>()).add(c);
		}

		List<int[]> near(final int[] c) {
			final List<int[]> out = new ArrayList<>();
			final int cx = c[0] / size[0], cy = c[1] / size[1], cz = c[2] / size[2];
			for (int z = cz - 1; z <= cz + 1; z++)
				for (int y = cy - 1; y <= cy + 1; y++)
					for (int x = cx - 1; x <= cx + 1; x++) {
						final List<int[]> l = cells.get(key(x, y, z));
						if (l != null) out.addAll(l);
					}
			return out;
		}
	}
}
