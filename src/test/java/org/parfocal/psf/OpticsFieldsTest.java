package org.parfocal.psf;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Map;
import java.util.function.BiFunction;

import org.junit.jupiter.api.Test;
import org.parfocal.core.Volume;

/**
 * Which optics fields a model and a modality ignore, checked against the models themselves: a field listed as
 * ignored must leave the computed PSF bit for bit unchanged when its value changes, and every field not listed
 * must change it. The outside reference is the models' own arithmetic (each tested against published closed forms
 * in PupilModelsTest and GaussianModelTest); this test only ties the list to what they compute.
 */
class OpticsFieldsTest {

	/** Off the design condition, so the layer fields matter for Gibson & Lanni (at design values they cancel). */
	private static Optics.Builder base(final Modality m) {
		return Optics.builder().modality(m).na(1.2).immersionIndex(1.518).immersionIndexDesign(1.515).sampleIndex(1.45).coverslipIndex(1.522)
				.coverslipIndexDesign(1.52).coverslipThickness(170).coverslipThicknessDesign(172).workingDistance(150).depth(3)
				.emissionWavelength(0.52).excitationWavelength(m == Modality.TWO_PHOTON ? 0.92 : 0.488).pinholeAiryUnits(1).sheetThickness(2);
	}

	/** The same optics with one field changed (still valid). */
	private static final Map<String, BiFunction<Optics.Builder, Modality, Optics.Builder>> CHANGE = Map.ofEntries(
			Map.entry("na", (b, m) -> b.na(1.1)), Map.entry("immersion_index", (b, m) -> b.immersionIndex(1.5)),
			Map.entry("sample_index", (b, m) -> b.sampleIndex(1.38)), Map.entry("coverslip_index", (b, m) -> b.coverslipIndex(1.5)),
			Map.entry("coverslip_thickness", (b, m) -> b.coverslipThickness(160)), Map.entry("depth", (b, m) -> b.depth(6)),
			Map.entry("immersion_index_design", (b, m) -> b.immersionIndexDesign(1.53)), Map.entry("coverslip_index_design", (b, m) -> b.coverslipIndexDesign(1.5)),
			Map.entry("coverslip_thickness_design", (b, m) -> b.coverslipThicknessDesign(180)), Map.entry("working_distance", (b, m) -> b.workingDistance(120)),
			Map.entry("emission", (b, m) -> b.emissionWavelength(0.58)), Map.entry("excitation", (b, m) -> b.excitationWavelength(m == Modality.TWO_PHOTON ? 0.8 : 0.56)),
			Map.entry("pinhole", (b, m) -> b.pinholeAiryUnits(0.4)), Map.entry("sheet_thickness", (b, m) -> b.sheetThickness(0.8)));

	private static final PsfGrid GRID = new PsfGrid(9, 9, 7, 0.1, 0.1, 0.3);

	@Test
	void aFieldIsListedIgnoredExactlyWhenChangingItLeavesThePsfUnchanged() {
		final List<String> wrong = new ArrayList<>();
		int compared = 0;
		for (final PsfModel model : PsfModels.all())
			for (final Modality m : Modality.values()) {
				final Map<String, String> ignored = OpticsFields.ignored(model, m, true);
				final float[] ref = model.compute(base(m).build(), GRID).data();
				for (final Map.Entry<String, BiFunction<Optics.Builder, Modality, Optics.Builder>> e : CHANGE.entrySet()) {
					final Volume v = model.compute(e.getValue().apply(base(m), m).build(), GRID);
					final boolean same = Arrays.equals(ref, v.data());
					compared++;
					if (same != ignored.containsKey(e.getKey()))
						wrong.add(model.key() + " " + m.key() + " " + e.getKey() + (same ? ": PSF unchanged but not listed" : ": PSF changed but listed ignored"));
				}
			}
		assertEquals(PsfModels.all().size() * 4 * 14, compared);
		assertTrue(wrong.isEmpty(), () -> String.join("\n", wrong));
	}

	@Test
	void withAnAutomaticBoxTheSampleIndexAndDepthSizeTheBoxSoTheyAreNotListed() {
		final PsfModel bw = PsfModels.get("born-wolf");
		final Map<String, String> auto = OpticsFields.ignored(bw, Modality.WIDEFIELD, false);
		assertFalse(auto.containsKey("depth") || auto.containsKey("sample_index"), auto::toString);
		assertTrue(auto.containsKey("coverslip_index"), auto::toString);
		// PsfGrid.forOptics: the box grows with the paraxial focal shift depth·(n_i/n_s − 1)
		final Optics shallow = base(Modality.WIDEFIELD).build(), deep = base(Modality.WIDEFIELD).depth(40).build();
		assertTrue(PsfGrid.forOptics(deep, 0.1, 0.1, 0.3).nz() > PsfGrid.forOptics(shallow, 0.1, 0.1, 0.3).nz());
	}

	@Test
	void theReasonsAndGroupsReadAsTheDialogShowsThem() {
		final Map<String, String> wf = OpticsFields.ignored(PsfModels.get("gibson-lanni"), Modality.WIDEFIELD, true);
		assertEquals(List.of("excitation", "pinhole", "sheet_thickness"), List.copyOf(wf.keySet()), "dialog order");
		assertEquals("widefield modality has no pinhole", wf.get("pinhole"));
		assertEquals("excitation (widefield imaging uses the emission wavelength only); pinhole (widefield modality has no pinhole); "
				+ "sheet_thickness (widefield modality has no light sheet)", OpticsFields.sentence(wf));
		assertTrue(OpticsFields.ignored(PsfModels.get("gibson-lanni"), Modality.CONFOCAL, true).keySet().equals(java.util.Set.of("sheet_thickness")));
		assertEquals(List.of("excitation", "pinhole"), OpticsFields.keys(OpticsFields.Group.SCANNING));
		assertEquals(18, OpticsFields.FIELDS.stream().map(OpticsFields.Field::key).distinct().count(), "18 keys, each once");
	}
}
