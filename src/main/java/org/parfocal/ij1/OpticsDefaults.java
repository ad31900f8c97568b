package org.parfocal.ij1;

import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Optional;

import ij.ImagePlus;

import org.parfocal.command.CommandKeys;
import org.parfocal.provenance.Provenance;

/**
 * Optics a dialog can start from: the optics keys (model, modality, NA, indices, wavelengths, …) of the
 * nearest record that holds them — the image's own record (a PSF from Optics, a Deconvolve or Blind Deconvolve
 * run with {@code psf=from_optics}, a PSF from Beads with optics), else the records of its inputs, depth first
 * in the order they were used. Used only interactively: a macro always gets the documented defaults, so a
 * recorded line means the same whatever images are open.
 */
final class OpticsDefaults {

	private OpticsDefaults() {}

	/** Deepest record nesting followed (records are untrusted text). */
	private static final int MAX_DEPTH = 8;

	/** The optics keys and values found for {@code imp} (empty when none or in a macro). */
	static Map<String, String> of(final ImagePlus imp) {
		if (imp == null || Commands.isMacro()) return Map.of();
		final Optional<Provenance> rec = org.parfocal.ij1.ImageProvenance.of(imp);
		return rec.isEmpty() ? Map.of() : of(rec.get(), 0);
	}

	/** The optics keys of the nearest record in {@code p}'s tree that has an NA. */
	static Map<String, String> of(final Provenance p, final int depth) {
		if (p == null || depth > MAX_DEPTH) return Map.of();
		final Map<String, String> o = p.options();
		if (o.containsKey("na") && !"from_file".equals(o.get("optics")) && !"none".equals(o.get("optics"))) {
			final Map<String, String> out = new LinkedHashMap<>();
			for (final String spec : CommandKeys.OPTICS) {
				final String key = spec.substring(0, spec.indexOf(':'));
				if (o.containsKey(key) && !key.startsWith("voxel_") && !key.startsWith("size_")) out.put(key, o.get(key));
			}
			if (o.containsKey("optics")) out.putIfAbsent("model", o.get("optics")); // PSF from Beads names the model optics=
			return out;
		}
		for (final Provenance.Input in : p.inputs()) {
			final Map<String, String> m = of(in.source(), depth + 1);
			if (!m.isEmpty()) return m;
		}
		return Map.of();
	}

	/** The number under {@code key} in {@code found}, else {@code fallback}. */
	static double number(final Map<String, String> found, final String key, final double fallback) {
		final String v = found.get(key);
		if (v == null) return fallback;
		try {
			final double d = Double.parseDouble(v.trim());
			return Double.isFinite(d) ? d : fallback;
		} catch (final NumberFormatException e) {
			return fallback;
		}
	}

	/** The word under {@code key} in {@code found} when it is one of {@code allowed}, else {@code fallback}. */
	static String word(final Map<String, String> found, final String key, final String[] allowed, final String fallback) {
		final String v = found.get(key);
		if (v != null) for (final String a : allowed) if (a.equalsIgnoreCase(v.trim())) return a;
		return fallback;
	}
}
