#!/usr/bin/python3
"""Independent test scenes for Parfocal (issue 14): objects, PSFs and camera simulated here with numpy/scipy,
sharing no code with Parfocal.

    /usr/bin/python3 tools/scenes/make_scenes.py [OUTPUT_FOLDER]      (default target/scenes)

For every scene NAME it writes NAME-recording.tif (uint16 camera values, z y x), NAME-psf.tif (float32, unit
sum, the true PSF of the simulation), NAME-truth.tif (float32, the object in photons, on the recording's
grid) and NAME.json (all true parameters); and references/FAMILY/FAMILY-reference-I.tif, three unmatched sharp
references per object family (other seeds, no blur, no noise) for the reference check and its stopping rule. SHA256SUMS beside this script lists the files of a run with Debian
bookworm's numpy 1.24 / scipy 1.10; `--check` compares a new run with it.

PSFs (scalar, own implementations):
 - widefield, high-angle scalar defocus: h(r, z) = |∫_0^α J0(k n r sin θ) e^{i k n z cos θ} √cos θ sin θ dθ|²
   (the scalar Debye integral; Born & Wolf, Principles of Optics, 7th ed., 1999, §8.8; √cos θ the aplanatic
   apodisation, common practice);
 - widefield, paraxial: h(r, z) = |∫_0^1 J0(k NA r ρ) e^{-i k z NA² ρ² / (2n)} ρ dρ|² (paraxial defocus of a
   circular pupil, Born & Wolf §8.8 / Stokseth, J. Opt. Soc. Am. 59(10), 1969);
 - confocal: excitation PSF at λ_ex times the emission PSF at λ_em convolved laterally with the pinhole disc
   (Wilson, Confocal Microscopy, 1990; common practice);
 - depth-aberrated: the paraxial-free pupil integral with the optical path difference of an index mismatch
   between immersion n_i and sample n_s for a source at depth d: OPD(ρ) = d (√(n_s² − NA²ρ²) − √(n_i² − NA²ρ²))
   (Gibson & Lanni, J. Opt. Soc. Am. A 8(10), 1991, the sample-layer terms), focus shift then re-centred on the
   axial maximum.
Camera: Poisson(photons) · gain (ADU per photon) + Gaussian read noise (read_noise_e electrons · gain) + offset,
rounded and clipped to 0..65535 (16-bit).
"""
import hashlib
import json
import os
import sys

import numpy as np
from scipy import ndimage, signal, special
import tifffile

NZ, NY, NX = 32, 96, 96          # recording
PAD = (8, 16, 16)                # object margin on each side (light from outside the field enters)
PSF_SIM = (31, 63, 63)           # PSF of the simulation (±3 µm defocus, ±3.1 µm laterally: light beyond is not simulated)
PSF_GIVEN = (31, 63, 63)         # PSF given to the deconvolution (the same: the true PSF)
DXY, DZ = 0.1, 0.2               # µm


def radial_psf(kind, na, lam, n, zs, rmax, p):
    """Intensity PSF on a fine radial grid: returns (r, h[z, r])."""
    k = 2 * np.pi / lam
    r = np.arange(0, rmax + 2 * DXY, DXY / 4)
    if kind == "paraxial":
        rho = np.linspace(0, 1, 801)
        w = np.full(rho.size, 1.0); w[0] = w[-1] = 0.5
        w *= rho * (rho[1] - rho[0])
        bes = special.j0(k * na * np.outer(r, rho))
        h = np.empty((len(zs), r.size))
        for i, z in enumerate(zs):
            ph = np.exp(-1j * k * z * na ** 2 * rho ** 2 / (2 * n))
            h[i] = np.abs(bes @ (w * ph)) ** 2
        return r, h
    # high-angle scalar (Debye) with optional index-mismatch OPD
    alpha = np.arcsin(min(na / n, 0.9999))
    th = np.linspace(0, alpha, 801)
    w = np.full(th.size, 1.0); w[0] = w[-1] = 0.5
    w *= np.sqrt(np.cos(th)) * np.sin(th) * (th[1] - th[0])
    opd = 0
    if kind == "mismatch":
        s = n * np.sin(th)   # n sin θ = NA ρ
        opd = p["depth_um"] * (np.sqrt(np.maximum(p["n_sample"] ** 2 - s ** 2, 0)) - np.sqrt(n ** 2 - s ** 2))
    bes = special.j0(k * n * np.outer(r, np.sin(th)))
    h = np.empty((len(zs), r.size))
    for i, z in enumerate(zs):
        ph = np.exp(1j * k * (n * z * np.cos(th) + opd))
        h[i] = np.abs(bes @ (w * ph)) ** 2
    return r, h


def to_grid(r, h, shape):
    nz, ny, nx = shape
    yy, xx = np.mgrid[0:ny, 0:nx]
    rr = np.hypot((yy - ny // 2) * DXY, (xx - nx // 2) * DXY)
    out = np.empty(shape)
    for i in range(nz):
        out[i] = np.interp(rr, r, h[i])
    return out


def widefield(kind, p, shape, lam):
    nz = shape[0]
    extra = 12 if kind == "mismatch" else 0     # room to re-centre after the focus shift
    zs = (np.arange(nz + 2 * extra) - (nz + 2 * extra) // 2) * DZ
    rmax = np.hypot(shape[1] // 2, shape[2] // 2) * DXY
    r, h = radial_psf(kind, p["na"], lam, p["n_immersion"], zs, rmax, p)
    if extra:
        peak = int(np.argmax(h[:, 0]))
        peak = min(max(peak, nz // 2), len(zs) - nz + nz // 2)
        h = h[peak - nz // 2: peak - nz // 2 + nz]
        p["focus_shift_planes"] = int(peak - (len(zs) // 2))
    return to_grid(r, h, shape)


def make_psf(p, shape):
    if p["model"] in ("debye", "paraxial", "mismatch"):
        h = widefield(p["model"], p, shape, p["emission_um"])
    elif p["model"] == "confocal":
        ex = widefield("debye", p, shape, p["excitation_um"])
        em = widefield("debye", p, shape, p["emission_um"])
        au = 1.22 * p["emission_um"] / p["na"]
        rad = p["pinhole_au"] * au / 2
        yy, xx = np.mgrid[-int(rad / DXY) - 1:int(rad / DXY) + 2, -int(rad / DXY) - 1:int(rad / DXY) + 2]
        disc = (np.hypot(yy, xx) * DXY <= rad).astype(float)
        em = np.stack([signal.fftconvolve(pl, disc, mode="same") for pl in em])
        h = ex * np.maximum(em, 0)
    else:
        raise ValueError(p["model"])
    h = np.maximum(h, 0)
    return h / h.sum()


def crop_center(a, shape):
    sl = tuple(slice((s - t) // 2, (s - t) // 2 + t) for s, t in zip(a.shape, shape))
    return a[sl]


# ---------------------------------------------------------------- objects (on the padded grid, arbitrary units)
def filaments(rng, shape):
    nz, ny, nx = shape
    obj = np.zeros(shape)
    for _ in range(14):
        t = np.linspace(0, 1, 4000)
        p0 = rng.uniform([nz * 0.25, 0, 0], [nz * 0.75, ny, nx])
        d = rng.normal(size=3); d[0] *= 0.15; d /= np.linalg.norm(d)
        length = rng.uniform(60, 140)
        bend = rng.normal(scale=[2, 12, 12], size=(2, 3))
        pts = p0 + np.outer(t * length, d) + np.outer(np.sin(np.pi * t), bend[0]) + np.outer(np.sin(2 * np.pi * t), bend[1])
        idx = np.round(pts).astype(int)
        ok = np.all((idx >= 0) & (idx < np.array(shape)), axis=1)
        idx = idx[ok]
        np.add.at(obj, (idx[:, 0], idx[:, 1], idx[:, 2]), rng.uniform(0.5, 1.0) / 30)
    return ndimage.gaussian_filter(obj, (0.5, 0.6, 0.6))


def nuclei(rng, shape):
    nz, ny, nx = shape
    zz, yy, xx = np.mgrid[0:nz, 0:ny, 0:nx].astype(float)
    obj = np.zeros(shape)
    tex = ndimage.gaussian_filter(rng.normal(size=shape), 1.5)
    tex /= tex.std()
    for _ in range(22):
        c = rng.uniform([nz * 0.3, 0, 0], [nz * 0.7, ny, nx])
        ax = rng.uniform([3, 9, 9], [6, 18, 18])
        q = ((zz - c[0]) / ax[0]) ** 2 + ((yy - c[1]) / ax[1]) ** 2 + ((xx - c[2]) / ax[2]) ** 2
        body = 1 / (1 + np.exp(np.minimum((q - 1) * 8, 50)))
        obj = np.maximum(obj, body * rng.uniform(0.4, 1.0))
    obj *= np.clip(1 + 0.35 * tex, 0.2, None)
    return ndimage.gaussian_filter(obj, 0.7)


def puncta(rng, shape):
    nz, ny, nx = shape
    obj = np.zeros(shape)
    n = 90
    pos = rng.uniform([2, 0, 0], [nz - 2, ny, nx], size=(n, 3)).astype(int)
    np.add.at(obj, tuple(pos.T), rng.uniform(0.2, 1.0, size=n))
    return ndimage.gaussian_filter(obj, (0.6, 0.8, 0.8))


OBJECTS = {"filaments": filaments, "nuclei": nuclei, "puncta": puncta}

BASE = {"na": 1.3, "n_immersion": 1.518, "emission_um": 0.52, "voxel_xy_um": DXY, "voxel_z_um": DZ}
PSFS = {
    "widefield": dict(BASE, model="debye"),
    "paraxial": dict(BASE, model="paraxial"),
    "confocal": dict(BASE, model="confocal", excitation_um=0.488, pinhole_au=1.0),
    "depth": dict(BASE, model="mismatch", na=1.2, n_sample=1.33, depth_um=8.0),
}

# name: object, psf, peak photons (brightest noise-free voxel of the blurred object, background excluded),
# background kind and level (photons), gain ADU/photon, read noise electrons, offset ADU, seed
SCENES = [
    ("filaments-widefield-200", "filaments", "widefield", 200, "zero", 0, 2.2, 1.6, 100, 1),
    ("filaments-paraxial-2000", "filaments", "paraxial", 2000, "constant", 40, 0.8, 1.2, 200, 2),
    ("filaments-confocal-50", "filaments", "confocal", 50, "zero", 0, 3.5, 2.0, 100, 3),
    ("filaments-depth-500", "filaments", "depth", 500, "gradient", 25, 1.6, 1.5, 400, 4),
    ("nuclei-widefield-500", "nuclei", "widefield", 500, "constant", 30, 1.8, 1.4, 100, 5),
    ("nuclei-depth-100", "nuclei", "depth", 100, "gradient", 8, 2.6, 1.8, 300, 6),
    ("nuclei-confocal-2000", "nuclei", "confocal", 2000, "gradient", 60, 0.6, 1.0, 500, 7),
    ("puncta-paraxial-20", "puncta", "paraxial", 20, "constant", 2, 4.0, 2.5, 100, 8),
    ("puncta-depth-1000", "puncta", "depth", 1000, "zero", 0, 1.2, 1.4, 100, 9),
    ("puncta-confocal-200", "puncta", "confocal", 200, "gradient", 5, 2.0, 1.6, 200, 10),
]


def background(kind, level, shape):
    if kind == "zero":
        return np.zeros(shape)
    if kind == "constant":
        return np.full(shape, float(level))
    nz, ny, nx = shape
    zz, yy, xx = np.mgrid[0:nz, 0:ny, 0:nx].astype(float)
    # slowly varying: 0.5..1.5 of the level across the field, a lateral ramp plus a broad bump
    ramp = 0.5 + 0.6 * xx / (nx - 1) + 0.2 * np.exp(-(((yy - ny / 2) / ny) ** 2 + ((xx - nx / 3) / nx) ** 2) * 4)
    return level * ramp * (1 + 0.1 * (zz / (nz - 1) - 0.5))


def make_scene(row, out, psf_cache):
    name, objk, psfk, peak, bkind, blevel, gain, read_e, offset, seed = row
    rng = np.random.default_rng(1000 + seed)
    full = tuple(n + 2 * p for n, p in zip((NZ, NY, NX), PAD))
    obj = OBJECTS[objk](rng, full)
    params = dict(PSFS[psfk])
    if psfk not in psf_cache:
        psf_cache[psfk] = (make_psf(params, PSF_SIM), params)
    psf, params = psf_cache[psfk]
    blurred = signal.fftconvolve(obj, psf, mode="same")
    win = tuple(slice(p, p + n) for p, n in zip(PAD, (NZ, NY, NX)))
    scale = peak / blurred[win].max()
    truth = (obj * scale)[win].astype(np.float32)
    mean = np.maximum(blurred[win] * scale, 0) + background(bkind, blevel, (NZ, NY, NX))
    photons = rng.poisson(mean)
    adu = photons * gain + rng.normal(scale=read_e * gain, size=mean.shape) + offset
    rec = np.clip(np.round(adu), 0, 65535).astype(np.uint16)
    given = crop_center(psf, PSF_GIVEN)
    given = (given / given.sum()).astype(np.float32)
    meta = {
        "name": name, "object": objk, "psf": params, "psf_simulated_shape_zyx": list(PSF_SIM),
        "psf_given_shape_zyx": list(PSF_GIVEN),
        "psf_given_light_fraction": float(crop_center(psf, PSF_GIVEN).sum()),
        "peak_photons": peak, "background": {"kind": bkind, "level_photons": blevel,
                                              "mean_photons": float(background(bkind, blevel, (NZ, NY, NX)).mean())},
        "gain_adu_per_photon": gain, "read_noise_electrons": read_e, "read_noise_adu": read_e * gain,
        "offset_adu": offset, "seed": 1000 + seed, "shape_zyx": [NZ, NY, NX],
        "voxel_um_zyx": [DZ, DXY, DXY], "saturated_voxels": int((rec == 65535).sum()),
        "truth_units": "photons per voxel before blur (recording = Poisson(truth * psf + background) * gain + read noise + offset)",
    }
    files = {}
    for suffix, arr in (("recording", rec), ("psf", given), ("truth", truth)):
        f = os.path.join(out, f"{name}-{suffix}.tif")
        tifffile.imwrite(f, arr, imagej=True, resolution=(1 / DXY, 1 / DXY),
                         metadata={"spacing": DZ, "unit": "micron", "axes": "ZYX"})
        files[suffix] = f
    with open(os.path.join(out, name + ".json"), "w") as fh:
        json.dump(meta, fh, indent=1, sort_keys=True)
        fh.write("\n")
    # background as its own file (the true b(x) for scoring the background options)
    f = os.path.join(out, f"{name}-background.tif")
    tifffile.imwrite(f, background(bkind, blevel, (NZ, NY, NX)).astype(np.float32), imagej=True,
                     resolution=(1 / DXY, 1 / DXY), metadata={"spacing": DZ, "unit": "micron", "axes": "ZYX"})
    return name


REFERENCES = 3                   # sharp reference stacks per object family


def make_references(objk, out):
    """Unmatched sharp references of one family: the same object model with other seeds, unblurred and noise-free,
    on the recording's grid and calibration, scaled to 1000 at their brightest voxel (the comparison normalises)."""
    folder = os.path.join(out, "references", objk)
    os.makedirs(folder, exist_ok=True)
    full = tuple(n + 2 * p for n, p in zip((NZ, NY, NX), PAD))
    win = tuple(slice(p, p + n) for p, n in zip(PAD, (NZ, NY, NX)))
    names = []
    for i in range(REFERENCES):
        rng = np.random.default_rng(5000 + 10 * sorted(OBJECTS).index(objk) + i)
        ref = OBJECTS[objk](rng, full)[win]
        ref = (ref * (1000 / ref.max())).astype(np.float32)
        f = os.path.join(folder, f"{objk}-reference-{i + 1}.tif")
        tifffile.imwrite(f, ref, imagej=True, resolution=(1 / DXY, 1 / DXY), metadata={"spacing": DZ, "unit": "micron", "axes": "ZYX"})
        names.append(os.path.relpath(f, out))
    return names


def sha256(path):
    with open(path, "rb") as fh:
        return hashlib.sha256(fh.read()).hexdigest()


def main(argv):
    check = "--check" in argv
    args = [a for a in argv if not a.startswith("--")]
    out = args[0] if args else "target/scenes"
    os.makedirs(out, exist_ok=True)
    only = os.environ.get("PARFOCAL_SCENES")
    cache = {}
    for row in SCENES:
        if only and row[0] not in only.split(","):
            continue
        print("scene", make_scene(row, out, cache), flush=True)
    refs = []
    for objk in sorted(OBJECTS):
        if only and not any(r[1] == objk and r[0] in only.split(",") for r in SCENES):
            continue
        refs += make_references(objk, out)
    lines = [f"{sha256(os.path.join(out, f))}  {f}\n" for f in sorted(os.listdir(out)) if f.endswith((".tif", ".json"))]
    lines += [f"{sha256(os.path.join(out, f))}  {f}\n" for f in sorted(refs)]
    with open(os.path.join(out, "SHA256SUMS"), "w") as fh:
        fh.writelines(lines)
    ref = os.path.join(os.path.dirname(os.path.abspath(__file__)), "SHA256SUMS")
    if check and os.path.exists(ref):
        with open(ref) as fh:
            same = fh.read() == "".join(lines)
        print("checksums", "match" if same else "DIFFER from " + ref)
        return 0 if same else 1
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
