package org.parfocal.ij1;

import static org.parfocal.ij1.CompareWithReferences.COMMAND;
import static org.parfocal.ij1.CompareWithReferences.NONE;
import static org.parfocal.ij1.CompareWithReferences.calibrationProblem;
import static org.parfocal.ij1.CompareWithReferences.named;
import static org.parfocal.ij1.CompareWithReferences.references;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.IJ;
import ij.ImagePlus;
import ij.gui.Plot;
import ij.measure.ResultsTable;

import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.ij1.CompareWithReferences.Options;
import org.parfocal.ij1.CompareWithReferences.Output;
import org.parfocal.ij1.CompareWithReferences.Reference;
import org.parfocal.quality.MarginalQuantiles;
import org.parfocal.quality.MatchedResolution;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.ReblurConsistency;
import org.parfocal.quality.ReferenceComparison;

/** The body of {@link CompareWithReferences}: open images in, table, plot and provenance out. */
final class ComparisonRun {

	private ComparisonRun() {}

	/** Runs the check on open images (and the reference folder); shows nothing. */
	static Output run(final Options o) {
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
		if (input != null && !input.sameShape(result))
			throw new IllegalArgumentException("The input (" + input + ") and the result (" + result + ") differ in size: give the recording the result was computed from");
		if (psfImp != null && input == null) throw new IllegalArgumentException("A PSF was given without the input: the re-blur check needs both");
		final Volume psf = psfImp == null ? null : ImageBridge.toVolume(psfImp, "The PSF");
		final List<Volume> refVolumes = new ArrayList<>();
		for (final Reference r : refs) refVolumes.add(r.volume());
		final IjMonitor monitor = new IjMonitor(COMMAND);
		final List<String> notes = new ArrayList<>();
		final MatchedResolution expected = expected(o, result, input, psf, notes);
		final ReferenceComparison.Options co = o.comparison().withResolution(expected);
		final Object[] core = named(refs, () -> Commands.withImageJThreads(() -> {
			final ReferenceComparison.References prepared = ReferenceComparison.prepare(refVolumes, result, co, monitor);
			final ReferenceComparison.Report report = ReferenceComparison.compare(prepared, result, input, monitor);
			ReblurConsistency.Result chi = null;
			if (psf != null) {
				final double[] lv = QualityWatch.Consistency.levels(input, o.offset(), o.background());
				final List<String> noiseNotes = new ArrayList<>();
				final double[] noise = new Deconvolve.Watch(1, "", "", o.photons(), o.readNoise(), false, false, o.estimateNoise()).noise(input, lv[0], noiseNotes);
				for (final String note : noiseNotes) IJ.log(COMMAND + ": " + note.replaceFirst("^watch ", "chi-square "));
				chi = new QualityWatch(null, QualityWatch.Consistency.forDeconvolution(input, psf, false, lv[0], lv[1], noise[0], noise[1]), 1, false,
						result.voxelSize()).consistency(result);
			}
			return new Object[] { report, chi, MarginalQuantiles.of(prepared, result, 99) };
		}));
		final ReferenceComparison.Report report = (ReferenceComparison.Report) core[0];
		final ReblurConsistency.Result chi = (ReblurConsistency.Result) core[1];
		final MarginalQuantiles.Curves curves = (MarginalQuantiles.Curves) core[2];
		notes.addAll(report.notes());
		for (final String note : notes) IJ.log(COMMAND + ": " + note);
		final String base = ConvolveWithPsf.stripExtension(resImp.getTitle());
		final ResultsTable table = ComparisonTable.table(report, chi);
		final Plot plot = ComparisonTable.plot(curves, base, refs.size());
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
		if (expected != null) prov.run("expected_resolution", expectedText(expected, result.voxelSize().isCalibrated() && !o.ignoreCalibration()));
		if (!notes.isEmpty()) prov.run("notes", String.join("; ", notes));
		for (final String note : notes) prov.warning(note);
		ImageProvenance.attach(plotImp, prov, start);
		monitor.done(String.format(Locale.ROOT, "patch distance %.4g (floor %.4g)", p.distance(), p.floor()));
		return new Output("Reference comparison of " + base, table, plot, report, chi);
	}


	/**
	 * With {@code match_resolution}: the expected resolution from the PSF, else from the input; without either, a
	 * note and null (references as they are). In voxels when calibrations are ignored.
	 */
	static MatchedResolution expected(final Options o, final Volume result, final Volume input, final Volume psf, final List<String> notes) {
		if (!o.matchResolution()) return null;
		final boolean calibrated = result.voxelSize().isCalibrated() && !o.ignoreCalibration();
		if (psf != null) return MatchedResolution.expectedFromPsf(psf, calibrated ? result.voxelSize() : VoxelSize.UNCALIBRATED);
		if (input != null) return MatchedResolution.expectedFromInput(input, calibrated);
		notes.add("match_resolution needs the PSF or the blurred input: the references were compared at their own resolution");
		return null;
	}

	static String expectedText(final MatchedResolution r, final boolean microns) {
		final String unit = microns ? " µm" : " voxels";
		return String.format(Locale.ROOT, "%.4g%s lateral%s (FWHM)", r.lateral(), unit, Double.isNaN(r.axial()) ? "" : String.format(Locale.ROOT, ", %.4g%s axial", r.axial(), unit));
	}
}
