// Parfocal batch recipe: deconvolve one stack. Run on a whole folder with
//     bin/parfocal-batch sample-stacks/batch-recipe.ijm <input folder> <output folder> sample-stacks/batch-psf-map.csv
// The runner opens the stack (inputTitle) and the PSF the map gives it (psfTitle), runs these lines, and saves
// the image left current. Failures are logged in summary.csv and the batch goes on.
if (psfTitle == "") exit("Error: no PSF for " + inputTitle + " in the PSF map");
run("Deconvolve...", "image=[" + inputTitle + "] psf=[" + psfTitle + "] method=richardson-lucy-tv iterations=30 regularization=0.002 stop=fixed threshold=0.001 edges=extended offset=100 background=auto");
