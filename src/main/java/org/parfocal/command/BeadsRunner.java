package org.parfocal.command;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.parfocal.beads.BeadOptions;
import org.parfocal.beads.BeadPsf;
import org.parfocal.beads.BeadStatus;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.provenance.MacroOptions;

/**
 * {@code PSF from Beads...}'s run without a front end: the voxel size (typed in, or the recording's calibration,
 * never 1 pixel = 1 µm), the box (typed in, or from the optics), the measurement ({@link BeadPsf#measure}) and the
 * model's FWHM to compare with. The ImageJ command makes the PSF image, the tables, the overlay and the record
 * from the {@link Outcome}. Threads come from the caller's context. No {@code ij.*}, no AWT.
 */
public final class BeadsRunner {

	private BeadsRunner() {}

	/** How far (share of the light) the measured PSF's outer light may exceed the model's before a warning. */
	static final double PEDESTAL_MARGIN = 0.10;

	/**
	 * What a run made.
	 *
	 * @param measurement the averaged PSF, the beads and the measurement's facts
	 * @param modelFwhm the optics model's FWHM (µm, x y z), or null without optics
	 * @param voxelSize the voxel size the recording was measured with
	 * @param is3D true for a z-stack
	 * @param bitDepth the recording's bit depth, as given
	 * @param outer {radius (µm), the measured PSF's share of light beyond it from the axis, the model's (NaN without
	 *        optics)}: the radius is 2 lateral FWHM of the model, or of the measurement without optics
	 * @param pedestal the warning that the measured PSF holds much more light far from the axis than the model, or null
	 */
	public record Outcome(BeadPsf.Result measurement, double[] modelFwhm, VoxelSize voxelSize, boolean is3D, int bitDepth, double[] outer,
			String pedestal) {

		/** The run facts for the record, in order. */
		public Map<String, Object> facts() {
			final BeadPsf.Result m = measurement;
			final Volume psf = m.psf();
			final Map<BeadStatus, Integer> counts = m.counts();
			final Map<String, Object> f = new LinkedHashMap<>();
			f.put("box_um", String.format(Locale.ROOT, "%.4g x %.4g x %.4g", psf.nx() * psf.voxelSize().dx(), psf.ny() * psf.voxelSize().dy(),
					psf.nz() * psf.voxelSize().dz()));
			f.put("bit_depth", bitDepth);
			f.put("beads_found", m.beads().size());
			f.put("beads_accepted", counts.get(BeadStatus.ACCEPTED));
			f.put("satellites", m.satellites());
			f.put("detection_threshold", m.threshold());
			f.put("negative_voxels_clipped", m.clipped());
			f.put("fwhm_x_um", m.fwhm()[0]);
			f.put("fwhm_y_um", m.fwhm()[1]);
			if (is3D) f.put("fwhm_z_um", m.fwhm()[2]);
			for (final BeadStatus st : BeadStatus.values())
				if (st != BeadStatus.ACCEPTED && counts.get(st) > 0) f.put("rejected_" + st.name().toLowerCase(Locale.ROOT), counts.get(st));
			if (modelFwhm != null) {
				f.put("model_fwhm_x_um", modelFwhm[0]);
				f.put("model_fwhm_y_um", modelFwhm[1]);
				if (is3D) f.put("model_fwhm_z_um", modelFwhm[2]);
			}
			f.put("outer_light_radius_um", outer[0]);
			f.put("outer_light_share", outer[1]);
			if (!Double.isNaN(outer[2])) f.put("model_outer_light_share", outer[2]);
			return f;
		}

		/** One line: beads averaged and the FWHM. */
		public String summary() {
			final BeadPsf.Result m = measurement;
			return String.format(Locale.ROOT, "%d of %d beads averaged; FWHM %.3f x %.3f%s µm", m.counts().get(BeadStatus.ACCEPTED), m.beads().size(),
					m.fwhm()[0], m.fwhm()[1], is3D ? String.format(Locale.ROOT, " x %.3f", m.fwhm()[2]) : "");
		}

		/** The measurement's warnings, then the pedestal warning. */
		public List<String> warnings() {
			final List<String> w = new java.util.ArrayList<>(measurement.warnings());
			if (pedestal != null) w.add(pedestal);
			return List.copyOf(w);
		}
	}

	/**
	 * Measures the PSF of the beads in {@code stack} as {@code request} asks. The request's image name is the front
	 * end's: {@code stack} (not modified) is what it names, {@code title} how to call it in a message.
	 *
	 * @param bitDepth the recording's bit depth (saturation is its maximum; 24 counts as 32)
	 * @throws IllegalArgumentException one line, for input the run cannot take
	 */
	public static Outcome run(final BeadsRequest request, final Volume stack, final int bitDepth, final String title, final Monitor monitor) {
		final BeadsRequest o = request;
		Volume in = stack;
		final boolean is3D = in.nz() > 1;
		if (o.voxelXY() > 0 && (o.voxelZ() > 0 || !is3D)) in = in.withVoxelSize(VoxelSize.microns(o.voxelXY(), o.voxelXY(), o.voxelZ() > 0 ? o.voxelZ() : 1));
		else if (!in.voxelSize().isCalibrated())
			throw new IllegalArgumentException("'" + title + "' has no voxel size: enter voxel_xy and voxel_z in µm (or set them in Image > Properties...)");
		double boxXY = o.boxXY(), boxZ = is3D ? o.boxZ() : 0;
		if (!is3D && o.boxZ() > 0)
			throw new IllegalArgumentException("'" + title + "' is a single plane but box_z is " + MacroOptions.number(o.boxZ())
					+ " µm: give a z-stack, or set box_z to 0 for a 2D PSF");
		if (boxXY == 0 || (is3D && boxZ == 0)) {
			if (o.optics() == null) throw new IllegalArgumentException("Enter the box size (box_xy" + (is3D ? ", box_z" : "") + " in µm), or give the optics to choose it");
			final double[] b = BeadPsf.defaultBox(o.optics());
			if (boxXY == 0) boxXY = b[0];
			if (is3D && boxZ == 0) boxZ = b[1];
		}
		final BeadOptions bo = new BeadOptions(boxXY, boxZ, o.beadDiameter(), o.threshold(), o.rejectSaturated(), bitDepth == 24 ? 32 : bitDepth, o.outlierZ(),
				o.background(), o.averaging(), o.symmetrize());
		final BeadPsf.Result m = BeadPsf.measure(in, bo, monitor);
		final Volume modelPsf = o.optics() == null ? null : BeadPsf.model(o.model(), o.optics(), m.psf());
		final double[] model = modelPsf == null ? null : BeadPsf.fwhm(modelPsf);
		final double radius = 2 * (model != null ? model[0] : m.fwhm()[0]);
		final double[] outer = { radius, BeadPsf.outerShare(m.psf(), radius), modelPsf == null ? Double.NaN : BeadPsf.outerShare(modelPsf, radius) };
		// a flat level under the beads that the background estimate missed spreads light over the whole box, which
		// no optics model does; 10 points above the model's share is far beyond the noise of a few averaged beads
		final String pedestal = outer[1] > outer[2] + PEDESTAL_MARGIN ? String.format(Locale.ROOT,
				"%.0f %% of the measured PSF's light lies farther than %.3g µm (2 model FWHM) from its axis, against %.0f %% for the %s model: "
						+ "a flat level under the beads was left in (a background higher than the estimate, or light of neighbours); "
						+ "try background=border or a smaller box_xy, and check the background around the beads",
				100 * outer[1], radius, 100 * outer[2], o.model()) : null;
		return new Outcome(m, model, in.voxelSize(), is3D, bitDepth, outer, pedestal);
	}
}
