package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.Plot;

import org.parfocal.blocks.BlockPlan;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.MemoryBudget;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Stopping;
import org.parfocal.ij1.Deconvolve.Options;
import org.parfocal.ij1.Deconvolve.Output;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReferenceComparison;
import org.parfocal.quality.StoppingRule;

/**
 * Deconvolve's run on a whole stack: the PSFs, every channel and frame through {@link Deconvolution} (with a
 * {@link QualityWatch} each in watch mode), the new image, the Log notes and the provenance record. Hands the run
 * to {@link DeconvolveInBlocks} when the padded stack does not fit in the memory budget.
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
		final List<Volume> psfs = DeconvolvePsfs.psfsFor(in, psfImp, o.optics(), notes, o.recentre());
		final long budget = Long.getLong(Deconvolve.BUDGET_PROPERTY, BlockPlan.heapBudget());
		if (o.watch() == null && BlockPlan.needed(in.first().shape(), psfs.get(0).shape(), o.deconvolution(), budget))
			return DeconvolveInBlocks.run(o, imp, in, psfImp, psfs, notes, budget, start);
		MemoryBudget.require(Deconvolution.bytesNeeded(in.first().shape(), psfs.get(0).shape(), o.deconvolution()) + 8L * in.first().size()
				+ (o.watch() == null ? 0 : 8L * in.first().size() * in.volumes().size()), "deconvolving " + in.nx() + " x " + in.ny() + " x " + in.nz());
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final int n = in.volumes().size();
		final List<CompareWithReferences.Reference> refs = o.watch() == null ? List.of()
				: CompareWithReferences.references(o.watch().referenceFolder(), o.watch().openReferences(), List.of(o.image(), o.psf()));
		if (o.watch() != null && !o.watch().ignoreCalibration()) {
			final String problem = CompareWithReferences.calibrationProblem(imp, refs, null);
			if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		}
		final List<QualityWatch> watches = new ArrayList<>();
		final List<DeconvolutionResult> results = Commands.withImageJThreads(() -> {
			final List<DeconvolutionResult> rs = new ArrayList<>();
			final ReferenceComparison.References prepared = o.watch() == null || refs.isEmpty() ? null
					: CompareWithReferences.named(refs, () -> ReferenceComparison.prepare(refs.stream().map(CompareWithReferences.Reference::volume).toList(), in.first(),
							ReferenceComparison.Options.defaults().withIgnoreCalibration(o.watch().ignoreCalibration())
									.withResolution(WatchFacts.expected(o.watch(), in.first(), psfs.get(0), notes)), monitor));
			if (prepared != null) for (final String note : prepared.notes()) if (!notes.contains(note)) notes.add(note);
			for (int t = 0; t < in.frames(); t++)
				for (int c = 0; c < in.channels(); c++) {
					final int index = rs.size();
					final String where = n > 1 ? " (channel " + (c + 1) + ", frame " + (t + 1) + ")" : "";
					final org.parfocal.deconv.IterationListener listener;
					if (o.watch() != null) {
						final DeconvolutionOptions d = o.deconvolution();
						final double[] lv = QualityWatch.Consistency.levels(in.get(c, t), d.offset(), d.background());
						final double[] noise = o.watch().noise(in.get(c, t), lv[0], notes);
						final QualityWatch w = new QualityWatch(prepared, QualityWatch.Consistency.forDeconvolution(in.get(c, t), psfs.get(c),
								d.edges() == EdgeMode.PERIODIC, lv[0], lv[1], noise[0], noise[1]), o.watch().every(),
								o.watch().stopAtSuggestion(), in.voxelSize());
						watches.add(w);
						listener = w;
					} else listener = org.parfocal.deconv.IterationListener.NONE;
					rs.add(Deconvolution.run(in.get(c, t), psfs.get(c), o.deconvolution(), null, new org.parfocal.core.Monitor() {
						@Override
						public void progress(final int done, final int total, final String status) {
							monitor.progress(index * total + done, n * total, status + where);
						}

						@Override
						public boolean isCancelled() {
							return monitor.isCancelled();
						}
					}, listener));
				}
			return rs;
		});
		final List<Volume> vols = new ArrayList<>();
		for (int i = 0; i < results.size(); i++) {
			final DeconvolutionResult r = results.get(i);
			final boolean best = o.watch() != null && o.watch().stopAtSuggestion() && watches.get(i).best() != null;
			vols.add(best ? watches.get(i).best() : r.estimate());
			for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		}
		for (int i = 0; i < watches.size(); i++) {
			final StoppingRule.Suggestion sg = watches.get(i).suggestion();
			final String note = "watch" + (watches.size() > 1 ? " (volume " + (i + 1) + ")" : "") + ": " + sg.reason();
			if (!sg.interior()) notes.add(note);
			else IJ.log(COMMAND + ": suggested iteration " + sg.iteration() + " (" + sg.reason() + ")");
		}
		final String title = WindowManager.makeUniqueName(ConvolveWithPsf.stripExtension(imp.getTitle()) + "-deconvolved.tif");
		final ImagePlus out = ImageBridge.toImagePlus(new Hyperstack(in.channels(), in.frames(), vols), title, imp.getCalibration());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("image", imp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		if (o.optics() != null) PsfFromOptics.recordIgnored(COMMAND, o.optics(), prov); // fields the chosen model and modality do not use
		final DeconvolutionResult first = results.get(0);
		prov.run("iterations", first.iterations()).run("stop_reason", stopReason(o.deconvolution(), first) + (o.watch() != null && o.watch().stopAtSuggestion() && !watches.isEmpty()
				&& watches.get(0).best() != null ? "; the suggested iterate " + watches.get(0).suggestion().iteration() + " was returned (watch mode)" : "")).run("offset", first.offset())
				.run("background", first.background());
		if (o.deconvolution().stopping() == Stopping.HELD_OUT) // an edge of the range is not a choice: say so in the warnings box too
			for (final String note : notes) if (note.startsWith(HELD_OUT_NOTE) && note.contains("no interior peak")) prov.warning(note);
		if (n > 1) prov.run("volumes", n).run("offset_per_volume", results.stream().map(r -> (Object) r.offset()).toList())
				.run("background_per_volume", results.stream().map(r -> (Object) r.background()).toList());
		if (!first.history().isEmpty()) prov.run("relative_change", first.history().stream().map(h -> (Object) h.relativeChange()).toList());
		if (o.watch() != null) WatchFacts.record(prov, o.watch(), watches, refs);
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		outputDepth(o, out, prov);
		ImageProvenance.attach(out, prov, start);
		monitor.done(String.format(Locale.ROOT, "%d iteration(s), %.1f s", first.iterations(), (System.nanoTime() - start) / 1e9));
		final Plot plot = o.plot() && !first.history().isEmpty() ? DeconvolvePlots.convergence(results, title) : null;
		final Plot quality = o.watch() == null ? null : DeconvolvePlots.quality(watches, title);
		return new Output(out, plot, results, quality, List.copyOf(watches));
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
