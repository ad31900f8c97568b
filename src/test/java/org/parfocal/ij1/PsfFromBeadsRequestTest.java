package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.command.BeadsRequest;
import org.parfocal.command.BeadsRunner;
import org.parfocal.core.Monitor;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.testing.ImageJHarness;

/**
 * The menu command {@code PSF from Beads...} and the front-end-free path ({@link BeadsRequest#from} +
 * {@link BeadsRunner#run}) give the same PSF, bit for bit, and the same run facts, on cases that use the keys:
 * both backgrounds and averagings, symmetrising, the box from the optics, a typed-in voxel size, the rejection
 * rules off. When this test was written the menu side was still the command's own dialog → options → measurement
 * path, so it proved the new path identical to it before that code was deleted. The project's own consistency.
 */
class PsfFromBeadsRequestTest {

	private static final String CMD = "PSF from Beads...";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void theMenuPathAndTheRequestPathGiveTheSamePsfAndFacts() {
		final ImagePlus in = PsfFromBeadsCommandTest.beads("beads.tif");
		ImageJHarness.open(in);
		final String optics = " modality=widefield na=1.2 immersion_index=1.333 sample_index=1.333 depth=0 emission=0.52 excitation=0.488 pinhole=1 "
				+ "sheet_thickness=2";
		final List<String> cases = List.of(PsfFromBeadsCommandTest.OPTIONS,
				"image=beads.tif box_xy=1.5 box_z=2.4 bead_diameter=0.2 threshold=5 outlier_z=0 background=border averaging=median symmetrize "
						+ "voxel_xy=0 voxel_z=0 optics=none",
				"image=beads.tif box_xy=0 box_z=2.4 bead_diameter=0.1 threshold=6 reject_saturated outlier_z=2.5 background=stack averaging=mean "
						+ "voxel_xy=0 voxel_z=0 optics=born-wolf" + optics,
				"image=beads.tif box_xy=1.2 box_z=2 bead_diameter=0 threshold=7 reject_saturated outlier_z=3.5 background=border averaging=mean "
						+ "voxel_xy=0.055 voxel_z=0.16 optics=gaussian" + optics.replace("widefield", "confocal"),
				"image=beads.tif box_xy=1.5 box_z=2.4");
		for (final String options : cases) {
			final BeadsRequest request = BeadsRequest.from(MacroOptions.parse(options));
			final BeadsRunner.Outcome direct = BeadsRunner.run(request, ImageBridge.toVolume(in, "The bead stack"), in.getBitDepth(), in.getTitle(),
					Monitor.NONE);
			final ImagePlus menu = ImageJHarness.run(in, CMD, options).onlyCreated();
			final float[] a = ImageBridge.toVolume(menu, "psf").data(), b = direct.measurement().psf().data();
			assertEquals(ConvolveWithPsfRequestTest.hash(a), ConvolveWithPsfRequestTest.hash(b), options);
			assertArrayEquals(a, b, options);
			final Provenance record = ImageProvenance.of(menu).orElseThrow();
			for (final Map.Entry<String, Object> e : direct.facts().entrySet())
				assertEquals(String.valueOf(e.getValue()), String.valueOf(record.run().get(e.getKey())), options + ": " + e.getKey());
			assertEquals(request, BeadsRequest.from(record.options()), options + ": the record reads back to the request");
		}
	}
}
