package org.parfocal.demo;

import java.awt.Color;
import java.io.File;
import java.util.List;
import java.util.LinkedHashMap;
import java.util.Map;

import ij.CompositeImage;
import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.process.LUT;
import ij.io.FileSaver;
import ij.process.StackConverter;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Volume;
import org.parfocal.ij1.FirstView;
import org.parfocal.ij1.ImageBridge;

/**
 * Rebuilds Parfocal's sample stacks exactly: {@code java -cp <jar and deps> org.parfocal.demo.SampleStacks <folder>}.
 * See {@code sample-stacks/README.md} for the scene. Outputs (TIFF, calibrated in µm):
 * <ul>
 * <li>{@code quillwort-widefield.tif}: the simulated recording, 16-bit (camera counts, offset 100);</li>
 * <li>{@code quillwort-psf.tif}: the PSF used to simulate it ({@link SampleScene#psf()}), 32-bit, unit sum;</li>
 * <li>{@code quillwort-truth.tif}: the sharp object (for tests only; real samples have none), 32-bit;</li>
 * <li>{@code quillwort-beads.tif}: a bead recording on the same microscope (for {@code PSF from Beads...}), 16-bit,
 * and {@code quillwort-beads-psf.tif}, the PSF that simulated it;</li>
 * <li>{@code quillwort-two-channel.tif}: two channels (520 and 610 nm), 16-bit, and
 * {@code quillwort-two-channel-psf.tif}, one PSF channel per image channel, 32-bit.</li>
 * </ul>
 */
public final class SampleStacks {

	public static final long SEED = 20261201L;
	/**
	 * Noise seed of the bead recording: with SEED + 1 the file's pixel bytes happened to spell a known program's
	 * name, which the project's name check reads in every file; this seed does not.
	 */
	static final long BEAD_NOISE_SEED = SEED + 11;
	public static final int NX = 96, NY = 96, NZ = 24;
	/** Photons per intensity unit, and camera offset (counts) of the simulated recording. */
	public static final double PHOTONS = 1.0, BACKGROUND = 3, OFFSET = 100;

	private SampleStacks() {}

	/** Size of the bead recording, voxels. */
	public static final int BEADS_NX = 160, BEADS_NY = 160, BEADS_NZ = 32;

	/** The sample stacks by file name, in memory, each with a display range where its structure shows. */
	public static Map<String, ImagePlus> make() {
		final Volume truth = SampleScene.cell(NX, NY, NZ, SEED);
		final Volume psf = SampleScene.psf();
		final Acquisition acq = new Acquisition(psf, truth.shape(), new Acquisition.Options(Boundary.ZERO, true, BACKGROUND, PHOTONS, SEED, OFFSET));
		final Volume recorded = acq.record(truth, org.parfocal.core.Monitor.NONE);
		final Map<String, ImagePlus> out = new LinkedHashMap<>();
		final ImagePlus rec = ImageBridge.toImagePlus(recorded, "quillwort-widefield.tif");
		rec.setDisplayRange(0, 65535);
		new StackConverter(rec).convertToGray16();
		rec.setProperty("Info", "Parfocal sample stack (simulated): invented quillwort cell, invented Halden W-60 widefield, "
				+ "60x/1.2 water, emission 520 nm, Gibson-Lanni PSF 4 um deep in n=1.38, background " + BACKGROUND + ", " + PHOTONS + " photons per unit, camera offset "
				+ OFFSET + ", seed " + SEED);
		out.put("quillwort-widefield.tif", rec);
		out.put("quillwort-psf.tif", ImageBridge.toImagePlus(psf, "quillwort-psf.tif"));
		out.put("quillwort-truth.tif", ImageBridge.toImagePlus(truth, "quillwort-truth.tif"));

		// A bead recording on the same microscope: 100 nm beads 2 µm deep, for PSF from Beads.
		final Volume beadPsf = SampleScene.psf(SampleScene.EMISSION_UM, SampleScene.BEAD_DEPTH_UM);
		final Volume beads = SampleScene.beads(BEADS_NX, BEADS_NY, BEADS_NZ, 14, 30000, SEED + 1);
		final Volume beadRec = new Acquisition(beadPsf, beads.shape(), new Acquisition.Options(Boundary.ZERO, true, 10, PHOTONS, BEAD_NOISE_SEED, OFFSET))
				.record(beads, org.parfocal.core.Monitor.NONE);
		final ImagePlus beadImp = to16(ImageBridge.toImagePlus(beadRec, "quillwort-beads.tif"));
		beadImp.setProperty("Info", "Parfocal sample stack (simulated): invented 100 nm bead slide on the invented Halden W-60 widefield, "
				+ "60x/1.2 water, emission 520 nm, beads 2 um deep in n=1.38, background 10, " + PHOTONS + " photons per unit, camera offset " + OFFSET
				+ ", seeds " + (SEED + 1) + " (beads) and " + BEAD_NOISE_SEED + " (noise). quillwort-beads-psf.tif is the PSF used to simulate it.");
		out.put("quillwort-beads.tif", beadImp);
		out.put("quillwort-beads-psf.tif", ImageBridge.toImagePlus(beadPsf, "quillwort-beads-psf.tif"));

		// Two channels: threadlets and puncta (green, 520 nm) and ambersomes (red, 610 nm), each with its own PSF.
		final Volume red = SampleScene.ambersomes(NX, NY, NZ, SEED);
		final Volume redPsf = SampleScene.psf(SampleScene.RED_EMISSION_UM, SampleScene.DEPTH_UM);
		final Volume redRec = new Acquisition(redPsf, red.shape(), new Acquisition.Options(Boundary.ZERO, true, BACKGROUND, PHOTONS, SEED + 2, OFFSET))
				.record(red, org.parfocal.core.Monitor.NONE);
		final ImagePlus two = to16(ImageBridge.toImagePlus(new Hyperstack(2, 1, List.of(recorded, redRec)), "quillwort-two-channel.tif", null));
		two.setProperty("Info", "Parfocal sample stack (simulated): the invented quillwort cell in two channels on the invented Halden W-60 "
				+ "widefield: channel 1 threadlets and puncta (520 nm, as quillwort-widefield.tif), channel 2 ambersomes (610 nm, seed " + (SEED + 2)
				+ "); Gibson-Lanni PSFs 4 um deep in n=1.38, one per channel in quillwort-two-channel-psf.tif.");
		out.put("quillwort-two-channel.tif", composite(two));
		final ImagePlus twoPsf = ImageBridge.toImagePlus(new Hyperstack(2, 1, List.of(psf, redPsf)), "quillwort-two-channel-psf.tif", null);
		out.put("quillwort-two-channel-psf.tif", composite(twoPsf));
		// made again last, so that it is the newest PSF: Deconvolve preselects it for the widefield stack (the bead PSF was
		// made after it, for the bead recording); the map keeps its place in the order
		out.put("quillwort-psf.tif", ImageBridge.toImagePlus(psf, "quillwort-psf.tif"));
		for (final ImagePlus imp : out.values()) FirstView.showSomething(imp);
		return out;
	}

	/** 16-bit copy of a 32-bit image of whole camera counts (rounded, clipped to 0–65535), calibration and Info kept. */
	static ImagePlus to16(final ImagePlus imp) {
		final ImageStack in = imp.getStack(), s = new ImageStack(imp.getWidth(), imp.getHeight());
		for (int i = 1; i <= in.getSize(); i++) s.addSlice(null, in.getProcessor(i).convertToShortProcessor(false));
		final ImagePlus o = new ImagePlus(imp.getTitle(), s);
		o.setDimensions(imp.getNChannels(), imp.getNSlices(), imp.getNFrames());
		if (imp.getNChannels() > 1) o.setOpenAsHyperStack(true);
		o.setCalibration(imp.getCalibration().copy());
		return o;
	}

	private static ImagePlus composite(final ImagePlus imp) {
		final CompositeImage c = new CompositeImage(imp, IJ.COMPOSITE);
		c.setTitle(imp.getTitle());
		c.setCalibration(imp.getCalibration().copy());
		final Object info = imp.getProperty("Info");
		if (info != null) c.setProperty("Info", info);
		c.setChannelLut(LUT.createLutFromColor(Color.green), 1);
		c.setChannelLut(LUT.createLutFromColor(Color.magenta), 2);
		return c;
	}

	public static void main(final String[] args) {
		if (args.length != 1) {
			System.err.println("Usage: SampleStacks <output folder>");
			System.exit(2);
		}
		final File dir = new File(args[0]);
		if (!dir.isDirectory() && !dir.mkdirs()) {
			System.err.println("Cannot create folder " + dir);
			System.exit(1);
		}
		for (final Map.Entry<String, ImagePlus> e : make().entrySet()) {
			final String path = new File(dir, e.getKey()).getPath();
			if (!new FileSaver(e.getValue()).saveAsTiff(path)) {
				System.err.println("Could not write " + path);
				System.exit(1);
			}
			System.out.println("wrote " + path);
		}
	}
}
