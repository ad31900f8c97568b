package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;

/**
 * Crossing between ImageJ images and the core: 8-, 16- and 32-bit images, stacks and hyperstacks (C, Z, T)
 * become {@link Hyperstack}s of float {@link Volume}s — always copies, so the core can never change a user's
 * image — and results come back as new 32-bit images with the input's calibration and dimension order.
 * <p>
 * Pixel values are the raw stored values (a 16-bit image's 0..65535), not values passed through a
 * calibration function.
 */
public final class ImageBridge {

	private ImageBridge() {}

	/**
	 * Copies an image into the core.
	 *
	 * @throws IllegalArgumentException with a one-line message for RGB images, empty stacks, or images too
	 *         large for one volume
	 */
	public static Hyperstack toCore(final ImagePlus imp) {
		check(imp);
		final int nx = imp.getWidth(), ny = imp.getHeight();
		final int nc = imp.getNChannels(), nz = imp.getNSlices(), nt = imp.getNFrames();
		Volume.checkedSize(nx, ny, nz);
		final VoxelSize vs = voxelSize(imp.getCalibration());
		final ImageStack stack = imp.getStack();
		final List<Volume> volumes = new ArrayList<>(nc * nt);
		for (int t = 1; t <= nt; t++)
			for (int c = 1; c <= nc; c++) {
				final Volume v = Volume.zeros(nx, ny, nz, vs);
				final float[] d = v.data();
				for (int z = 1; z <= nz; z++) {
					final ImageProcessor ip = stack.getProcessor(imp.getStackIndex(c, z, t));
					final int o = (z - 1) * nx * ny;
					if (ip instanceof FloatProcessor) System.arraycopy(ip.getPixels(), 0, d, o, nx * ny);
					else for (int i = 0; i < nx * ny; i++) d[o + i] = ip.getf(i);
				}
				volumes.add(v);
			}
		return new Hyperstack(nc, nt, volumes);
	}

	/** The single volume of a one-channel, one-frame image (e.g. a PSF). */
	public static Volume toVolume(final ImagePlus imp, final String what) {
		final Hyperstack h = toCore(imp);
		if (h.channels() != 1 || h.frames() != 1)
			throw new IllegalArgumentException(what + " '" + imp.getTitle() + "' has " + h.channels() + " channels and " + h.frames()
					+ " frames; one of each is expected");
		return h.first();
	}

	/** Rejects what the core cannot take, with one-line messages. */
	public static void check(final ImagePlus imp) {
		if (imp == null) throw new IllegalArgumentException("No image");
		if (imp.getStackSize() == 0 || imp.getWidth() == 0 || imp.getHeight() == 0)
			throw new IllegalArgumentException("'" + imp.getTitle() + "' is empty");
		if (imp.getType() == ImagePlus.COLOR_RGB)
			throw new IllegalArgumentException("'" + imp.getTitle() + "' is an RGB image: split it into channels (Image > Color > Split Channels) or convert it to 8, 16 or 32-bit");
	}

	/** New 32-bit image of the hyperstack, with a copy of {@code calibration} (may be null). */
	public static ImagePlus toImagePlus(final Hyperstack h, final String title, final Calibration calibration) {
		final int nx = h.nx(), ny = h.ny(), nz = h.nz(), nc = h.channels(), nt = h.frames();
		final ImageStack stack = new ImageStack(nx, ny);
		for (int t = 0; t < nt; t++)
			for (int z = 0; z < nz; z++)
				for (int c = 0; c < nc; c++) {
					final float[] plane = new float[nx * ny];
					System.arraycopy(h.get(c, t).data(), z * nx * ny, plane, 0, nx * ny);
					stack.addSlice(null, plane);
				}
		final ImagePlus imp = new ImagePlus(title, stack);
		imp.setDimensions(nc, nz, nt);
		if (nc > 1 || nt > 1) imp.setOpenAsHyperStack(true);
		if (calibration != null) imp.setCalibration(calibration.copy());
		else applyVoxelSize(imp, h.voxelSize());
		imp.resetDisplayRange();
		return imp;
	}

	/** New 32-bit image of one volume, calibrated from the volume's voxel size. */
	public static ImagePlus toImagePlus(final Volume v, final String title) {
		return toImagePlus(Hyperstack.of(v), title, null);
	}

	/** Voxel size from an ImageJ calibration ("pixel" unit when uncalibrated). */
	public static VoxelSize voxelSize(final Calibration cal) {
		if (cal == null || !cal.scaled()) return VoxelSize.UNCALIBRATED;
		final double dz = cal.pixelDepth > 0 ? cal.pixelDepth : 1;
		return new VoxelSize(cal.pixelWidth, cal.pixelHeight, dz, cal.getUnit());
	}

	/** Sets pixel width, height, depth and unit of {@code imp} from a voxel size. */
	public static void applyVoxelSize(final ImagePlus imp, final VoxelSize vs) {
		final Calibration cal = imp.getCalibration();
		if (!vs.isCalibrated()) return;
		cal.pixelWidth = vs.dx();
		cal.pixelHeight = vs.dy();
		cal.pixelDepth = vs.dz();
		cal.setUnit(vs.unit());
	}
}
