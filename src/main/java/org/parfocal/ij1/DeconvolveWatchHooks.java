package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;

import ij.IJ;
import ij.ImagePlus;

import org.parfocal.command.DeconvolveRunner;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.IterationListener;
import org.parfocal.ij1.Deconvolve.Options;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReferenceComparison;

/**
 * Deconvolve's ImageJ side of a {@link DeconvolveRunner} run: notices go to the Log at once, and in watch mode the
 * references (open images or a folder) are loaded and checked before the first volume, and every channel and frame
 * gets a {@link QualityWatch}. Kept here for the record: the references and the watches.
 */
final class DeconvolveWatchHooks implements DeconvolveRunner.Hooks {

	private final Options o;
	private final ImagePlus imp;
	private final List<String> notes;
	private final List<QualityWatch> watches = new ArrayList<>();
	private List<CompareWithReferences.Reference> refs = List.of();
	private ReferenceComparison.References prepared;
	private org.parfocal.core.VoxelSize voxelSize;

	DeconvolveWatchHooks(final Options o, final ImagePlus imp, final List<String> notes) {
		this.o = o;
		this.imp = imp;
		this.notes = notes;
	}

	@Override
	public void notice(final String line) {
		IJ.log(Deconvolve.COMMAND + ": " + line);
	}

	@Override
	public void beforeVolumes(final Hyperstack in, final List<Volume> psfs, final Monitor monitor) {
		voxelSize = in.voxelSize(); // the stack's, which every watch measures in
		final Deconvolve.Watch w = o.watch();
		if (w == null) return;
		refs = CompareWithReferences.references(w.referenceFolder(), w.openReferences(), List.of(o.image(), o.psf()));
		if (!w.ignoreCalibration()) {
			final String problem = CompareWithReferences.calibrationProblem(imp, refs, null);
			if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		}
		if (refs.isEmpty()) return;
		prepared = CompareWithReferences.named(refs, () -> ReferenceComparison.prepare(refs.stream().map(CompareWithReferences.Reference::volume).toList(), in.first(),
				ReferenceComparison.Options.defaults().withIgnoreCalibration(w.ignoreCalibration()).withResolution(WatchFacts.expected(w, in.first(), psfs.get(0), notes)),
				monitor));
		for (final String note : prepared.notes()) if (!notes.contains(note)) notes.add(note);
	}

	@Override
	public IterationListener listener(final int c, final int t, final Volume recording, final Volume psf) {
		if (o.watch() == null) return IterationListener.NONE;
		final DeconvolutionOptions d = o.deconvolution();
		final double[] lv = QualityWatch.Consistency.levels(recording, d.offset(), org.parfocal.deconv.Preprocessing.forPsf(d.background(), psf));
		final double[] noise = o.watch().noise(recording, lv[0], notes);
		final QualityWatch w = new QualityWatch(prepared, QualityWatch.Consistency.forDeconvolution(recording, psf, d.edges() == EdgeMode.PERIODIC, lv[0], lv[1],
				noise[0], noise[1]), o.watch().every(), o.watch().stopAtSuggestion(), voxelSize);
		watches.add(w);
		return w;
	}

	/** The watch of each volume, channel fastest (empty without watch mode). */
	List<QualityWatch> watches() {
		return watches;
	}

	/** The references the watches compared with (empty without watch mode or references). */
	List<CompareWithReferences.Reference> references() {
		return refs;
	}
}
