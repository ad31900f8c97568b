#!/usr/bin/python3
"""Golden files for Parfocal's distribution-matching check (package org.parfocal.quality).

Reference libraries: SciPy (Debian python3-scipy 1.10.1), POT -- Python Optimal Transport (Debian python3-pot
0.8.2), NumPy 1.24.2.
Run from the repository root:  /usr/bin/python3 tools/golden/gen_wasserstein.py
Writes src/test/resources/golden/wasserstein/, plain text, one record per line, values with 17 significant
digits (exact round trip of a double):

  w1d.txt       scipy.stats.wasserstein_distance (W1) and ot.wasserstein_1d(p=2) (W2^2) on 1D samples,
                including unequal sizes, weights on one or both sides (not normalised) and ties.
  sliced.txt    ot.sliced_wasserstein_distance with FIXED projection directions (written here, so Java uses
                the same ones) and ot.emd2 exact OT values of the same point sets (W_p^p with cost
                |x - y|^p: metric 'euclidean' for p = 1, 'sqeuclidean' for p = 2).
  percentile.txt numpy.percentile(x, q) (method 'linear', NumPy's default).
  resample.txt  scipy.ndimage.map_coordinates(order=1, mode='nearest') of a small 3D image at the voxel
                centres of another voxel size: source coordinate (i + 0.5) * d_target / d_source - 0.5; along
                shrinking axes after scipy.ndimage.gaussian_filter1d (anti-aliasing, sigma = (t/s - 1)/2).

Record format: a line "case <name> <key=value>..." starts a case; following lines are "<field> v1 v2 ...".
Matrices are written row by row (C order), with their shape in the case line.

POT 0.8.2 note: sliced_wasserstein_distance divides the summed projected costs by its n_projections argument
even when projections are given, so the script passes n_projections = number of given directions.
"""
import os
import numpy as np
import scipy
import scipy.ndimage
import scipy.stats
import ot

OUT = os.path.join("src", "test", "resources", "golden", "wasserstein")


def fmt(a):
    return " ".join("%.17g" % v for v in np.asarray(a, dtype=np.float64).ravel())


def w1d_cases(rng):
    lines = []
    cases = [
        ("equal_sizes", rng.normal(0, 1, 50), rng.normal(0.3, 1.4, 50), None, None),
        ("unequal_sizes", rng.normal(0, 1, 37), rng.normal(-0.5, 0.7, 101), None, None),
        ("both_weighted", rng.normal(1, 2, 23), rng.exponential(1.5, 64), rng.random(23) + 0.1, 3 * rng.random(64) + 0.05),
        ("ties_u_weighted", rng.integers(0, 6, 30).astype(float), rng.integers(1, 8, 17).astype(float), rng.random(30) + 0.2, None),
        ("ties_v_weighted", rng.integers(0, 4, 12).astype(float), rng.normal(2, 1, 9), None, rng.random(9) * 5 + 0.5),
        ("large", rng.exponential(2.0, 1000), rng.normal(2, 1.5, 777), None, None),
        ("single_points", np.array([0.25]), np.array([1.0, 3.5, -2.0]), None, np.array([1.0, 2.0, 1.0])),
    ]
    for name, u, v, uw, vw in cases:
        w1 = scipy.stats.wasserstein_distance(u, v, uw, vw)
        a = None if uw is None else uw / uw.sum()
        b = None if vw is None else vw / vw.sum()
        w2sq = ot.wasserstein_1d(u, v, a, b, p=2)
        lines.append("case %s n=%d m=%d" % (name, len(u), len(v)))
        lines.append("u " + fmt(u))
        lines.append("v " + fmt(v))
        if uw is not None:
            lines.append("uw " + fmt(uw))
        if vw is not None:
            lines.append("vw " + fmt(vw))
        lines.append("scipy_w1 " + fmt([w1]))
        lines.append("pot_w2sq " + fmt([w2sq]))
    return lines


def unit_directions(rng, d, count):
    p = rng.normal(size=(d, count))
    return p / np.sqrt(np.sum(p ** 2, axis=0, keepdims=True))


def sliced_cases(rng):
    lines = []
    cases = [
        # name, Xs, Xt, a, b, p, number of directions
        ("2d_equal_p2", rng.normal(0, 1, (40, 2)), rng.normal(0.5, 1.3, (40, 2)), None, None, 2, 16),
        ("5d_weighted_p2", rng.normal(0, 1, (30, 5)), rng.standard_t(4, (45, 5)) + 0.2, rng.random(30) + 0.1, rng.random(45) + 0.1, 2, 50),
        ("49d_patches_p1", rng.normal(0, 1, (200, 49)), 1.2 * rng.normal(0, 1, (150, 49)) - 0.1, None, None, 1, 32),
        ("3d_unequal_p2", rng.random((25, 3)), rng.random((60, 3)) ** 2, None, None, 2, 200),
    ]
    for name, xs, xt, a, b, p, count in cases:
        n, d = xs.shape
        m = xt.shape[0]
        proj = unit_directions(rng, d, count)  # (d, count), columns are unit vectors
        an = np.full(n, 1.0 / n) if a is None else a / a.sum()
        bn = np.full(m, 1.0 / m) if b is None else b / b.sum()
        sw = ot.sliced_wasserstein_distance(xs, xt, an, bn, n_projections=count, p=p, projections=proj)
        metric = "euclidean" if p == 1 else "sqeuclidean"
        emd = ot.emd2(an, bn, ot.dist(xs, xt, metric=metric), numItermax=10_000_000)
        lines.append("case %s n=%d m=%d d=%d p=%d directions=%d" % (name, n, m, d, p, count))
        lines.append("xs " + fmt(xs))
        lines.append("xt " + fmt(xt))
        if a is not None:
            lines.append("a " + fmt(a))
        if b is not None:
            lines.append("b " + fmt(b))
        lines.append("directions " + fmt(proj.T))  # one direction after the other
        lines.append("pot_sliced " + fmt([sw]))
        lines.append("pot_emd2 " + fmt([emd]))
    return lines


def percentile_cases(rng):
    lines = []
    for name, x in [("normal_1000", rng.normal(5, 2, 1000)), ("small_7", rng.random(7)),
                    ("ties_200", rng.integers(0, 5, 200).astype(float)), ("skewed_4097", rng.exponential(1, 4097) ** 3)]:
        x = x.astype(np.float32).astype(np.float64)  # Java holds pixels as float
        qs = np.array([0.0, 1.0, 25.0, 50.0, 99.5, 100.0])
        lines.append("case %s n=%d" % (name, len(x)))
        lines.append("x " + fmt(x))
        lines.append("q " + fmt(qs))
        lines.append("numpy_percentile " + fmt(np.percentile(x, qs)))
    return lines


def resample_cases(rng):
    lines = []
    # (name, shape (nz, ny, nx), source voxel (dz, dy, dx), target voxel (dz, dy, dx))
    for name, shape, src, dst in [("3d_mixed", (6, 9, 11), (0.3, 0.1, 0.1), (0.2, 0.13, 0.07)),
                                  ("2d_down", (1, 17, 20), (1.0, 0.1, 0.1), (1.0, 0.25, 0.16)),
                                  ("2d_4x", (1, 40, 36), (1.0, 0.13, 0.13), (1.0, 0.52, 0.52))]:
        img = rng.random(shape).astype(np.float32)
        # Output size round-half-up(n * (s / t)), the order of operations Parfocal uses (Java Math.round).
        out_shape = tuple(max(1, int(np.floor(n * (s / t) + 0.5))) for n, s, t in zip(shape, src, dst))
        grids = np.meshgrid(*[(np.arange(o) + 0.5) * t / s - 0.5 for o, s, t in zip(out_shape, src, dst)], indexing="ij")
        # Anti-aliasing of every shrinking axis: Gaussian of sigma = (t/s - 1)/2 source voxels (scikit-image's
        # resize default), mirrored border (mode "reflect"), kernel radius ceil(3 sigma) as Parfocal's Smoothing.
        pre = img.astype(np.float64)
        for axis, (n, s, t) in enumerate(zip(shape, src, dst)):
            sigma = (t / s - 1) / 2 if t > s and n > 1 else 0
            if sigma > 0:
                pre = scipy.ndimage.gaussian_filter1d(pre, sigma, axis=axis, mode="reflect", truncate=np.ceil(3 * sigma) / sigma)
        out = scipy.ndimage.map_coordinates(pre, grids, order=1, mode="nearest")
        lines.append("case %s nx=%d ny=%d nz=%d dx=%r dy=%r dz=%r tx=%r ty=%r tz=%r ox=%d oy=%d oz=%d" % (
            name, shape[2], shape[1], shape[0], src[2], src[1], src[0], dst[2], dst[1], dst[0],
            out_shape[2], out_shape[1], out_shape[0]))
        lines.append("image " + fmt(img))
        lines.append("scipy_map_coordinates " + fmt(out))
    return lines


def write(name, lines):
    header = "# generated by tools/golden/gen_wasserstein.py with scipy %s, POT %s, numpy %s" % (
        scipy.__version__, ot.__version__, np.__version__)
    with open(os.path.join(OUT, name), "w") as f:
        f.write("\n".join([header] + lines) + "\n")


def main():
    os.makedirs(OUT, exist_ok=True)
    rng = np.random.default_rng(20270107)
    write("w1d.txt", w1d_cases(rng))
    write("sliced.txt", sliced_cases(rng))
    write("percentile.txt", percentile_cases(rng))
    write("resample.txt", resample_cases(rng))


if __name__ == "__main__":
    main()
