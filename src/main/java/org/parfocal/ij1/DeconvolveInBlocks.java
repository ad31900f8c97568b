package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;

import org.parfocal.blocks.BlockDeconvolution;
import org.parfocal.blocks.BlockPlan;
import org.parfocal.blocks.BlockSink;
import org.parfocal.blocks.BlockSource;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;
import org.parfocal.ij1.Deconvolve.Options;
import org.parfocal.ij1.Deconvolve.Output;

/** Deconvolve block by block ({@link BlockDeconvolution}), for stacks whose padded grid exceeds the memory budget. */
final class DeconvolveInBlocks {

	private static final String COMMAND = Deconvolve.COMMAND;

	private DeconvolveInBlocks() {}

	/**
	 * The same run block by block, when the padded stack would not fit in the memory budget: the user is told,
	 * and the provenance records the block plan. Watch mode is not available this way.
	 */
	static Output run(final Options o, final ImagePlus imp, final Hyperstack in, final ImagePlus psfImp, final List<Volume> psfs,
			final List<String> notes, final long budget, final long start) {
		final BlockPlan plan = BlockPlan.forBudget(in.first().shape(), psfs.get(0).shape(), o.deconvolution(), budget);
		IJ.log(COMMAND + ": the padded stack does not fit in " + MemoryBudget.format(budget) + "; deconvolving block by block: " + plan);
		MemoryBudget.require(4L * in.first().size() * in.volumes().size(), "the block-wise result");
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final int n = in.volumes().size();
		final List<BlockDeconvolution.Result> runs = new ArrayList<>();
		final List<Volume> vols = Commands.withImageJThreads(() -> {
			final List<Volume> vs = new ArrayList<>();
			for (int t = 0; t < in.frames(); t++)
				for (int c = 0; c < in.channels(); c++) {
					final int index = vs.size();
					final BlockSink.Memory sink = BlockSink.memory(in.first().shape(), in.voxelSize());
					try {
						runs.add(BlockDeconvolution.run(BlockSource.of(in.get(c, t)), psfs.get(c), o.deconvolution(), plan, sink, new org.parfocal.core.Monitor() {
							@Override
							public void progress(final int done, final int total, final String status) {
								monitor.progress(index * total + done, n * total, status);
							}

							@Override
							public boolean isCancelled() {
								return monitor.isCancelled();
							}
						}));
					} catch (final java.io.IOException e) {
						throw new IllegalStateException("Block-wise run failed: " + e.getMessage());
					}
					vs.add(sink.result());
				}
			return vs;
		});
		for (final BlockDeconvolution.Result r : runs) for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		final String title = WindowManager.makeUniqueName(ConvolveWithPsf.stripExtension(imp.getTitle()) + "-deconvolved.tif");
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), vols), title, imp.getCalibration());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final BlockDeconvolution.Result first = runs.get(0);
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		if (o.optics() != null) PsfFromOptics.recordIgnored(COMMAND, o.optics(), prov); // fields the chosen model and modality do not use
		prov.run("iterations", first.maxIterations()).run("stop_reason", "block by block (" + plan.count() + " blocks); each block ran "
				+ (first.minIterations() == first.maxIterations() ? first.maxIterations() : first.minIterations() + " to " + first.maxIterations()) + " iteration(s)")
				.run("offset", first.levels().offset()).run("background", first.levels().background()).run("block_plan", plan.describe());
		if (n > 1) prov.run("volumes", n);
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		DeconvolveRun.outputDepth(o, out, prov);
		ImageProvenance.attach(out, prov, start);
		monitor.done("block by block, " + plan.count() + " blocks");
		return new Output(out, null, List.of());
	}
}
