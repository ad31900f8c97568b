#!/usr/bin/env python3
"""Offline look at stopping rules on the held-out curves of the scene table.

Input: the CSV files written by the Java experiment org.parfocal.deconv.StopCurves (one per scene, background
and split seed: full-data PSNR per iteration, the held-out log-likelihood of the run on half the photons, and
its terms per image row). For each rule, the loss against the full data's best iterate (dB) is summarised over
the files of each background. Rules: the held-out peak k* with the patience of HoldOutStop (8), k* times a
constant, and the one-standard-error rule of cross-validation (Breiman, Friedman, Olshen & Stone, Classification
and Regression Trees, 1984: the earliest iterate whose score is within m standard errors of the peak's; the
standard error of the difference from the per-row terms, rows taken as independent).
Usage: /usr/bin/python3 tools/scenes/stop_rules.py CURVE_DIR   (Debian python3-numpy)
"""
import collections
import glob
import sys

import numpy as np


def peak(L, patience=8):
    best = 0
    for k in range(1, len(L)):
        if k - best > patience:
            break
        if L[k] > L[best]:
            best = k
    return best


def one_se(L, R, kstar, m):
    for k in range(1, kstar + 1):
        d = R[k] - R[kstar]
        if L[k] >= L[kstar] - m * np.sqrt(len(d)) * d.std(ddof=1):
            return k
    return kstar


def main(directory):
    losses = collections.defaultdict(list)
    rows = []
    for f in sorted(glob.glob(directory + '/*.csv')):
        scene, bg, seed = f.split('/')[-1][:-4].rsplit('-', 2)
        a = np.loadtxt(f, delimiter=',', comments='#')
        psnr, L, R = a[:, 1], a[:, 2], a[:, 3:]
        kb = int(np.nanargmax(psnr[1:])) + 1
        ks = peak(L)
        rules = {'k*': ks}
        for c in (1.25, 1.5, 2.0):
            rules['k* x%.2f' % c] = ks * c
        for m in (0.5, 1, 2):
            rules['1-SE m=%g' % m] = one_se(L, R, int(np.argmax(L)), m)
        for name, k in rules.items():
            k = int(min(len(L) - 1, max(1, round(k))))
            losses[(bg, name)].append(psnr[k] - psnr[kb])
        rows.append((bg, scene, seed, ks, rules['1-SE m=1'], kb, psnr[ks] - psnr[kb]))
    for r in rows:
        print('%-5s %-26s seed %s  k*=%3d  1-SE=%3d  best iterate %3d  loss at k* %+.2f dB' % r)
    for bg in sorted({b for b, _ in losses}):
        print('background', bg)
        for (b, name), v in losses.items():
            if b == bg:
                v = np.array(v)
                print('  %-12s within 0.5 dB of the best iterate: %2d of %2d   mean %+.2f   worst %+.2f dB' % (name, np.sum(v >= -0.5), len(v), v.mean(), v.min()))


if __name__ == '__main__':
    main(sys.argv[1])
