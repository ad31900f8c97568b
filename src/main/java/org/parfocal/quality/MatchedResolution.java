package org.parfocal.quality;

import java.util.List;
import java.util.Locale;

import org.parfocal.core.Smoothing;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.psf.Fwhm;

/**
 * The resolution the references are compared at: the result's expected resolution, as a lateral and an axial FWHM
 * in µm (in the result's voxels when calibrations are ignored; axial NaN = not matched along z).
 * <p>
 * <b>Why.</b> The patch distance measures every difference of local content, resolution included. References
 * sharper than any deconvolution of the recording can be (confocal or super-resolution references for a widefield
 * result, or references at much finer pixels) then sit far from every result, and the distance no longer ranks the
 * results by how well they are restored: it can prefer a blurrier or a noisier one. So before any feature is taken,
 * each reference is blurred to the result's expected resolution, and the result is left as it is: a result
 * blurrier than expected is still further from the references than a well restored one, and noise or ringing that
 * a sharp reference's texture would hide stands out against the smoother references.
 * <p>
 * <b>The rule.</b> Expected resolution = the PSF's FWHM divided by {@link #DECONVOLUTION_GAIN} (2) per axis
 * ({@link #expectedFromPsf}), or, without a PSF, the blurred input's apparent FWHM ({@link ApparentResolution})
 * divided by 2 ({@link #expectedFromInput}). A linear restoration that flattens the whole passband of an in-focus
 * Airy PSF narrows it 1.46×: the Airy disc's FWHM is 0.514 λ/NA, the FWHM of a flat disc of spatial frequencies up
 * to the cut-off 2NA/λ (the jinc 2J₁(v)/v, half maximum at v ≈ 2.215) is 0.353 λ/NA (Born &amp; Wolf §8.5 for the
 * Airy pattern, from memory; both half maxima computed with Commons Math's Bessel J₁ in {@code MatchedResolutionTest}).
 * Richardson–Lucy goes beyond that on positive objects (positivity extrapolates spatial frequencies past the
 * cut-off; Bertero &amp; Boccacci, Introduction to Inverse Problems in Imaging, 1998, from memory), so the factor is
 * larger than 1.46; 2 was chosen on the seeded scenes of {@code MatchedResolutionTest} (with √2 a too-blurred iterate
 * scored better than the best one; with 2 and 2.8 it did not). Each reference of apparent FWHM r (measured on its
 * own grid) is smoothed with a Gaussian of σ = √(σ_t² − σ_r² − σ_a²) (σ = FWHM/2.355; σ_a the anti-aliasing blur of
 * the resampling that follows, {@link Resampling}), nothing when that is not positive: blurs of Gaussians add in
 * quadrature. References blurrier than the expected resolution cannot be sharpened and are used as they are.
 * <p>
 * <b>Cost.</b> A result sharper than the expected resolution (Richardson–Lucy concentrating isolated points far
 * beyond the PSF) is now further from the references than one at that resolution: on sparse points matched
 * references favour an earlier iterate than the PSNR against the truth does (measured in the test's notes).
 * <p>
 * <b>Warnings</b> ({@link #notes}): a reference whose apparent FWHM differs from the expected one by more than
 * {@link #MISMATCH}× either way, or, without an expected resolution, from the result's own apparent FWHM.
 */
public record MatchedResolution(double lateral, double axial) {

	/** The assumed narrowing of the PSF's FWHM by deconvolution. */
	public static final double DECONVOLUTION_GAIN = 2;

	/** Ratio of apparent resolutions above which {@link #notes} warn. */
	public static final double MISMATCH = 2;

	private static final double SIGMA_TO_FWHM = 2 * Math.sqrt(2 * Math.log(2));

	public MatchedResolution {
		if (!(lateral > 0) || !Double.isFinite(lateral)) throw new IllegalArgumentException("The expected lateral resolution must be positive, got " + lateral);
		if (!(axial > 0 || Double.isNaN(axial)) || Double.isInfinite(axial)) throw new IllegalArgumentException("The expected axial resolution must be positive, got " + axial);
	}

	/**
	 * The PSF's FWHM (through its brightest voxel; lateral = mean of x and y) divided by {@link #DECONVOLUTION_GAIN}, in µm when
	 * {@code result} is calibrated (an uncalibrated PSF is taken to share the result's voxels), else in voxels;
	 * axial NaN for a 2D PSF or one too short to hold its half maximum.
	 */
	public static MatchedResolution expectedFromPsf(final Volume psf, final VoxelSize result) {
		final double[] u = !result.isCalibrated() ? new double[] { 1, 1, 1 } : units(psf.voxelSize().isCalibrated() ? psf.voxelSize() : result);
		final double lat = (Fwhm.lateral(psf) / psf.voxelSize().dx() * u[0] + Fwhm.lateralY(psf) / psf.voxelSize().dy() * u[1]) / 2;
		final double ax = psf.is3D() ? Fwhm.axial(psf) / psf.voxelSize().dz() * u[2] : Double.NaN;
		if (!(lat > 0)) throw new IllegalArgumentException("The PSF has no measurable lateral FWHM (its half maximum is not inside its box)");
		return new MatchedResolution(lat / DECONVOLUTION_GAIN, ax / DECONVOLUTION_GAIN);
	}

	/** The blurred input's apparent FWHM divided by {@link #DECONVOLUTION_GAIN} (µm when {@code calibrated}, else voxels). */
	public static MatchedResolution expectedFromInput(final Volume input, final boolean calibrated) {
		final double[] r = ApparentResolution.fwhm(input, calibrated ? units(input.voxelSize()) : new double[] { 1, 1, 1 });
		if (!(r[0] > 0)) throw new IllegalArgumentException("The input's resolution cannot be measured (constant, or blurred beyond " + ApparentResolution.MAX_LAG + " voxels)");
		return new MatchedResolution(r[0] / DECONVOLUTION_GAIN, r[1] / DECONVOLUTION_GAIN);
	}

	/** Voxel sizes in µm, or 1 per voxel when uncalibrated. */
	static double[] units(final VoxelSize v) {
		return v.isCalibrated() ? Resampling.microns(v, "The image") : new double[] { 1, 1, 1 };
	}

	/**
	 * {@code ref} (not modified) blurred to this resolution on its own grid, before it is resampled to
	 * {@code grid} (null: no resampling, sizes in voxels); a warning goes to {@code notes} when its apparent FWHM
	 * differs from this one by more than {@link #MISMATCH}×.
	 */
	Volume blurred(final Volume ref, final VoxelSize grid, final String name, final List<String> notes) {
		final double[] s = grid == null ? new double[] { 1, 1, 1 } : units(ref.voxelSize());
		final double[] t = grid == null ? new double[] { 1, 1, 1 } : units(grid);
		final double[] r = ApparentResolution.fwhm(ref, s);
		final double[] target = { lateral, lateral, axial }, own = { r[0], r[0], r[1] }, sigma = new double[3];
		for (int d = 0; d < (ref.is3D() ? 3 : 2); d++) {
			if (Double.isNaN(target[d])) continue;
			final double aa = s[d] < t[d] ? (t[d] / s[d] - 1) / 2 * s[d] : 0; // Resampling's anti-aliasing σ, in µm
			final double st = target[d] / SIGMA_TO_FWHM, sr = Double.isNaN(own[d]) ? st : own[d] / SIGMA_TO_FWHM;
			final double add = st * st - sr * sr - aa * aa;
			sigma[d] = add > 0 ? Math.sqrt(add) / s[d] : 0;
		}
		final String unit = grid == null ? "voxels" : "µm";
		if (r[0] * MISMATCH < lateral) // false for NaN: an unmeasurable reference is reported as blurrier below
			notes.add(String.format(Locale.ROOT, "%s looks %.2g times sharper than the result is expected to be (apparent FWHM %s against %s %s): it was"
					+ " blurred to %s %s before the comparison, so that sharper references cannot rank a blurrier result higher", name, lateral / r[0],
					num(r[0]), num(lateral), unit, num(lateral), unit));
		else if (!(r[0] <= MISMATCH * lateral))
			notes.add(String.format(Locale.ROOT, "%s looks %s than the result is expected to be (apparent FWHM %s against %s %s): it cannot be"
					+ " sharpened, so results sharper than it score worse; prefer references at least as sharp as the result", name,
					Double.isNaN(r[0]) ? "much blurrier" : String.format(Locale.ROOT, "%.2g times blurrier", r[0] / lateral), Double.isNaN(r[0]) ? "unmeasurable" : num(r[0]),
					num(lateral), unit));
		return sigma[0] > 0 || sigma[1] > 0 || sigma[2] > 0 ? Smoothing.gaussian(ref, sigma[0], sigma[1], sigma[2]) : ref;
	}

	/** The apparent lateral FWHM of {@code v} in µm (voxels when {@code grid} is null). */
	static double apparentLateral(final Volume v, final VoxelSize grid) {
		return ApparentResolution.fwhm(v, grid == null ? new double[] { 1, 1, 1 } : units(v.voxelSize()))[0];
	}

	/**
	 * Without an expected resolution: a warning when {@code ref} looks more than {@link #MISMATCH}× sharper or
	 * blurrier than the result (apparent lateral FWHM {@code result}, {@link #apparentLateral}), since nothing then
	 * matches them.
	 */
	static void compareUnmatched(final Volume ref, final double result, final VoxelSize grid, final String name, final List<String> notes) {
		final double a = apparentLateral(ref, grid), b = result;
		if (!(a > 0 && b > 0) || Math.max(a / b, b / a) <= MISMATCH) return;
		notes.add(String.format(Locale.ROOT, "%s looks %.2g times %s than the result (apparent FWHM %s against %s %s) and was not blurred to a common"
				+ " resolution (give the PSF or the blurred input): %s", name, Math.max(a / b, b / a), a < b ? "sharper" : "blurrier", num(a), num(b),
				grid == null ? "voxels" : "µm", a < b ? "sharper references can rank a blurrier result higher" : "results sharper than it score worse"));
	}

	/** Three significant digits, no trailing zeros. */
	static String num(final double v) {
		return new java.math.BigDecimal(v).round(new java.math.MathContext(3)).stripTrailingZeros().toPlainString();
	}
}
