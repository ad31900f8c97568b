package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;

import ij.ImagePlus;
import ij.process.ImageProcessor;

import org.junit.jupiter.api.Test;
import org.parfocal.blind.PsfSnapshot;
import org.parfocal.core.Volume;

/**
 * The curves of the blind PSF-history plot are drawn in their legend's colours, not black (ImageJ 1.54 draws a
 * connected-circles line in the plot object's second colour). Outside reference: ImageJ's own plot rendering,
 * read back pixel by pixel.
 */
class PlotColoursTest {

	@Test
	void theFwhmCurvesAreInTheirLegendsColours() {
		final List<PsfSnapshot> snaps = new ArrayList<>();
		for (int i = 0; i <= 6; i += 2) snaps.add(new PsfSnapshot(i, Volume.zeros(3, 3, 3, org.parfocal.core.VoxelSize.microns(0.1, 0.1, 0.2)), 0.3 * (1 - 0.01 * i), 0.8 * (1 - 0.02 * i), 0.01 * i, 1));
		final ImagePlus imp = BlindOutputs.plot(snaps, "history").getImagePlus();
		final ImageProcessor ip = imp.getProcessor();
		int blue = 0, orange = 0;
		for (int y = 0; y < imp.getHeight(); y++)
			for (int x = 0; x < imp.getWidth(); x++) {
				final int v = ip.getPixel(x, y), r = (v >> 16) & 255, g = (v >> 8) & 255, b = v & 255;
				if (r == 20 && g == 110 && b == 160) blue++;
				if (r == 210 && g == 120 && b == 20) orange++;
			}
		// the markers alone (4 small circles each, plus the legend's sample) cover far fewer pixels than a 2-pixel line across the plot
		assertTrue(blue > 600, "lateral curve pixels in its colour: " + blue);
		assertTrue(orange > 600, "axial curve pixels in its colour: " + orange);
	}
}
