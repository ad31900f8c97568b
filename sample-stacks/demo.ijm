// Parfocal demo on the bundled sample stacks (an invented quillwort cell on the invented Halden W-60
// widefield microscope; see sample-stacks/README.md). Runs headless:
//     bin/parfocal-headless sample-stacks/demo.ijm parfocal-demo-output
// The argument is the output folder (relative to the current directory); existing files are never
// overwritten: a new file name is chosen instead.
// Grows with Parfocal: today it computes the microscope's PSF from its optics, simulates the recording
// from the sharp object and that PSF (a self-check), and deconvolves the bundled recording.

out = getArgument();
if (out == "") out = "parfocal-demo-output";
if (!startsWith(out, "/") && indexOf(out, ":") != 1) out = getDir("cwd") + out;
if (!endsWith(out, "/")) out = out + "/";
samples = getDir("cwd") + "sample-stacks/";
if (!File.exists(samples + "quillwort-truth.tif")) exit("Run this from the Parfocal folder: " + samples + " has no sample stacks");
File.makeDirectory(out);
if (!File.isDirectory(out)) exit("Cannot create the output folder " + out);

function newPath(folder, name) {
    // name.ext, or name-2.ext, name-3.ext ... if taken: created empty at once (atomically), so two demos
    // writing into one folder at the same time never get the same name; this demo then fills it
    return call("org.parfocal.core.OutputFiles.reserve", folder, name);
}

setBatchMode(true);
open(samples + "quillwort-truth.tif");
open(samples + "quillwort-psf.tif");
open(samples + "quillwort-widefield.tif");

// 1. The PSF of the invented Halden W-60 (60x/1.2 water) imaging 4 um deep into cytoplasm of index 1.38.
run("PSF from Optics...", "model=gibson-lanni modality=widefield na=1.2 immersion_index=1.333 immersion_index_design=1.333 sample_index=1.38 coverslip_index=1.522 coverslip_index_design=1.522 coverslip_thickness=170 coverslip_thickness_design=170 working_distance=150 depth=4 emission=0.52 excitation=0.488 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=31 size_z=21");
psf = getTitle();
path = newPath(out, "halden-w60-psf.tif");
saveAs("Tiff", path);
psf = getTitle();
print("wrote " + path);
getStatistics(area, mean, min, max);
selectImage("quillwort-psf.tif");
getStatistics(area2, mean2, min2, max2);
print("PSF from optics vs bundled PSF: peak " + max + " vs " + max2);
if (abs(max - max2) > 1e-6 * max2) exit("The PSF from optics differs from the bundled one");

// 2. Simulate the acquisition: object (x) PSF + background, Poisson noise, camera offset.
run("Convolve with PSF...", "image=quillwort-truth.tif psf=" + psf + " boundary=zero normalize background=3 photons=1 seed=20261201 offset=100");
path = newPath(out, "quillwort-simulated.tif");
saveAs("Tiff", path);
print("wrote " + path);

// Check: the simulation rebuilds the bundled 16-bit recording up to rounding.
simulated = getTitle(); // saveAs renamed it
maxDiff = 0;
for (z = 1; z <= nSlices; z++) {
    selectImage("quillwort-widefield.tif"); setSlice(z);
    selectImage(simulated); setSlice(z);
    for (y = 0; y < getHeight(); y += 7) for (x = 0; x < getWidth(); x += 7) {
        selectImage("quillwort-widefield.tif"); w = getPixel(x, y);
        selectImage(simulated); s = getPixel(x, y);
        maxDiff = maxOf(maxDiff, abs(w - s));
    }
}
print("simulated vs bundled recording: max |difference| on a 7-voxel grid = " + maxDiff + " (16-bit rounding allows 0.5)");
if (maxDiff > 0.5) exit("The simulation does not reproduce the bundled recording");
// 3. Deconvolve the bundled recording with the default run: only the image, the PSF and the camera offset (100,
//    known for this camera) are given, so Deconvolve runs accelerated Richardson-Lucy on two random halves of the
//    photons and stops where each half's result is closest to the other half within the optics' band (at most
//    100 iterations; the full data then get 1.17 times as many), the background chosen by the PSF
//    (this widefield PSF keeps its light out of focus, so the darkest region), extended edges; its notes give the camera gain and read noise estimated from the recording.
run("Deconvolve...", "image=quillwort-widefield.tif psf=" + psf + " offset=100");
path = newPath(out, "quillwort-deconvolved.tif");
saveAs("Tiff", path);
print("wrote " + path);
info = getMetadata("Info");
lines = split(info, "\n;");
seen = "";
for (i = 0; i < lines.length; i++)
    if (startsWith(String.trim(lines[i]), "Noise model") || startsWith(String.trim(lines[i]), "Held-out stop")
            || startsWith(String.trim(lines[i]), "Background estimated"))
        if (indexOf(seen, "|" + String.trim(lines[i]) + "|") < 0) {
            print("deconvolve: " + String.trim(lines[i]));
            seen = seen + "|" + String.trim(lines[i]) + "|";
        }
Stack.getStatistics(voxels, mean, min, max);
print("deconvolved: mean " + d2s(mean, 3) + ", max " + d2s(max, 1) + " (estimates: deconvolution can show artefacts that look like structure)");

// 4. The record of how it was made: an HTML report, and a macro that rebuilds it from the files.
path = newPath(out, "quillwort-deconvolved-report.html");
run("Write Report...", "file=[" + path + "] replace"); // replaces only the empty file reserved above
print("wrote " + path);
path = newPath(out, "quillwort-deconvolved-rebuild.ijm");
run("Export Provenance as Macro...", "macro=[" + path + "] replace"); // likewise
print("wrote " + path);

// 5. Where to stop: the same deconvolution watched every 5 iterations against the recording alone (re-blur
//    chi-square with the noise model estimated from the recording, discrepancy principle). Prints the
//    suggestion, or says that the curve gave none inside the evaluated range.
run("Deconvolve...", "image=quillwort-widefield.tif psf=" + psf + " method=richardson-lucy-tv iterations=40 regularization=0.002 stop=fixed threshold=0.001 edges=non-circulant offset=100 background=dark watch every=5 references=[] open_references=[] photons=1 read_noise=0 estimate_noise");
lines = split(getMetadata("Info"), "\n");
for (i = 0; i < lines.length; i++)
    if (indexOf(lines[i], "suggest") >= 0 && indexOf(lines[i], "{") < 0) print("stopping point (watch mode, no references): " + replace(String.trim(lines[i]), "^run ", ""));
close();

print("Parfocal demo finished: outputs in " + out);
