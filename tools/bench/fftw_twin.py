#!/usr/bin/python3
"""Two yardsticks for Parfocal's deconvolution benchmark (bin/parfocal-bench deconvolution), on the same padded
grid as Parfocal uses for a z x y x image with a 33 x 65 x 65 PSF (each size + PSF - 1, rounded up to the next
5-smooth number):

1. the FFTW bound: 4 real 3D transforms (2 rfftn + 2 irfftn), float32, through pyfftw (Debian python3-pyfftw,
   FFTW 3.3.10) with FFTW_MEASURE plans (planning not counted, printed) and the given number of threads;
2. the numpy/SciPy RL twin: one Richardson-Lucy iteration written plainly with scipy.fft (pocketfft, workers =
   threads), float32, the OTF cached, on the padded grid with the recording in one corner (RL with a
   non-circulant window, Bertero & Boccacci 2005), the way a Python user with SciPy writes it.

Medians of 5 timings after one warm-up. Prints human lines and "RESULT <size> <key> <seconds>" lines that
tools/bench/run-all turns into ratios. Not part of the tests or of CI.
Usage: /usr/bin/python3 tools/bench/fftw_twin.py [z y x] [threads]
"""
import sys
import time

import numpy as np
import pyfftw
import scipy
import scipy.fft as sfft

shape = tuple(int(v) for v in sys.argv[1:4]) if len(sys.argv) >= 4 else (64, 256, 256)
threads = int(sys.argv[4]) if len(sys.argv) >= 5 else 2
kernel = (33, 65, 65)


def smooth5(n):
    while True:
        m = n
        for p in (2, 3, 5):
            while m % p == 0:
                m //= p
        if m == 1:
            return n
        n += 1


grid = tuple(smooth5(n + k - 1) for n, k in zip(shape, kernel))
print(f"pyfftw {pyfftw.__version__}, scipy {scipy.__version__}, numpy {np.__version__}: image {shape}, PSF {kernel}, "
      f"padded {grid}, {threads} thread(s)")


def median_time(f, reps=5):
    f()
    t = []
    for _ in range(reps):
        s = time.perf_counter()
        f()
        t.append(time.perf_counter() - s)
    t.sort()
    return t[len(t) // 2]


# 1. FFTW bound
a = pyfftw.empty_aligned(grid, dtype="float32")
a[:] = np.random.default_rng(1).random(grid, dtype=np.float32)
s = time.perf_counter()
fwd = pyfftw.builders.rfftn(a, threads=threads, planner_effort="FFTW_MEASURE", avoid_copy=True)
spec = fwd.output_array
inv = pyfftw.builders.irfftn(spec, s=grid, threads=threads, planner_effort="FFTW_MEASURE", avoid_copy=True)
planning = time.perf_counter() - s


def four():
    for _ in range(2):
        fwd()
        inv()


bound = median_time(four)
print(f"  FFTW bound (4 transforms, FFTW_MEASURE, planning {planning:.1f} s): {bound:.3f} s")
print(f"RESULT {shape[2]} py_fftw_bound_{threads} {bound:.5f}")

# 2. the numpy/SciPy RL twin
rng = np.random.default_rng(7)
image = rng.poisson(50.0, size=shape).astype(np.float32)
z, y, x = np.mgrid[-16:17, -32:33, -32:33].astype(np.float32)
psf = np.exp(-(x * x / 8 + y * y / 8 + z * z / 32)).astype(np.float32)
psf /= psf.sum()
k = np.zeros(grid, np.float32)
k[:kernel[0], :kernel[1], :kernel[2]] = psf
k = np.roll(k, [-(c // 2) for c in kernel], axis=(0, 1, 2))
otf = sfft.rfftn(k, workers=threads).astype(np.complex64)
window = tuple(slice(0, n) for n in shape)
sensitivity = sfft.irfftn(np.conj(otf) * sfft.rfftn(np.pad(np.ones(shape, np.float32), [(0, g - n) for g, n in zip(grid, shape)]),
                                                     workers=threads), s=grid, workers=threads).astype(np.float32)
sensitivity = np.maximum(sensitivity, 1e-6)
estimate = np.full(grid, image.mean(), np.float32)


def rl_iteration():
    global estimate
    blurred = sfft.irfftn(sfft.rfftn(estimate, workers=threads) * otf, s=grid, workers=threads)
    ratio = np.zeros(grid, np.float32)
    ratio[window] = image / np.maximum(blurred[window], 1e-6)
    estimate = estimate * sfft.irfftn(sfft.rfftn(ratio, workers=threads) * np.conj(otf), s=grid, workers=threads) / sensitivity


twin = median_time(rl_iteration)
assert estimate.dtype == np.float32
print(f"  numpy/SciPy RL twin: {twin:.3f} s per iteration = {twin / bound:.2f} x the FFTW bound")
print(f"RESULT {shape[2]} py_twin_{threads} {twin:.5f}")
