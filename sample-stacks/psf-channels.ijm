// PSFs for a three-channel widefield acquisition on the invented Halden W-60 (60x/1.2 water), 4 um deep in
// cytoplasm of index 1.38, on the sample stacks' grid, headless:
//     bin/parfocal-headless sample-stacks/psf-channels.ijm <output folder>
// Writes one PSF per channel and a three-channel PSF stack (one channel per image channel), the form that
// Deconvolve... and the batch PSF map take for multi-channel images. Existing files are never replaced.
out = getArgument();
if (out == "") out = "parfocal-psf-output";
if (!startsWith(out, "/")) out = getDir("cwd") + out;
if (!endsWith(out, "/")) out = out + "/";
File.makeDirectory(out);
if (!File.isDirectory(out)) exit("Error: cannot create the output folder " + out);
setBatchMode(true);
names = newArray("blue-460nm", "green-520nm", "red-610nm");
emission = newArray(0.46, 0.52, 0.61);
titles = "";
for (c = 0; c < emission.length; c++) {
    run("PSF from Optics...", "model=gibson-lanni modality=widefield na=1.2 immersion_index=1.333 immersion_index_design=1.333 sample_index=1.38 coverslip_index=1.522 coverslip_index_design=1.522 coverslip_thickness=170 coverslip_thickness_design=170 working_distance=150 depth=4 emission=" + emission[c] + " excitation=0.4 pinhole=1 sheet_thickness=2 voxel_xy=0.08 voxel_z=0.2 size_xy=31 size_z=21");
    rename("psf-" + names[c]);
    path = out + "psf-" + names[c] + ".tif";
    if (File.exists(path)) exit("Error: " + path + " exists; choose another output folder");
    saveAs("Tiff", path);
    rename("psf-" + names[c]);
    print("wrote " + path);
}
run("Merge Channels...", "c1=psf-blue-460nm c2=psf-green-520nm c3=psf-red-610nm create keep");
path = out + "psf-3-channels.tif";
if (File.exists(path)) exit("Error: " + path + " exists; choose another output folder");
saveAs("Tiff", path);
print("wrote " + path + " (" + nSlices + " planes, channels: blue, green, red)");
