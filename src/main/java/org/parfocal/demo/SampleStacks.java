package org.parfocal.demo;

import java.io.File;
import java.util.LinkedHashMap;
import java.util.Map;

import ij.ImagePlus;
import ij.io.FileSaver;
import ij.process.StackConverter;

import org.parfocal.conv.Acquisition;
import org.parfocal.core.Boundary;
import org.parfocal.core.Volume;
import org.parfocal.ij1.ImageBridge;

/**
 * Rebuilds Parfocal's sample stacks exactly: {@code java -cp <jar and deps> org.parfocal.demo.SampleStacks <folder>}.
 * See {@code sample-stacks/README.md} for the scene. Outputs (TIFF, calibrated in µm):
 * <ul>
 * <li>{@code quillwort-widefield.tif}: the simulated recording, 16-bit (camera counts, offset 100);</li>
 * <li>{@code quillwort-psf.tif}: the PSF used to simulate it ({@link SampleScene#psf()}), 32-bit, unit sum;</li>
 * <li>{@code quillwort-truth.tif}: the sharp object (for tests only; real samples have none), 32-bit.</li>
 * </ul>
 */
public final class SampleStacks {

	public static final long SEED = 20261201L;
	public static final int NX = 96, NY = 96, NZ = 24;
	/** Photons per intensity unit, and camera offset (counts) of the simulated recording. */
	public static final double PHOTONS = 1.0, BACKGROUND = 3, OFFSET = 100;

	private SampleStacks() {}

	/** The three stacks by file name, in memory. */
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
		return out;
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
