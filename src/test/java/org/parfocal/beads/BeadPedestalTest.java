package org.parfocal.beads;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.parfocal.command.BeadsRequest;
import org.parfocal.command.BeadsRunner;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;

/**
 * PSF from Beads' check for a flat level left under the beads (found on a real 8-bit bead stack, where 28 % of the
 * averaged PSF's light lay beyond two model FWHM from the axis against 7 % for the model): the measured PSF's share
 * of light far from the axis against the optics model's. Recordings drawn by {@link SyntheticBeads} (the drawing grid
 * is the outside reference: where the light was put), seeded Poisson noise.
 */
class BeadPedestalTest {

	private static final String LINE = "image=beads box_xy=2.05 box_z=3 bead_diameter=0.1 background=stack optics=born-wolf modality=widefield na=1.2 "
			+ "immersion_index=1.333 sample_index=1.333 emission=0.52";

	/** Ten beads on a stack twice as tall as they need, so the stack's background level is the true one. */
	private static Volume recording(final double raisedUnderBeads) {
		final Volume clean = BeadPsfTest.GEN.stack(285, 240, 35);
		final double[][] pos = BeadPsfTest.tenBeads(clean);
		// a level under each bead's box that the rest of the stack does not have (the stack estimate misses it)
		final float[] d = clean.data();
		for (final double[] p : pos)
			for (int z = 0; z < clean.nz(); z++)
				for (int y = (int) p[1] - 21; y <= (int) p[1] + 21; y++)
					for (int x = (int) p[0] - 21; x <= (int) p[0] + 21; x++)
						d[x + clean.nx() * (y + clean.ny() * z)] += (float) raisedUnderBeads;
		return SyntheticBeads.record(clean, BeadPsfTest.BACKGROUND, 5);
	}

	private static BeadsRunner.Outcome run(final Volume rec) {
		return BeadsRunner.run(BeadsRequest.from(MacroOptions.parse(LINE)), rec, 16, "beads", Monitor.NONE);
	}

	@Test
	void aTrueBackgroundGivesTheModelsOuterLightAndNoWarning() {
		final BeadsRunner.Outcome o = run(recording(0));
		// the generating PSF is the model on this grid (same optics): its share far from the axis is the model's
		assertEquals(o.outer()[2], o.outer()[1], 0.03, "measured vs model share beyond " + o.outer()[0] + " µm");
		assertNull(o.pedestal(), o.pedestal());
		assertEquals(o.outer()[1], (double) o.facts().get("outer_light_share"), 0);
	}

	@Test
	void aLevelTheEstimateMissedIsWarnedAbout() {
		// 30 photons per voxel under each bead of 3·10⁶ photons: over the 41 × 41 × 21 voxel box a share f of the light
		// is flat; the expected share beyond the radius is the model's for the rest and the box's area share for f
		final double raised = 30;
		final BeadsRunner.Outcome o = run(recording(raised));
		final Volume psf = o.measurement().psf();
		final double flat = raised * psf.size(), f = flat / (flat + BeadPsfTest.PHOTONS);
		int beyond = 0;
		final int cx = (psf.nx() - 1) / 2, cy = (psf.ny() - 1) / 2;
		for (int y = 0; y < psf.ny(); y++)
			for (int x = 0; x < psf.nx(); x++)
				if (Math.hypot((x - cx) * BeadPsfTest.DX, (y - cy) * BeadPsfTest.DX) > o.outer()[0]) beyond++;
		final double expected = (1 - f) * o.outer()[2] + f * beyond / (double) (psf.nx() * psf.ny());
		assertEquals(expected, o.outer()[1], 0.03, "measured " + o.outer()[1] + " vs model " + o.outer()[2] + ", flat share " + f);
		assertTrue(o.outer()[1] > o.outer()[2] + 0.10, "measured " + o.outer()[1] + " vs model " + o.outer()[2]);
		assertNotNull(o.pedestal());
		assertTrue(o.pedestal().contains("flat level") && o.warnings().contains(o.pedestal()), o.warnings()::toString);
		// the border background takes the level out again
		final BeadsRunner.Outcome b = BeadsRunner.run(BeadsRequest.from(MacroOptions.parse(LINE.replace("background=stack", "background=border"))), recording(30), 16,
				"beads", Monitor.NONE);
		assertNull(b.pedestal(), b.pedestal());
	}
}
