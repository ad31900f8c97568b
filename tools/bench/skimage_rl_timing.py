#!/usr/bin/python3
"""Seconds per Richardson-Lucy iteration of scikit-image (Debian python3-skimage 0.19.3), for comparison
with Parfocal's deconvolution benchmark (bin/parfocal-bench deconvolution): the same sizes, a 64 x 256 x 256
image with a 33 x 65 x 65 PSF. Not part of the tests or of CI.

Two cases: a float32 image (scikit-image then computes in float32) and a 16-bit image, which it converts to
float64 and computes in float64, as it does for the 16-bit recordings microscope cameras write.
Per iteration = (time of 7 iterations - time of 2 iterations) / 5, median of 3 rounds, so that the set-up of
a call is not counted. Its time-to-quality = 50 of these (its RL has no acceleration).
Usage: /usr/bin/python3 tools/bench/skimage_rl_timing.py [z y x]
"""
import sys
import time

import numpy as np
import skimage
from skimage.restoration import richardson_lucy

shape = tuple(int(v) for v in sys.argv[1:4]) if len(sys.argv) >= 4 else (64, 256, 256)
rng = np.random.default_rng(7)
counts = rng.poisson(50.0, size=shape)
z, y, x = np.mgrid[-16:17, -32:33, -32:33].astype(np.float32)
psf = np.exp(-(x * x / 8 + y * y / 8 + z * z / 32)).astype(np.float32)
psf /= psf.sum()
print(f"scikit-image {skimage.__version__}, numpy {np.__version__}: image {shape}, PSF {psf.shape}")
for dtype in (np.float32, np.uint16):
    image = counts.astype(dtype)

    def run(n):
        t = time.perf_counter()
        out = richardson_lucy(image, psf, num_iter=n, clip=False)
        return time.perf_counter() - t, out.dtype

    per = []
    for _ in range(3):
        a, _ = run(2)
        b, computed = run(7)
        per.append((b - a) / 5)
    per.sort()
    print(f"  {np.dtype(dtype).name} image (computed in {computed}): {per[1]:.3f} s per RL iteration "
          f"(rounds {per[0]:.3f} to {per[2]:.3f}); 50 iterations {50 * per[1]:.1f} s")
    print(f"RESULT {shape[2]} skimage_{np.dtype(dtype).name}_iteration {per[1]:.5f}")
