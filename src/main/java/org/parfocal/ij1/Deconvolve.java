package org.parfocal.ij1;

import java.util.List;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.plugin.PlugIn;

import org.parfocal.command.WatchRequest;
import org.parfocal.core.Volume;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.DeconvolutionResult;
import org.parfocal.deconv.Level;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.quality.QualityWatch;
import org.parfocal.quality.StoppingRule;

/**
 * {@code Plugins > Parfocal > Deconvolve...}: Richardson–Lucy (plain, with total variation, accelerated) or a
 * Wiener filter, on every channel and time point of a stack. The PSF is an open image (one for all channels, or
 * one channel per image channel) or is computed from the optics in a second dialog. Output: a new calibrated
 * 32-bit image with provenance and, for the iterative methods, a plot of the relative change per iteration.
 * Esc cancels: nothing is created and the input is untouched.
 * <p>
 * Macro keys (public API): {@code image psf method iterations regularization stop threshold edges offset
 * background plot watch}; with {@code psf=from_optics} also the keys of {@code PSF from Optics...} (without
 * {@code show_profiles}). {@code offset} and {@code background} take a number or {@code auto}; {@code background} also
 * {@code dark}, {@code fit} and {@code fit-smooth} (fitted with the object, {@link org.parfocal.deconv.BackgroundFit}).
 * <p>
 * <b>Watch mode</b> ({@code watch}, off by default; iterative methods only): a second dialog (keys {@code every
 * reference_folder reference_images photons read_noise stop_at_suggestion ignore_calibration}) sets up a
 * {@link QualityWatch} per channel and frame: every {@code every} iterations the iterate's patch distance to
 * sharp references (a folder of TIFFs and/or open images matching a title pattern; optional) and its re-blur
 * χ² against the data (noise model: {@code photons} per intensity unit, {@code read_noise}) are computed; a
 * plot shows both against the iteration, and {@link StoppingRule} suggests an iteration. With
 * {@code stop_at_suggestion} the output is the suggested iterate: the watch keeps a copy of the best iterate
 * so far (4 bytes per voxel more) rather than running a second time to that iteration, which would double the
 * time. The suggestion, the rule and the curve go into the provenance.
 * <p>
 * The parts: {@link DeconvolveDialog} (dialogs → {@link Options}), {@link DeconvolveRun} (images, record; the run itself,
 * whole stack or block by block, in {@link org.parfocal.command.DeconvolveRunner}), {@link DeconvolveWatchHooks}, {@link DeconvolvePsfs}, {@link DeconvolvePlots}, {@link WatchFacts}, {@link DeconvolvePreview}.
 */
public class Deconvolve implements PlugIn {

	static final String COMMAND = "Deconvolve";
	/** PSF choice that computes the PSF from the optics instead of taking an open image. */
	public static final String FROM_OPTICS = org.parfocal.command.DeconvolveRequest.FROM_OPTICS;

	/** What the dialogs decide. {@code optics} is set when {@code psf} is {@link #FROM_OPTICS}. */
	public record Options(String image, String psf, org.parfocal.command.OpticsRequest optics, DeconvolutionOptions deconvolution, boolean plot, Watch watch,
			boolean recentre, OutputDepth output) {

		/** A 32-bit output (what a macro without {@code output=} gets). */
		public Options(final String image, final String psf, final org.parfocal.command.OpticsRequest optics, final DeconvolutionOptions deconvolution, final boolean plot,
				final Watch watch, final boolean recentre) {
			this(image, psf, optics, deconvolution, plot, watch, recentre, OutputDepth.FLOAT);
		}

		/** Without re-centring the PSF ({@code recentre}: shift an open PSF's centre of mass to its centre voxel). */
		public Options(final String image, final String psf, final org.parfocal.command.OpticsRequest optics, final DeconvolutionOptions deconvolution, final boolean plot,
				final Watch watch) {
			this(image, psf, optics, deconvolution, plot, watch, false);
		}

		/** Without watch mode. */
		public Options(final String image, final String psf, final org.parfocal.command.OpticsRequest optics, final DeconvolutionOptions deconvolution, final boolean plot) {
			this(image, psf, optics, deconvolution, plot, null);
		}

		public Options {
			if (watch != null && deconvolution != null && deconvolution.method() == DeconvolutionMethod.WIENER)
				throw new IllegalArgumentException("Watch mode needs an iterative method: the Wiener filter has no iterations to watch");
			if (output == null) output = OutputDepth.FLOAT;
		}

		public String macroOptions() {
			final DeconvolutionOptions d = deconvolution;
			final String s = "image=" + MacroOptions.quote(image) + " psf=" + MacroOptions.quote(psf) + " method=" + d.method().key() + " iterations="
					+ d.iterations() + " regularization=" + MacroOptions.number(d.regularization()) + " stop=" + d.stopping().key() + " threshold="
					+ MacroOptions.number(d.changeThreshold()) + " edges=" + d.edges().key() + " offset=" + level(d.offset()) + " background="
					+ level(d.background()) + (plot ? " plot" : "") + (watch != null ? " watch" : "") + (recentre ? " recentre" : "") + (output == OutputDepth.FLOAT ? "" : " output=" + output.key());
			final String withOptics = optics == null ? s : s + " " + optics.macroOptions();
			return watch == null ? withOptics : withOptics + " " + watch.macroOptions();
		}

		/** The front-end-free request of these options ({@link org.parfocal.command.DeconvolveRunner} runs it). */
		public org.parfocal.command.DeconvolveRequest request() {
			return new org.parfocal.command.DeconvolveRequest(image, psf, optics, deconvolution, plot, watch != null,
					recentre, output.key());
		}

		/** The macro text of a level ({@link Level#macroValue}). */
		static String level(final Level l) {
			return l.macroValue();
		}
	}

	/**
	 * Watch-mode settings (the second dialog).
	 *
	 * @param every evaluate every this many iterations
	 * @param referenceFolder folder of sharp reference TIFFs, or ""
	 * @param openReferences wildcard pattern of open reference images, or ""
	 * @param photons photons per intensity unit of the data (noise model of the χ²)
	 * @param readNoise read-noise σ in intensity units
	 * @param stopAtSuggestion return the suggested iterate instead of the last one
	 * @param ignoreCalibration compare with references voxel for voxel
	 * @param estimateNoise take gain and read noise estimated from each recording ({@link org.parfocal.core.CameraNoise})
	 *        instead of {@code photons} and {@code read_noise} (which stay the fallback when the estimate fails);
	 *        absent from old macros, so they keep their given values
	 * @param matchResolution blur the references to the result's expected resolution before comparing
	 *        ({@link org.parfocal.quality.MatchedResolution}); absent from old macros, which compare as before
	 */
	public record Watch(int every, String referenceFolder, String openReferences, double photons, double readNoise, boolean stopAtSuggestion,
			boolean ignoreCalibration, boolean estimateNoise, boolean matchResolution) {

		/** Without matched resolution (the references compared at their own resolution). */
		public Watch(final int every, final String referenceFolder, final String openReferences, final double photons, final double readNoise,
				final boolean stopAtSuggestion, final boolean ignoreCalibration, final boolean estimateNoise) {
			this(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, ignoreCalibration, estimateNoise, false);
		}

		/** Without the noise estimate (the given photons and read noise). */
		public Watch(final int every, final String referenceFolder, final String openReferences, final double photons, final double readNoise,
				final boolean stopAtSuggestion, final boolean ignoreCalibration) {
			this(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, ignoreCalibration, false);
		}

		public Watch {
			new WatchRequest(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, ignoreCalibration, estimateNoise, matchResolution);
		}

		/** These settings as the command layer's request (which checks them, for the constructor too). */
		public WatchRequest request() {
			return new WatchRequest(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, ignoreCalibration, estimateNoise, matchResolution);
		}

		/** The command layer's watch request as these settings. */
		public static Watch of(final WatchRequest w) {
			return new Watch(w.every(), w.referenceFolder(), w.openReferences(), w.photons(), w.readNoise(), w.stopAtSuggestion(), w.ignoreCalibration(),
					w.estimateNoise(), w.matchResolution());
		}

		public String macroOptions() {
			return request().macroOptions();
		}

		/** The watch settings of a run's options ({@link org.parfocal.command.DeconvolveKeys#WATCH}; defaults for keys not given). */
		public static Watch from(final org.parfocal.command.KeyTable.Values v) {
			return of(WatchRequest.from(v));
		}

		Watch withIgnoreCalibration() {
			return new Watch(every, referenceFolder, openReferences, photons, readNoise, stopAtSuggestion, true, estimateNoise, matchResolution);
		}

		/** {photons per unit, read noise} of the χ² for one recording ({@link WatchFacts#noise}). */
		double[] noise(final Volume recording, final double offset, final List<String> notes) {
			return WatchFacts.noise(this, recording, offset, notes);
		}
	}

	@Override
	public void run(final String arg) {
		Commands.run(COMMAND, org.parfocal.command.CommandKeys.DECONVOLVE, () -> {
			final Options o = DeconvolveDialog.show();
			if (o == null) throw Commands.cancelled();
			final Output out = run(DeconvolveDialog.checkCalibration(o));
			if (out.convergence() != null) out.convergence().show();
			if (out.quality() != null) out.quality().show();
			FirstView.forPerson(out.image());
			out.image().show(); // last, so that it is the current image for the next macro line
		});
	}

	/**
	 * The deconvolved image, the convergence plot (null for Wiener or when not asked), and in watch mode the
	 * quality plot and the watches (one per channel and frame; otherwise null and empty).
	 */
	public record Output(ImagePlus image, Plot convergence, List<DeconvolutionResult> results, Plot quality, List<QualityWatch> watches) {

		public Output(final ImagePlus image, final Plot convergence, final List<DeconvolutionResult> results) {
			this(image, convergence, results, null, List.of());
		}
	}

	/** Deconvolves every channel and frame; returns the new image (not shown). */
	public static Output run(final Options o) {
		return DeconvolveRun.run(o);
	}

	/** System property (bytes) that overrides the memory budget deciding when to work block by block. */
	public static final String BUDGET_PROPERTY = org.parfocal.command.DeconvolveRunner.BUDGET_PROPERTY;

	/** The offset or background level of a macro value ({@link Level#parse}, no {@code fit}); Blind Deconvolve and Compare read theirs with it. */
	static Level level(final String key, final String text) {
		return Level.parse(key, text, false);
	}
}
