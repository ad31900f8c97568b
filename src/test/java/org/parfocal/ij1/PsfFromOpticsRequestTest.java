package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.ValueSource;
import org.parfocal.command.OpticsRequest;
import org.parfocal.command.PsfFromOpticsRequest;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.psf.Fwhm;
import org.parfocal.psf.Nyquist;
import org.parfocal.psf.PsfGrid;
import org.parfocal.testing.ImageJHarness;

/**
 * PSF from Optics by menu name and through {@link PsfFromOpticsRequest} (the command layer's one reader of its keys)
 * ask for the same run: the PSF's floats are bit-identical, the record's options are the request's line, and the
 * record's facts (grid, FWHM, ignored fields, Nyquist warning) are the request's. The project's own consistency:
 * written before the menu path went through the request, kept after.
 */
class PsfFromOpticsRequestTest {

	private static final String CMD = "PSF from Optics...";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** Gaussian widefield, automatic size; Born–Wolf confocal, sizes given; Gibson–Lanni with depth and coverslip; Richards–Wolf light sheet. */
	@ParameterizedTest
	@ValueSource(strings = {
			"model=gaussian modality=widefield na=1.2 immersion_index=1.333 emission=0.52 voxel_xy=0.2 voxel_z=0.5 size_xy=0 size_z=0 show_profiles",
			"model=born-wolf modality=confocal na=1.3 immersion_index=1.518 sample_index=1.4 emission=0.6 excitation=0.56 pinhole=0.8 "
					+ "voxel_xy=0.1 voxel_z=0.3 size_xy=15 size_z=9",
			"model=gibson-lanni modality=widefield na=1.3 immersion_index=1.518 sample_index=1.38 coverslip_index=1.525 coverslip_thickness=175 depth=5 "
					+ "immersion_index_design=1.515 coverslip_index_design=1.522 coverslip_thickness_design=170 working_distance=140 emission=0.52 "
					+ "voxel_xy=0.12 voxel_z=0.4 size_xy=15 size_z=11",
			"model=richards-wolf modality=light-sheet na=0.8 immersion_index=1.333 sample_index=1.333 emission=0.51 excitation=0.488 pinhole=1 "
					+ "sheet_thickness=1.5 voxel_xy=0.2 voxel_z=0.4 size_xy=11 size_z=7" })
	void menuAndRequestMakeTheSamePsfLineAndFacts(final String options) {
		final ImageJHarness.Result r = ImageJHarness.run(null, CMD, options);
		final ImagePlus menu = r.created().stream().filter(i -> i.getTitle().startsWith("psf-")).findFirst().orElseThrow();
		final PsfFromOpticsRequest request = PsfFromOpticsRequest.from(MacroOptions.parse(options));
		final OpticsRequest o = request.optics();
		final Volume psf = Commands.withImageJThreads(o::compute);
		assertArrayEquals(floatBits(psf.data()), floatBits(ImageBridge.toVolume(menu, "psf").data()), "bit-identical PSF");
		final Provenance record = ImageProvenance.of(menu).orElseThrow();
		assertEquals(MacroOptions.parse(request.macroOptions()), record.options(), "the record's options are the request's line");
		assertEquals(request, PsfFromOpticsRequest.from(record.options()), "the request read back from the record");
		final PsfGrid g = o.grid();
		final Map<String, Object> facts = new LinkedHashMap<>();
		facts.put("grid", g.nx() + "x" + g.ny() + "x" + g.nz());
		facts.put("fwhm_x_um", Fwhm.lateral(psf));
		facts.put("fwhm_y_um", Fwhm.lateralY(psf));
		facts.put("fwhm_z_um", Fwhm.axial(psf));
		if (!o.ignored().isEmpty()) facts.put("ignored", o.ignored());
		for (final Map.Entry<String, Object> e : facts.entrySet())
			assertEquals(String.valueOf(e.getValue()), String.valueOf(record.run().get(e.getKey())), "run fact " + e.getKey());
		final String warning = Nyquist.check(o.optics(), o.voxelXY(), o.voxelXY(), o.voxelZ());
		assertEquals(warning == null ? List.of() : List.of(warning), new ArrayList<>(record.warnings()), "the Nyquist warning");
	}

	private static int[] floatBits(final float[] a) {
		final int[] b = new int[a.length];
		for (int i = 0; i < a.length; i++) b[i] = Float.floatToRawIntBits(a[i]);
		return b;
	}
}
