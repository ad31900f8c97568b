package org.parfocal.ij1;

import java.util.ArrayList;
import java.util.List;

import org.parfocal.command.BeadsKeys;
import org.parfocal.command.BlindKeys;
import org.parfocal.command.CompareKeys;
import org.parfocal.command.ConvolveKeys;
import org.parfocal.command.DeconvolveKeys;
import org.parfocal.command.Key;
import org.parfocal.command.KeyTable;
import org.parfocal.command.OtherKeys;
import org.parfocal.psf.OpticsFields.Group;

/**
 * The Help text of every Parfocal dialog: what each field means, its unit and its macro key, as HTML.
 * ImageJ 1.54's {@code GenericDialog.addHelp} opens a text that starts with {@code <html>} in its own HTML
 * window and treats any other text as a web address, so every text here starts with {@code <html>}.
 * ImageJ renders it with Swing's HTML 3.2 viewer: plain tables and inline styles only.
 */
final class DialogHelp {

	private DialogHelp() {}

	/** One field: its label as shown, its macro key, its unit ("" when it has none) and what it means. */
	record Field(String label, String key, String unit, String meaning) {}

	/** A help page: title, a short introduction, fields in dialog order, and optional closing notes. */
	static final class Page {
		private final String title, intro;
		private final List<Object> rows = new ArrayList<>();
		private final List<String> notes = new ArrayList<>();

		Page(final String title, final String intro) {
			this.title = title;
			this.intro = intro;
		}

		Page field(final String label, final String key, final String unit, final String meaning) {
			rows.add(new Field(label, key, unit, meaning));
			return this;
		}

		/** Rows for keys of a table, as their {@link Key} describes them (label, key, unit, meaning). */
		Page fields(final KeyTable table, final String... names) {
			for (final String n : names) {
				final Key k = table.key(n);
				field(k.helpLabel(), k.name(), k.unit(), k.help() + (k.rangeText().isEmpty() || k.kind() != org.parfocal.command.CommandKeys.Kind.NUMBER ? ""
						: " (" + k.rangeText() + ")") + macroDefault(k));
			}
			return this;
		}

		/** What a macro that leaves the key out gets, in words. */
		private static String macroDefault(final Key k) {
			if (k.kind() == org.parfocal.command.CommandKeys.Kind.FLAG) return k.shownChecked() ? ". Ticked at first in the dialog; a macro line without it: off" : "";
			return k.defaultValue().isEmpty() ? "" : ". Macro default: <code>" + k.defaultValue() + "</code>";
		}

		/** Rows for every key of a table, in its order. */
		Page fields(final KeyTable table) {
			return fields(table, table.names().toArray(String[]::new));
		}

		/** A group heading, as the dialog's own headings. */
		Page group(final String heading) {
			rows.add(heading);
			return this;
		}

		Page note(final String html) {
			notes.add(html);
			return this;
		}

		List<Field> fields() {
			return rows.stream().filter(Field.class::isInstance).map(Field.class::cast).toList();
		}

		String html() {
			final StringBuilder h = new StringBuilder("<html><body style=\"font-family:sans-serif;font-size:11pt\"><h2>").append(title).append("</h2>");
			h.append("<p>").append(intro).append("</p>");
			h.append("<table border=\"1\" cellpadding=\"3\" cellspacing=\"0\"><tr bgcolor=\"#e8e8e8\"><th>field</th><th>macro key</th><th>unit</th><th>what it means</th></tr>");
			for (final Object r : rows) {
				if (r instanceof Field f)
					h.append("<tr><td>").append(f.label()).append("</td><td><code>").append(f.key()).append("</code></td><td>")
							.append(f.unit().isEmpty() ? "&nbsp;" : f.unit()).append("</td><td>").append(f.meaning()).append("</td></tr>");
				else h.append("<tr bgcolor=\"#f4f4f4\"><td colspan=\"4\"><b>").append(r).append("</b></td></tr>");
			}
			h.append("</table>");
			for (final String n : notes) h.append("<p>").append(n).append("</p>");
			h.append("<p><i>Checkboxes are recorded as the bare key when ticked (e.g. <code>plot</code>) and left out when not. "
					+ "Deconvolved intensities are estimates and can show artefacts that look like structure.</i></p>");
			return h.append("</body></html>").toString();
		}
	}


	static Page convolve() {
		return new Page("Convolve with PSF", "Simulates a recording of an object: the object is blurred with the PSF, a background is "
				+ "added, then Poisson (shot) noise, then a camera offset. The result is a new 32-bit image; the inputs are not changed.")
				.fields(ConvolveKeys.MAIN);
	}

	/** A heading of the optics dialog as Help HTML. */
	private static String html(final Group g) {
		return g.heading().replace("&", "&amp;");
	}

	static Page psfFromOptics(final boolean withProfiles) {
		final Page p = new Page("PSF from Optics", "Computes a PSF from the objective, the sample and the light. The result is a 32-bit stack "
				+ "with unit sum, its emitter at the centre voxel, calibrated in &micro;m. Fields a model or modality does not use are "
				+ "greyed out and ignored: the Log and the record's <code>ignored</code> entry name them with the reason. Opened from the menu, the fields start from the optics in the current image's "
				+ "record, or in its inputs' records (a PSF from Optics, a run with <code>psf=from_optics</code>); a macro always gets "
				+ "the defaults below.")
				.fields(DeconvolveKeys.OPTICS, "model", "modality");
		Group group = null;
		for (final org.parfocal.psf.OpticsFields.Field f : org.parfocal.psf.OpticsFields.FIELDS) {
			if (f.group() != group) p.group(html(group = f.group()));
			p.fields(DeconvolveKeys.OPTICS, f.key());
		}
		if (withProfiles) p.fields(OtherKeys.PROFILES);
		return p.note("A warning is given (and recorded) when the voxel size is coarser than the Nyquist step &lambda;/(4&middot;NA) laterally.");
	}

	static Page beads() {
		return new Page("PSF from Beads", "Measures the PSF from a recording of sub-resolution fluorescent beads: finds the beads, fits "
				+ "each with a Gaussian to locate it below a voxel, rejects the unusable ones (with the reason in the table and in the image's "
				+ "overlay), aligns the rest by Fourier shifts, removes the background and averages them. The input's pixels are not changed.")
				.fields(BeadsKeys.MAIN, "image")
				.group("PSF box and beads").fields(BeadsKeys.MAIN, "box_xy", "box_z", "bead_diameter")
				.group("Detection and rejection").fields(BeadsKeys.MAIN, "threshold", "reject_saturated", "outlier_z", "background", "averaging", "symmetrize",
						"voxel_xy", "voxel_z")
				.group("Optics for comparison (optional; also sizes the box when it is 0)")
				.fields(BeadsKeys.MAIN, "optics", "modality", "na", "immersion_index", "sample_index", "depth", "emission")
				.group(html(Group.SCANNING)).fields(BeadsKeys.MAIN, "excitation", "pinhole")
				.group(html(Group.SHEET)).fields(BeadsKeys.MAIN, "sheet_thickness")
				.note("The Image list shows the images the command can measure (one channel, one time point, not RGB): recordings named "
						+ "for beads first, then other recordings, then stacks as small as a PSF, newest first. Choices are shown in words; "
						+ "the Recorder writes the values in <code>code</code> above, and macros may give either.");
	}

	static Page deconvolve() {
		return new Page("Deconvolve", "Removes blur from every channel and time point of a stack with a known PSF. The result is a new "
				+ "calibrated 32-bit image with its provenance in Image &gt; Show Info; Esc cancels and nothing is made. "
				+ "The result is an estimate: check it against controls before you measure.")
				.fields(DeconvolveKeys.MAIN)
				.note("<b>Preview</b> (no macro key, never recorded): a few iterations on a small region around the view and a few planes around the current one, in a "
						+ "temporary window; updated when a field changes, stopped by Esc or by closing the dialog.")
				.note("With <code>psf=from_optics</code> the keys of PSF from Optics follow (see its Help).");
	}

	/** Words of the edge modes, shared by Deconvolve and Blind Deconvolve. */

	static Page watch() {
		return new Page("Watch quality", "Every few iterations the iterate is compared with sharp reference images of the same kind of "
				+ "structure (a sliced Wasserstein distance between patches) and re-blurred against the data (chi-square). The suggested "
				+ "iteration is the one closest to the references; without references, the last whose chi-square is still at least 1 "
				+ "(Morozov's discrepancy principle). Treat it as a region to inspect, not an exact answer.")
				.fields(DeconvolveKeys.WATCH);
	}

	static Page blind() {
		return new Page("Blind Deconvolve", "Estimates the object and the PSF together, alternating Richardson&ndash;Lucy updates of "
				+ "each, with total variation. The PSF stays non-negative, sums to 1 and lives inside a support box; optional constraints "
				+ "below. Outputs: the deblurred image, the final PSF, and the PSF history (one frame per snapshot) with a table and plot of "
				+ "its FWHM and its distance to the start.")
				.fields(BlindKeys.MAIN, "image", "psf", "fwhm_xy", "fwhm_z")
				.group("Schedule").fields(BlindKeys.MAIN, "iterations", "object_updates", "psf_updates", "object_tv", "psf_tv")
				.group("PSF constraints").fields(BlindKeys.MAIN, "band_limit", "symmetric", "centring", "support_xy", "support_z", "support_units")
				.group("Output and data").fields(BlindKeys.MAIN, "snapshot_interval", "edges", "offset", "background")
				.group("How the PSF is estimated").fields(BlindKeys.MAIN, "estimate", "trust_radius", "watch")
				.note("The PSF list offers the open images that can be this image's PSF (Parfocal PSFs first, then small stacks with a "
						+ "positive sum; never RGB or the image itself), then the optics and the Gaussian; the newest Parfocal PSF is preselected. "
						+ "Choices are shown in words; the Recorder writes the values in <code>code</code> above, and macros may give either.");
	}

	static Page band() {
		return new Page("Optics for the band limit", "The band limit removes PSF frequencies above 2&middot;NA/&lambda;, which no objective "
				+ "transmits. Opened from the menu, the fields start from the starting PSF's record, else the image's (or their inputs' records); a macro gets the defaults.")
				.fields(BlindKeys.BAND);
	}

	static Page compare() {
		return new Page("Compare with Sharp References", "Judges a result against sharp reference images that show the same kind of "
				+ "structure but not the same cells (unmatched): a sliced Wasserstein distance between small patches, and 1D distances "
				+ "between the distributions of intensity, gradient magnitude and Laplacian. Smaller is closer. With the blurred input and "
				+ "the PSF it also re-blurs the result and compares with the data.")
				.fields(CompareKeys.MAIN)
				.note("<b>The table's columns.</b> <i>value</i>: the distance to the references (smaller is closer; for the re-blur rows, "
						+ "the chi-square, about 1 when the result explains the data down to the noise, and the whiteness of the residual); "
						+ "<i>95% low / 95% high</i>: the bootstrap interval of the distance; <i>noise floor</i>: the distance between two halves "
						+ "of the references themselves, about the smallest a result can reach; <i>blurred input</i>: the same distance for the "
						+ "blurred input; <i>gap closed</i>: (blurred input &minus; value) / (blurred input &minus; noise floor), the fraction of the "
						+ "way from the input to the references' own spread (1 = all the way, 0 = no better than the input, below 0 = worse); "
						+ "<i>why no gap</i>: why gap closed is blank (no input given, or the input is already within the noise floor, so there "
						+ "is no gap to close).")
				.note("<b>The plot.</b> Quantile curves of intensity and gradient magnitude: the references as wide light bands, the "
						+ "result as a dark line on top; where they overlap the result matches the references' distribution.");
	}

	static Page export() {
		return new Page("Export Provenance as Macro", "Writes an ImageJ macro (.ijm) that rebuilds the current image from its inputs by "
				+ "replaying the recorded chain of Parfocal commands.")
				.fields(OtherKeys.EXPORT);
	}

	static Page options() {
		return new Page("Parfocal Options", "Settings for every Parfocal command, kept in ImageJ's preferences.")
				.fields(OtherKeys.OPTIONS);
	}

	static Page report() {
		return new Page("Write Report", "Writes one self-contained HTML page about the current image's run: warnings first, then what was "
				+ "done, every parameter, the inputs with their calibration and SHA-256, projections with scale bars and display ranges, "
				+ "PSF views and profiles, convergence and watch curves. It opens in any browser and can be archived with the data.")
				.fields(OtherKeys.REPORT);
	}
}
