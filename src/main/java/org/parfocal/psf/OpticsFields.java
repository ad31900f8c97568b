package org.parfocal.psf;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The optics fields of the PSF dialogs (PSF from Optics, and Deconvolve's PSF from the optics) in dialog order,
 * the heading each is grouped under, and which of them a model and a modality leave unused. An unused field is
 * still accepted (macro keys are public API) and recorded as entered, but it does not change the PSF: the
 * record lists it under {@code ignored} with the reason, and the dialog greys it out. No {@code ij.*}, no AWT.
 * <p>
 * What each model and modality reads is what their classes compute with: the excitation wavelength only for
 * confocal and two-photon ({@link Modality#usesExcitation}), the emission wavelength not for two-photon, the pinhole only for confocal, the sheet only for
 * a light sheet; the coverslip in use and the objective's design values only in models with the depth
 * aberration ({@link PsfModel#usesLayers}: Gibson &amp; Lanni, Richards &amp; Wolf). The sample index and the
 * depth also size the automatic box ({@link PsfGrid#forOptics}: the focal shift), so for the other models they
 * count as ignored only when both box sizes are given.
 */
public final class OpticsFields {

	private OpticsFields() {}

	/** The headings, in dialog order; the words are ours. */
	public enum Group {
		OBJECTIVE("Objective and sample (lengths in µm)"),
		LAYERS("Coverslip and depth in use (Gibson & Lanni, Richards & Wolf)"),
		DESIGN("What the objective is designed for (Gibson & Lanni, Richards & Wolf)"),
		LIGHT("Emitted light"),
		SCANNING("Confocal and two-photon only"),
		SHEET("Light sheet only"),
		SAMPLING("Sampling");

		private final String heading;

		Group(final String heading) { this.heading = heading; }

		/** The heading shown above the group's fields. */
		public String heading() { return heading; }
	}

	/** One numeric field: its macro key and group. */
	public record Field(String key, Group group) {}

	/** Every numeric optics field in dialog order (the order of the recorded line). */
	public static final List<Field> FIELDS = List.of(new Field("na", Group.OBJECTIVE), new Field("immersion_index", Group.OBJECTIVE),
			new Field("sample_index", Group.OBJECTIVE), new Field("coverslip_index", Group.LAYERS), new Field("coverslip_thickness", Group.LAYERS),
			new Field("depth", Group.LAYERS), new Field("immersion_index_design", Group.DESIGN), new Field("coverslip_index_design", Group.DESIGN),
			new Field("coverslip_thickness_design", Group.DESIGN), new Field("working_distance", Group.DESIGN), new Field("emission", Group.LIGHT),
			new Field("excitation", Group.SCANNING), new Field("pinhole", Group.SCANNING), new Field("sheet_thickness", Group.SHEET),
			new Field("voxel_xy", Group.SAMPLING), new Field("voxel_z", Group.SAMPLING), new Field("size_xy", Group.SAMPLING),
			new Field("size_z", Group.SAMPLING));

	/** The keys of {@code group}, in dialog order. */
	public static List<String> keys(final Group group) {
		final List<String> out = new ArrayList<>();
		for (final Field f : FIELDS) if (f.group() == group) out.add(f.key());
		return out;
	}

	/**
	 * The fields {@code model} and {@code modality} do not use, in dialog order, each with the reason in a few
	 * words; {@code sizesGiven} when both box sizes are given (not 0 = from the optics).
	 */
	public static Map<String, String> ignored(final PsfModel model, final Modality modality, final boolean sizesGiven) {
		final Map<String, String> out = new LinkedHashMap<>();
		final String m = model.key(), mod = modality.key();
		if (!model.usesLayers()) {
			final String noLayers = m + " has no depth aberration";
			if (sizesGiven) out.put("sample_index", noLayers + " (the sample index sizes only the automatic box, and the box was given)");
			for (final String k : List.of("coverslip_index", "coverslip_thickness")) out.put(k, noLayers + ": the coverslip is not used");
			if (sizesGiven) out.put("depth", noLayers + " (the depth sizes only the automatic box, and the box was given)");
			for (final String k : keys(Group.DESIGN)) out.put(k, noLayers + ": the objective's design values are not used");
		}
		if (!modality.usesEmission()) out.put("emission", "the two-photon PSF is the excitation PSF squared: the emission does not shape it (it is only checked to be shorter)");
		if (!modality.usesExcitation()) out.put("excitation", mod + " imaging uses the emission wavelength only");
		if (modality != Modality.CONFOCAL)
			out.put("pinhole", modality == Modality.TWO_PHOTON ? "two-photon detection is non-descanned: no pinhole" : mod + " modality has no pinhole");
		if (modality != Modality.LIGHT_SHEET) out.put("sheet_thickness", mod + " modality has no light sheet");
		return out;
	}

	/** True when {@code key} changes the PSF for this model, modality and box ({@link #ignored}). */
	public static boolean relevant(final String key, final PsfModel model, final Modality modality, final boolean sizesGiven) {
		return !ignored(model, modality, sizesGiven).containsKey(key);
	}

	/**
	 * The ignored fields as one Log line, keys with the same reason together: "excitation (widefield imaging uses
	 * the emission wavelength only); pinhole (widefield modality has no pinhole)", or "" when none.
	 */
	public static String sentence(final Map<String, String> ignored) {
		final Map<String, List<String>> byReason = new LinkedHashMap<>();
		for (final Map.Entry<String, String> e : ignored.entrySet()) byReason.computeIfAbsent(e.getValue(), r -> new ArrayList<>()).add(e.getKey());
		final StringBuilder s = new StringBuilder();
		for (final Map.Entry<String, List<String>> e : byReason.entrySet()) {
			if (s.length() > 0) s.append("; ");
			s.append(String.join(", ", e.getValue())).append(" (").append(e.getKey()).append(')');
		}
		return s.toString();
	}
}
