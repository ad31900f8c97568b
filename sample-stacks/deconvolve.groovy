#@ CommandService command
#@ File (label = "Stack") stack_file
#@ File (label = "PSF") psf_file
#@ Integer (label = "Iterations", min = 1, value = 10) iterations
#@output ij.ImagePlus result
// Deconvolve one stack with a measured PSF from a Fiji script (Groovy): the images are objects, not window
// titles, and the keys are typed parameters of the SciJava command. Runs headless too.
import ij.IJ
import org.parfocal.scijava.DeconvolveCommand

def stack = IJ.openImage(stack_file.path)
def psf = IJ.openImage(psf_file.path)
def module = command.run(DeconvolveCommand, true,
        "image", stack, "psf", psf, "method", "richardson-lucy-tv",
        "iterations", iterations, "regularization", 0.002).get()
if (module.isCanceled()) throw new IllegalArgumentException(module.getCancelReason())
result = module.getOutput("result")
