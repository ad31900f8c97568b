#!/usr/bin/python3
"""Independent check of Parfocal's OME-Zarr output, and a Zarr written by another program for Parfocal to read.

Run from the repository root with Debian's python3-zarr (zarr 2.13, numcodecs 0.11):

    /usr/bin/python3 tools/zarr/read_with_python_zarr.py

1. Opens src/test/resources/zarr/written-here.zarr (written by ZarrSamples.main) with Python zarr and writes
   what it finds -- array shape, chunks, dtype, compressor, the OME-Zarr (NGFF 0.4) axes and scale, a checksum
   and a few values -- to src/test/resources/zarr/written-here.python.json. ZarrInteropTest compares it with what
   Parfocal meant to write.
2. Writes src/test/resources/zarr/python-written.zarr: a 3D uint16 image (z, y, x) made by zarr itself, zlib,
   "." dimension separator, with NGFF 0.4 multiscales metadata (micrometre scale 0.3, 0.12, 0.12), and its values'
   sum and a few samples to python-written.json, for ZarrInteropTest to read back.
"""
import json
import os
import shutil

import numcodecs
import numpy as np
import zarr

ROOT = "src/test/resources/zarr"

# 1. read ours
g = zarr.open_group(os.path.join(ROOT, "written-here.zarr"), mode="r")
ms = g.attrs["multiscales"][0]
a = g[ms["datasets"][0]["path"]]
data = a[...]
scale = [t["scale"] for t in ms["datasets"][0]["coordinateTransformations"] if t["type"] == "scale"][0]
report = {
    "reader": "zarr " + zarr.__version__ + ", numcodecs " + numcodecs.__version__,
    "shape": list(a.shape),
    "chunks": list(a.chunks),
    "dtype": str(a.dtype),
    "compressor": a.compressor.get_config() if a.compressor is not None else None,
    "ngff_version": ms["version"],
    "axes": ms["axes"],
    "scale": scale,
    "sum": float(data.astype(np.float64).sum()),
    "samples": {
        "0,0,0,0,0": float(data[0, 0, 0, 0, 0]),
        "0,1,5,11,19": float(data[0, 1, 5, 11, 19]),
        "0,0,4,8,8": float(data[0, 0, 4, 8, 8]),
        "0,1,2,3,17": float(data[0, 1, 2, 3, 17]),
    },
    "complete": g.attrs["parfocal"]["complete"],
    "provenance_command": g.attrs["parfocal"]["provenance"]["command"],
}
with open(os.path.join(ROOT, "written-here.python.json"), "w") as f:
    json.dump(report, f, indent=2, sort_keys=True)
    f.write("\n")

# 2. write one for Parfocal to read
out = os.path.join(ROOT, "python-written.zarr")
shutil.rmtree(out, ignore_errors=True)
rng = np.random.default_rng(20261202)
img = rng.integers(0, 65535, size=(7, 9, 11), dtype=np.uint16)
root = zarr.open_group(out, mode="w")
arr = root.create_dataset("scale0", data=img, chunks=(3, 4, 5), compressor=numcodecs.Zlib(level=3), dimension_separator=".")
root.attrs["multiscales"] = [{
    "version": "0.4",
    "name": "python-written",
    "axes": [{"name": "z", "type": "space", "unit": "micrometer"},
             {"name": "y", "type": "space", "unit": "micrometer"},
             {"name": "x", "type": "space", "unit": "micrometer"}],
    "datasets": [{"path": "scale0", "coordinateTransformations": [{"type": "scale", "scale": [0.3, 0.12, 0.12]}]}],
}]
with open(os.path.join(ROOT, "python-written.json"), "w") as f:
    json.dump({"shape_zyx": list(img.shape), "sum": int(img.astype(np.int64).sum()),
               "samples": {"6,8,10": int(img[6, 8, 10]), "0,0,0": int(img[0, 0, 0]), "3,4,5": int(img[3, 4, 5])}},
              f, indent=2, sort_keys=True)
    f.write("\n")
print("wrote", os.path.join(ROOT, "written-here.python.json"), "and", out)
