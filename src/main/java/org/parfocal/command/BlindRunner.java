package org.parfocal.command;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.parfocal.blind.BlindDeconvolution;
import org.parfocal.blind.BlindOptions;
import org.parfocal.blind.BlindResult;
import org.parfocal.blind.PsfSnapshot;
import org.parfocal.blind.PsfStart;
import org.parfocal.blind.RefineStep;
import org.parfocal.blind.SupportBox;
import org.parfocal.conv.Psfs;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.deconv.PsfPreparation;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.quality.BlindQualityWatch;

/**
 * {@code Blind Deconvolve...}'s run without a front end: the starting PSF (an open PSF prepared as Deconvolve
 * prepares one, the optics' PSF on its own grid, or a Gaussian of the given widths), the support box in voxels,
 * the band limit's optics, then {@link BlindDeconvolution}. Watch mode's references are the front end's: it
 * passes a {@link WatchMaker}. Threads come from the caller's context. No {@code ij.*}, no AWT.
 */
public final class BlindRunner {

	private BlindRunner() {}

	/** Makes the watch of a run once its core options are known (notes about the noise model go to {@code notes}). */
	@FunctionalInterface
	public interface WatchMaker {
		BlindQualityWatch make(BlindOptions options, List<String> notes);
	}

	/**
	 * What a run made.
	 *
	 * @param object the deblurred image (the suggested iteration's with {@code stop_at_suggestion})
	 * @param psf the final PSF (likewise)
	 * @param result the engine's result: snapshots, levels, model fit, refinement
	 * @param notes what was done to the inputs, one line each, in the order they arose
	 * @param watch the watch, or null
	 */
	public record Outcome(Volume object, Volume psf, BlindResult result, List<String> notes, BlindQualityWatch watch, boolean is3D) {

		/** The PSF history, one snapshot every {@code snapshot_interval} iterations from the start. */
		public List<PsfSnapshot> snapshots() {
			return result.snapshots();
		}

		/** The run facts of the record, in its order (the watch's and the notes are the front end's). */
		public Map<String, Object> facts(final int iterations) {
			final Map<String, Object> m = new LinkedHashMap<>();
			final PsfSnapshot last = snapshots().get(snapshots().size() - 1);
			m.put("iterations", iterations);
			m.put("psf_box", result.psf().nx() + "x" + result.psf().ny() + "x" + result.psf().nz());
			m.put("snapshots", snapshots().size());
			m.put("fwhm_lateral", last.fwhmLateral());
			if (is3D) m.put("fwhm_axial", last.fwhmAxial());
			m.put("distance_to_start", last.distanceToStart());
			m.put("offset", result.offset());
			m.put("background", result.background());
			if (result.fit() != null) {
				m.put("model_fit", result.fit().summary());
				m.put("model_fit_candidates", result.fit().evaluations());
				if (!result.refinement().isEmpty())
					m.put("refinement_steps_kept", result.refinement().stream().filter(RefineStep::accepted).count() + " of " + result.refinement().size());
			}
			return m;
		}
	}

	/**
	 * Runs {@code request} on {@code image} (one channel, one frame). {@code openPsf} is the open starting PSF
	 * (titled {@code psfTitle} in notes) when the start is neither from_optics nor gaussian, else null;
	 * {@code watch} null without watch mode.
	 *
	 * @throws IllegalArgumentException one line, for input the run cannot take
	 */
	public static Outcome run(final BlindRequest request, final Volume image, final Hyperstack openPsf, final String psfTitle, final WatchMaker watch,
			final Monitor monitor) {
		final List<String> notes = new ArrayList<>();
		final BlindOptions options = options(request, image, openPsf, psfTitle, notes);
		options.checkFor(image);
		final BlindQualityWatch w = watch == null ? null : watch.make(options, notes);
		final BlindResult r = BlindDeconvolution.run(image, options, request.plan(), monitor, w);
		for (final String note : r.notes()) if (!notes.contains(note)) notes.add(note);
		final boolean best = w != null && request.watch() != null && request.watch().stopAtSuggestion() && w.best() != null;
		return new Outcome(best ? w.best() : r.estimate(), best ? w.bestPsf() : r.psf(), r, notes, w, image.nz() > 1);
	}

	/** The core options: the starting PSF, the support box in voxels, the optics of the band limit. */
	public static BlindOptions options(final BlindRequest o, final Volume image, final Hyperstack openPsf, final String psfTitle, final List<String> notes) {
		final boolean is3D = image.nz() > 1;
		SupportBox support = supportBox(o, image);
		final PsfStart start;
		Optics optics = null;
		if (BlindRequest.FROM_OPTICS.equals(o.psf())) {
			optics = o.optics().optics();
			final Volume computed = fromOptics(o.optics(), image, notes);
			if (support == null && (computed.nx() > image.nx() || computed.ny() > image.ny() || computed.nz() > image.nz())) {
				support = new SupportBox(fit(computed.nx(), image.nx()), fit(computed.ny(), image.ny()), fit(computed.nz(), image.nz()));
				notes.add("The PSF from the optics (" + computed.nx() + " x " + computed.ny() + " x " + computed.nz() + ") was cropped to the image: support box "
						+ support);
			}
			start = PsfStart.given(computed);
		} else if (BlindRequest.GAUSSIAN.equals(o.psf())) {
			start = PsfStart.gaussian(o.fwhmXY(), o.fwhmZ());
		} else {
			if (openPsf == null) throw new IllegalArgumentException("No starting PSF '" + o.psf() + "' given (psf=)");
			start = PsfStart.given(new PsfSource.Given(openPsf, psfTitle, false).prepare(PsfPreparation.Target.of(Hyperstack.of(image)), notes).get(0));
		}
		if (o.band() != null) optics = o.band().optics();
		if (!is3D && support != null && support.nz() != 1) support = new SupportBox(support.nx(), support.ny(), 1);
		return new BlindOptions(o.iterations(), o.objectUpdates(), o.psfUpdates(), o.objectTv(), o.psfTv(), start, support, o.bandLimit(), o.symmetric(),
				o.centring(), optics, o.snapshotInterval(), o.edges(), o.offset(), o.background());
	}

	/** Largest odd size ≤ the image's that is ≤ n. */
	private static int fit(final int n, final int image) {
		final int cap = image % 2 == 1 ? image : image - 1;
		return Math.max(1, Math.min(n, cap));
	}

	/** The user's support box in voxels, or null (automatic) when the sizes are 0. */
	static SupportBox supportBox(final BlindRequest o, final Volume image) {
		final boolean is3D = image.nz() > 1;
		final double sxy = o.supportXY(), sz = is3D ? o.supportZ() : 0;
		if (sxy == 0 && sz == 0) return null;
		if (sxy == 0 || (is3D && sz == 0))
			throw new IllegalArgumentException("Give both support sizes (support_xy and support_z), or 0 for both (automatic)");
		if (BlindRequest.VOXELS.equals(o.supportUnits())) {
			final int nxy = whole("The support size support_xy", sxy);
			return new SupportBox(nxy, nxy, is3D ? whole("The support size support_z", sz) : 1);
		}
		final VoxelSize v = image.voxelSize();
		if (!v.isCalibrated())
			throw new IllegalArgumentException("A support box in microns needs the voxel size: calibrate the image, or give the box in voxels");
		final double f = PsfGrid.micronsPer(v);
		return new SupportBox(odd(sxy / (v.dx() * f)), odd(sxy / (v.dy() * f)), is3D ? odd(sz / (v.dz() * f)) : 1);
	}

	private static int whole(final String what, final double v) {
		if (v != Math.rint(v) || Math.abs(v) > Integer.MAX_VALUE) throw new IllegalArgumentException(what + " must be a whole number, got " + v);
		return (int) v;
	}

	/** The odd number of voxels whose extent is nearest to {@code voxels}: 2·round((voxels − 1) / 2) + 1, at least 1. */
	private static int odd(final double voxels) {
		return (int) Math.max(1, 2 * Math.round((voxels - 1) / 2) + 1);
	}

	/** The starting PSF from the optics, on their grid; its central plane for a 2D image. */
	private static Volume fromOptics(final OpticsRequest optics, final Volume image, final List<String> notes) {
		final VoxelSize v = image.voxelSize();
		if (v.isCalibrated()) {
			final double f = PsfGrid.micronsPer(v);
			final double dx = v.dx() * f, dz = v.dz() * f;
			if (Math.abs(optics.voxelXY() - dx) > 1e-3 * dx || (image.nz() > 1 && Math.abs(optics.voxelZ() - dz) > 1e-3 * dz))
				throw new IllegalArgumentException("The PSF from the optics would be sampled at " + PsfPreparation.fmt(optics.voxelXY()) + " x "
						+ PsfPreparation.fmt(optics.voxelZ()) + " µm but the image's voxels are " + PsfPreparation.fmt(dx) + " x " + PsfPreparation.fmt(dz)
						+ " µm: set voxel_xy and voxel_z to the image's");
		}
		final Volume p = optics.compute().withVoxelSize(v);
		if (image.nz() > 1 || p.nz() == 1) return p;
		notes.add("The image is 2D: the central plane of the PSF from the optics is the start");
		final Volume plane = Volume.zeros(p.nx(), p.ny(), 1, v);
		System.arraycopy(p.data(), ((p.nz() - 1) / 2) * p.nx() * p.ny(), plane.data(), 0, p.nx() * p.ny());
		return Psfs.normalized(plane);
	}
}
