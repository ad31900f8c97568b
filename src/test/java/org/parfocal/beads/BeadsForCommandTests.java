package org.parfocal.beads;

import org.parfocal.core.Volume;

/** A small synthetic bead stack for the command tests in {@code org.parfocal.ij1} (the generator is package-private). */
public final class BeadsForCommandTests {

	private BeadsForCommandTests() {}

	/** 130 × 130 × 27 voxels of 0.05 × 0.05 × 0.15 µm: four beads at sub-voxel positions and one whose box leaves the image; seeded noise. */
	public static Volume stack() {
		final Volume clean = BeadPsfTest.GEN.stack(130, 130, 27);
		BeadPsfTest.GEN.add(clean, 30.2, 30.4, 13.25, BeadPsfTest.PHOTONS);
		BeadPsfTest.GEN.add(clean, 90.6, 30.8, 13.5, BeadPsfTest.PHOTONS);
		BeadPsfTest.GEN.add(clean, 30.4, 90.2, 12.75, BeadPsfTest.PHOTONS);
		BeadPsfTest.GEN.add(clean, 90.0, 90.6, 13, BeadPsfTest.PHOTONS);
		BeadPsfTest.GEN.add(clean, 125, 60, 13, BeadPsfTest.PHOTONS);
		return SyntheticBeads.record(clean, BeadPsfTest.BACKGROUND, 21);
	}
}
