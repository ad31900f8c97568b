package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.Plot;

import org.parfocal.command.DeconvolveRunner;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.Stopping;
import org.parfocal.ij1.Deconvolve.Options;
import org.parfocal.ij1.Deconvolve.Output;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.StoppingRule;

/**
 * Deconvolve's run in ImageJ: the images looked up, the run itself in {@link DeconvolveRunner} (PSFs, the decision
 * between the whole stack and blocks, every channel and frame; watch mode through {@link DeconvolveWatchHooks}),
 * then the new image, the Log notes and the provenance record of either kind of run.
 */
final class DeconvolveRun {

	private static final String COMMAND = Deconvolve.COMMAND;

	private DeconvolveRun() {}

	/** Deconvolves every channel and frame; returns the new image (not shown). */
	static Output run(final Options o) {
		final long start = System.nanoTime();
		final ImagePlus imp = Commands.image(o.image(), "image");
		final Hyperstack in = ImageBridge.toCore(imp);
		final ImagePlus psfImp = o.optics() == null ? Commands.image(o.psf(), "PSF") : null;
		final List<String> notes = new ArrayList<>();
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final DeconvolveWatchHooks hooks = new DeconvolveWatchHooks(o, imp, notes);
		final DeconvolveRunner.Outcome run = Commands.withImageJThreads(
				() -> DeconvolveRunner.run(o.request(), in, DeconvolvePsfs.source(psfImp, o.optics(), o.recentre()), 0, hooks, notes, monitor));
		final String title = WindowManager.makeUniqueName(ConvolveWithPsf.stripExtension(imp.getTitle()) + "-deconvolved.tif");
		if (run.blockwise()) return blockRecord(o, imp, psfImp, in, run, title, monitor, start);
		final List<DeconvolutionResult> results = run.results();
		final List<QualityWatch> watches = hooks.watches();
		final List<Volume> vols = new ArrayList<>();
		for (int i = 0; i < results.size(); i++) {
			final boolean best = o.watch() != null && o.watch().stopAtSuggestion() && watches.get(i).best() != null;
			vols.add(best ? watches.get(i).best() : run.volumes().get(i));
		}
		for (int i = 0; i < watches.size(); i++) {
			final StoppingRule.Suggestion sg = watches.get(i).suggestion();
			final String note = "watch" + (watches.size() > 1 ? " (volume " + (i + 1) + ")" : "") + ": " + sg.reason();
			if (!sg.interior()) notes.add(note);
			else IJ.log(COMMAND + ": suggested iteration " + sg.iteration() + " (" + sg.reason() + ")");
		}
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), vols), title, imp.getCalibration());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final var prov = start(o, imp, psfImp);
		final DeconvolutionResult first = results.get(0);
		prov.run("iterations", first.iterations()).run("stop_reason", stopReason(o.deconvolution(), first) + (o.watch() != null && o.watch().stopAtSuggestion() && !watches.isEmpty()
				&& watches.get(0).best() != null ? "; the suggested iterate " + watches.get(0).suggestion().iteration() + " was returned (watch mode)" : "")).run("offset", first.offset())
				.run("background", first.background());
		if (o.deconvolution().stopping() == Stopping.HELD_OUT) // an edge of the range is not a choice: say so in the warnings box too
			for (final String note : notes) if (note.startsWith(HELD_OUT_NOTE) && note.contains("no interior peak")) prov.warning(note);
		final int n = in.volumes().size();
		if (n > 1) prov.run("volumes", n).run("offset_per_volume", results.stream().map(r -> (Object) r.offset()).toList())
				.run("background_per_volume", results.stream().map(r -> (Object) r.background()).toList());
		if (!first.history().isEmpty()) prov.run("relative_change", first.history().stream().map(h -> (Object) h.relativeChange()).toList());
		if (o.watch() != null) WatchFacts.record(prov, o.watch(), watches, hooks.references());
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		outputDepth(o, out, prov);
		ImageProvenance.attach(out, prov, start);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s", first.iterations(), (System.nanoTime() - start) / 1e9));
		final Plot plot = o.plot() && !first.history().isEmpty() ? DeconvolvePlots.convergence(results, title) : null;
		final Plot quality = o.watch() == null ? null : DeconvolvePlots.quality(watches, title);
		return new Output(out, plot, results, quality, List.copyOf(watches));
	}

	/** The image and record of a block-wise run (watch mode is not available this way): the record holds the block plan. */
	private static Output blockRecord(final Options o, final ImagePlus imp, final ImagePlus psfImp, final Hyperstack in, final DeconvolveRunner.Outcome run,
			final String title, final IjMonitor monitor, final long start) {
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), run.volumes()), title, imp.getCalibration());
		for (final String note : run.notes()) IJ.log(COMMAND + ": " + note);
		final var first = run.blockRuns().get(0);
		final var prov = start(o, imp, psfImp);
		prov.run("iterations", first.maxIterations()).run("stop_reason", "block by block (" + run.plan().count() + " blocks); each block ran "
				+ (first.minIterations() == first.maxIterations() ? first.maxIterations() : first.minIterations() + " to " + first.maxIterations()) + " iteration(s)")
				.run("offset", first.levels().offset()).run("background", first.levels().background()).run("block_plan", run.plan().describe());
		if (in.volumes().size() > 1) prov.run("volumes", in.volumes().size());
		if (!run.notes().isEmpty()) prov.run("notes", String.join("; ", run.notes()));
		outputDepth(o, out, prov);
		ImageProvenance.attach(out, prov, start);
		monitor.done("block by block, " + run.plan().count() + " blocks");
		return new Output(out, null, List.of());
	}

	/** The record's start, common to both kinds of run: options, inputs, and the optics fields not used. */
	private static org.parfocal.provenance.Provenance.Builder start(final Options o, final ImagePlus imp, final ImagePlus psfImp) {
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		if (o.optics() != null) PsfFromOptics.recordIgnored(COMMAND, o.optics(), prov); // fields the chosen model and modality do not use
		return prov;
	}

	/** Stores the output at the asked depth; for 16-bit the scale and offset go into the record. */
	static void outputDepth(final Options o, final ImagePlus out, final org.parfocal.provenance.Provenance.Builder prov) {
		final OutputDepth.Scaling s = o.output().apply(out);
		if (s != null) prov.run("output_depth", o.output().key()).run("output_offset", s.offset()).run("output_scale", s.scale());
	}

	/** Start of the held-out stop's note (deconv/HoldOutStop). */
	static final String HELD_OUT_NOTE = "Held-out stop (Coakley 1991):";

	/** Why the run stopped, in words, for provenance. */
	static String stopReason(final DeconvolutionOptions d, final DeconvolutionResult r) {
		if (d.method() == DeconvolutionMethod.WIENER) return "one-shot filter";
		if (d.stopping() == Stopping.HELD_OUT)
			for (final String note : r.notes()) if (note.startsWith(HELD_OUT_NOTE)) return note.substring(HELD_OUT_NOTE.length()).trim();
		if (r.converged())
			return String.format(Locale.ROOT, "relative change %.3g fell below %.3g at iteration %d", r.history().get(r.history().size() - 1).relativeChange(),
					d.changeThreshold(), r.iterations());
		return "the " + r.iterations() + " iteration(s) asked for were done";
	}
}
