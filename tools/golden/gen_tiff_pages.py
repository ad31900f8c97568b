"""Writes small multi-page TIFFs (one IFD per plane, no ImageJ description) with tifffile (Debian
python3-tifffile), for TiffCheckTest: a complete 4-page 16-bit stack, and a zlib-compressed 3-page stack.
Run from the repository root: /usr/bin/python3 tools/golden/gen_tiff_pages.py"""
import numpy as np
import tifffile

out = "src/test/resources/golden/tiff/"
rng = np.random.default_rng(13)
pages = rng.integers(0, 4000, size=(4, 16, 12), dtype=np.uint16)
# one page per plane, plain TIFF (not ImageJ's contiguous layout), uncompressed
tifffile.imwrite(out + "pages-4x16x12-u16.tif", pages, photometric="minisblack", metadata=None, contiguous=False)
tifffile.imwrite(out + "pages-3x16x12-u16-zlib.tif", pages[:3], photometric="minisblack", metadata=None, compression="zlib")
with tifffile.TiffFile(out + "pages-4x16x12-u16.tif") as t:
    for p in t.pages:
        print("page header at", p.offset, "pixels at", p.dataoffsets, "bytes", p.databytecounts)
