#!/usr/bin/env python3
"""Offline look at stopping criteria from a split recording, on the independent scenes.

For each scene (made by make_scenes.py) the recording is turned into counts n = round(max((y − offset)/g + s, 0)),
s = (read noise / g)² (the shifted-Poisson approximation of Poisson–Gaussian noise, common practice), and split
by binomial thinning (p = ½, seeded) into two independent parts A and B with the same mean up to the factor p
(common practice for Poisson counts). Accelerated Richardson–Lucy (Biggs & Andrews, Appl. Opt. 36, 1997) with
non-circulant edges (object on the image plus half a PSF each side, data on the image window, normalised by
Hᵀ1; Bertero & Boccacci, Astron. Astrophys. 437, 2005, from memory) runs on the full counts and on part A,
100 iterations, from a flat start, with the true background.

Every iterate x_k of the run on A is scored by C_W(k) = Σ_f W(f) |F[H x_k + b_A − (p / (1 − p)) n_B](f)|²
(F the FFT of the image window, H the PSF's transfer function on that grid). Because n_B is independent of A,
the expectation of C_W(k) is Σ_f W(f) |F[H x_k + b_A − E n_A](f)|² plus a constant: an unbiased estimate, up to
a constant, of the W-weighted error of the re-blurred iterate (the argument of hold-out validation; the
held-out likelihood of HoldOutStop is the Poisson version of W = 1). W = 1 weighs the error of the prediction
of new data; W = 1/(|H|² + α) and W = 1/|H|² where |H| > t (0 elsewhere) weigh the error of the object itself
within the band the optics pass. With FOLD=A and FOLD=B (environment) the roles of the parts are swapped, so
the two folds can be summed by the summary.

Printed per scene and criterion: the iterate it picks on A and its loss against A's own best iterate (truth
scaled by p), and the loss of the full run at round(c · pick) against the full run's best iterate; then a
summary over the scenes for factors c. The line 'true best of A' shows what a perfect criterion on A would give.
No Parfocal code is used (numpy/scipy only), so it can be compared with the Java HoldOutStop.
Usage: [SEED=7] FOLD=A /usr/bin/python3 tools/scenes/split_criteria.py SCENE_DIR OUT_DIR [scene,scene,...]
       /usr/bin/python3 tools/scenes/split_criteria.py --summary OUT_DIR
(Debian python3-numpy, python3-scipy, python3-tifffile; about 75 s per scene and fold on 2 cores.)
"""
import glob
import json
import os
import sys

import numpy as np
import tifffile
from scipy import fft

P_SPLIT = 0.5
ITERATIONS = 100
SEED = int(os.environ.get('SEED', '7'))  # of the split
FACTORS = (1.0, 1.1, 1.17, 1.25)


def load(d, name):
    j = json.load(open(f'{d}/{name}.json'))
    rec = tifffile.imread(f'{d}/{name}-recording.tif').astype(np.float64)
    truth = tifffile.imread(f'{d}/{name}-truth.tif').astype(np.float64)
    psf = tifffile.imread(f'{d}/{name}-psf.tif').astype(np.float64)
    bg = tifffile.imread(f'{d}/{name}-background.tif').astype(np.float64)
    return j, rec, truth, psf / psf.sum(), bg


class Blur:
    """Non-circulant blur: object on the image plus half a PSF each side, data on the image window."""

    def __init__(self, psf, shape):
        self.margin = [s // 2 for s in psf.shape]
        self.obj = tuple(s + 2 * m for s, m in zip(shape, self.margin))
        self.grid = tuple(fft.next_fast_len(o + q - 1, real=True) for o, q in zip(self.obj, psf.shape))
        self.window = tuple(slice(m, m + s) for m, s in zip(self.margin, shape))
        self.cut = tuple(slice(0, o) for o in self.obj)
        self.otf = fft.rfftn(centred(psf, self.grid))
        mask = np.zeros(self.obj)
        mask[self.window] = 1
        self.ht1 = np.maximum(self.apply(mask, np.conj(self.otf)), 1e-6)

    def apply(self, x, otf):
        g = np.zeros(self.grid)
        g[self.cut] = x
        return fft.irfftn(fft.rfftn(g) * otf, self.grid, workers=2)[self.cut]

    def forward(self, x):
        return self.apply(x, self.otf)[self.window]


def centred(psf, shape):
    g = np.zeros(shape)
    g[tuple(slice(0, s) for s in psf.shape)] = psf
    return np.roll(g, [-(s // 2) for s in psf.shape], axis=(0, 1, 2))


def accelerated_rl(blur, y, b, iterations):
    """Yields (iterate on the image window, re-blurred iterate + background) for k = 1 … iterations."""
    x = np.full(blur.obj, max(y.mean() - np.mean(b), 1e-3))
    x_prev = x.copy()
    g1 = g2 = None
    for _ in range(iterations):
        a = 0.0
        if g1 is not None and g2 is not None:
            a = float(np.clip((g1 * g2).sum() / max((g2 * g2).sum(), 1e-30), 0, 0.999))
        pred = np.maximum(x + a * (x - x_prev), 0)
        ratio = np.zeros(blur.obj)
        ratio[blur.window] = y / np.maximum(blur.forward(pred) + b, 1e-6 * y.mean())
        new = pred * blur.apply(ratio, np.conj(blur.otf)) / blur.ht1
        g2, g1 = g1, new - pred
        x_prev, x = x, new
        yield x[blur.window].copy(), blur.forward(x) + b


def psnr(x, truth):
    return -10 * np.log10(((x - truth) ** 2).mean())


def weights(psf, shape):
    h = np.abs(fft.rfftn(centred(psf, shape)))
    w = {'W=1 (prediction)': np.ones_like(h)}
    for alpha in (1e-4, 1e-3, 1e-2):
        w['W=1/(|H|^2+%g)' % alpha] = 1 / (h ** 2 + alpha)
    for t in (0.3, 0.1, 0.03, 0.01):
        w['W=1/|H|^2, |H|>%g' % t] = np.where(h > t, 1 / np.maximum(h, 1e-9) ** 2, 0)
    return w


def run(scene_dir, out_dir, names, fold):
    p = P_SPLIT
    for name in names:
        j, rec, truth, psf, bg = load(scene_dir, name)
        g = j['gain_adu_per_photon']
        shift = (j['read_noise_adu'] / g) ** 2
        n = np.round(np.maximum((rec - j['offset_adu']) / g + shift, 0))
        blur = Blur(psf, rec.shape)
        full = np.array([psnr(x, truth) for x, _ in accelerated_rl(blur, n, bg + shift, ITERATIONS)])
        n_a = np.random.default_rng(SEED).binomial(n.astype(np.int64), p).astype(float)
        n_b = n - n_a
        if fold == 'B':
            n_a, n_b = n_b, n_a
        held = p / (1 - p) * n_b
        w = weights(psf, rec.shape)
        half = np.ones(w['W=1 (prediction)'].shape)
        half[..., 1:] = 2  # the half spectrum of rfftn counts the other half too (a constant factor elsewhere)
        scores = {k: [] for k in w}
        part = []
        for x, model in accelerated_rl(blur, n_a, p * (bg + shift), ITERATIONS):
            part.append(psnr(x, p * truth))
            d = np.abs(fft.rfftn(model - held)) ** 2 * half
            for k, wk in w.items():
                scores[k].append(float((wk * d).sum()))
        np.savez(f'{out_dir}/{name}-fold{fold}.npz', full=full, part=np.array(part),
                 names=np.array(list(w)), scores=np.array([scores[k] for k in w]))
        print(name, 'fold', fold, 'done', flush=True)


def summary(out_dir):
    files = sorted(glob.glob(out_dir + '/*-foldA.npz'))
    table = {}
    for f in files:
        a = np.load(f)
        fb = f.replace('-foldA', '-foldB')
        b = np.load(fb) if os.path.exists(fb) else None
        crit = {str(k): s for k, s in zip(a['names'], a['scores'])}
        if b is not None:
            crit.update({'2 folds, ' + str(k): s + t for k, s, t in zip(a['names'], a['scores'], b['scores'])})
        full, part = a['full'], a['part']
        kb, ka = int(np.argmax(full)) + 1, int(np.argmax(part)) + 1
        name = f.split('/')[-1][:-len('-foldA.npz')]
        print(f'{name}: full run best @{kb}, part A best @{ka}')
        picks = {'true best of A': ka}
        for k, s in crit.items():
            picks[k] = int(np.argmin(s)) + 1
            print(f'    {k:34s} picks {picks[k]:3d}  on A {part[picks[k] - 1] - part[ka - 1]:+.2f} dB')
        for k, pick in picks.items():
            for c in FACTORS:
                it = min(len(full), max(1, round(c * pick)))
                table.setdefault((k, c), []).append(full[it - 1] - full[kb - 1])
    print('\nfull run at round(c · pick) against its best iterate, over', len(files), 'scenes')
    for (k, c), v in table.items():
        v = np.array(v)
        print(f'  {k:44s} c={c:<5g} within 0.5 dB {np.sum(v > -0.5):2d}, within 0.2 dB {np.sum(v > -0.2):2d},'
              f' worst {v.min():+.2f}, mean {v.mean():+.2f}')


if __name__ == '__main__':
    if sys.argv[1] == '--summary':
        summary(sys.argv[2])
    else:
        scene_dir, out_dir = sys.argv[1], sys.argv[2]
        os.makedirs(out_dir, exist_ok=True)
        names = sys.argv[3].split(',') if len(sys.argv) > 3 else sorted(
            f.split('/')[-1][:-5] for f in glob.glob(scene_dir + '/*.json'))
        run(scene_dir, out_dir, names, os.environ.get('FOLD', 'A'))
