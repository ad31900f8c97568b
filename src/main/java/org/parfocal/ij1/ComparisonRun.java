package org.parfocal.ij1;

import static org.parfocal.ij1.CompareWithReferences.COMMAND;
import static org.parfocal.ij1.CompareWithReferences.NONE;
import static org.parfocal.ij1.CompareWithReferences.calibrationProblem;
import static org.parfocal.ij1.CompareWithReferences.named;
import static org.parfocal.ij1.CompareWithReferences.references;

import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.Plot;
import ij.measure.ResultsTable;

import org.parfocal.command.CompareRequest;
import org.parfocal.command.CompareRunner;
import org.parfocal.core.Volume;
import org.parfocal.ij1.CompareWithReferences.Output;
import org.parfocal.ij1.CompareWithReferences.Reference;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;

/**
 * The body of {@link CompareWithReferences}: open images and the reference folder in, {@link CompareRunner} (the run
 * without a front end), then table, plot and provenance out.
 */
final class ComparisonRun {

	private ComparisonRun() {}

	/** Runs the check on open images (and the reference folder); shows nothing. */
	static Output run(final CompareRequest o) {
		final long start = System.nanoTime();
		final ImagePlus resImp = Commands.image(o.result(), "result");
		final Volume result = ImageBridge.toVolume(resImp, "The result");
		final List<Reference> refs = references(o.referenceFolder(), o.openReferences(), List.of(o.result(), o.input(), o.psf()));
		if (!o.ignoreCalibration()) {
			final String problem = calibrationProblem(o);
			if (problem != null) throw new IllegalArgumentException(problem + ": calibrate it, or add ignore_calibration to compare voxel for voxel");
		}
		final ImagePlus inImp = NONE.equals(o.input()) ? null : Commands.image(o.input(), "input");
		final ImagePlus psfImp = NONE.equals(o.psf()) ? null : Commands.image(o.psf(), "PSF");
		final Volume input = inImp == null ? null : ImageBridge.toVolume(inImp, "The input");
		final Volume psf = psfImp == null ? null : ImageBridge.toVolume(psfImp, "The PSF");
		final List<Volume> refVolumes = refs.stream().map(Reference::volume).toList();
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final CompareRunner.Outcome out = named(refs, () -> Commands.withImageJThreads(() -> CompareRunner.run(o, result, refVolumes, input, psf, monitor)));
		final ReferenceComparison.Report report = out.report();
		final ReblurConsistency.Result chi = out.consistency();
		final List<String> notes = out.notes();
		for (final String note : out.noiseNotes()) IJ.log(COMMAND + ": " + note);
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final String base = ConvolveWithPsf.stripExtension(resImp.getTitle());
		final ResultsTable table = ComparisonTable.table(report, chi);
		final Plot plot = ComparisonTable.plot(out.curves(), base, refs.size());
		final ImagePlus plotImp = plot.getImagePlus();
		final var prov = ImageProvenance.start(COMMAND, o.macroOptions()).input(ImageProvenance.input("result", resImp));
		for (final Reference r : refs) prov.input(ImageProvenance.input("reference", r.image()));
		if (inImp != null) prov.input(ImageProvenance.input("input", inImp));
		if (psfImp != null) prov.input(ImageProvenance.input("psf", psfImp));
		final ReferenceComparison.Row p = report.row(ReferenceComparison.PATCHES);
		prov.run("patch_distance", p.distance()).run("floor", p.floor()).run("references", refs.size()).run("volumetric_patches", report.volumetricPatches());
		if (!Double.isNaN(p.baseline())) prov.run("baseline", p.baseline()).run("gap_closed", p.gapClosed());
		if (chi != null) prov.run("chi_square", chi.meanChiSquare()).run("whiteness", chi.whiteness());
		prov.run("table", report.toText().strip().replace('\n', ';'));
		if (out.expected() != null)
			prov.run("expected_resolution", CompareRunner.expectedText(out.expected(), result.voxelSize().isCalibrated() && !o.ignoreCalibration()));
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		for (final String note : notes) prov.warning(note);
		ImageProvenance.attach(plotImp, prov, start);
		monitor.done(String.format(Locale.ROOT, "patch distance %.4g (floor %.4g)", p.distance(), p.floor()));
		return new Output("Reference comparison of " + base, table, plot, report, chi);
	}
}
