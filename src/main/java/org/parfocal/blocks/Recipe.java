package org.parfocal.blocks;

import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

import org.parfocal.command.CommandKeys;
import org.parfocal.command.DeconvolveRequest;
import org.parfocal.command.OpticsRequest;

import org.parfocal.core.SixteenBit;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;

/**
 * One deconvolution recipe, shared by the command line and the cluster runner: the {@code Deconvolve...} macro
 * options (as recorded, or from a provenance record's options) turned into what a core run needs — the
 * {@link DeconvolutionOptions} and where the PSF comes from (a file, or the optics for {@link PsfModels}).
 * <p>
 * Keys read (the public macro keys of {@code Deconvolve...}): {@code method iterations regularization stop
 * threshold edges offset background psf}; with {@code psf=from_optics} also {@code model modality na
 * immersion_index immersion_index_design sample_index coverslip_index coverslip_index_design
 * coverslip_thickness coverslip_thickness_design working_distance depth emission excitation pinhole
 * sheet_thickness voxel_xy voxel_z size_xy size_z}; {@code output} (32-bit or 16-bit). Missing keys take the dialog's first-use defaults (without
 * {@code method}, {@code iterations} and {@code stop}: the default run, {@link org.parfocal.deconv.DefaultRun}). The
 * other keys of {@code Deconvolve...} ({@code image plot watch recentre}, the watch keys) are ignored; a key it
 * does not have is refused in one line naming the closest ({@link CommandKeys#requireKnown}), in every runner. Immutable. Not serialisable (the option records it holds are not):
 * it travels to cluster tasks as its options text, from which {@link #parse} makes it again.
 *
 * @param options the deconvolution options
 * @param psfPath the PSF file (a {@code psf=} value that names a file, or the provenance record's PSF input
 *        path), or null with optics
 * @param optics the PSF from the optics, or null with a file
 * @param text the macro options it came from
 * @param sixteenBit {@code output=16-bit}: the output is stored as 16-bit values with a recorded scale and
 *        offset ({@link org.parfocal.core.SixteenBit}); false for {@code output=32-bit} or no {@code output=}
 */
public record Recipe(DeconvolutionOptions options, String psfPath, OpticsRequest optics, String text, boolean sixteenBit) {

	/** The {@code psf=} value that computes the PSF from the optics. */
	public static final String FROM_OPTICS = DeconvolveRequest.FROM_OPTICS;

	/** Parses macro options text (as {@code MacroOptions.parse} reads it). */
	public static Recipe parse(final String macroOptions) {
		return fromOptions(MacroOptions.parse(macroOptions), null);
	}

	/**
	 * The recipe of a recorded {@code Deconvolve} run: its options, and its PSF input's path when the PSF was an
	 * image with a known file.
	 */
	public static Recipe fromProvenance(final Provenance p) {
		if (!"Deconvolve".equals(p.command()))
			throw new IllegalArgumentException("The provenance record is of '" + p.command() + "', not of a Deconvolve run");
		String psf = null;
		for (final Provenance.Input in : p.inputs())
			if ("psf".equals(in.role()) && in.path() != null && !in.path().isBlank()) psf = in.path();
		return fromOptions(new LinkedHashMap<>(p.options()), psf);
	}

	/**
	 * Reads a recipe from text: a provenance JSON record (starts with '{'), or macro options.
	 */
	public static Recipe read(final String text) {
		final String t = text.strip();
		if (t.startsWith("{")) return fromProvenance(Provenance.fromJson(t));
		if (t.startsWith(Provenance.JSON_BEGIN) || t.startsWith(Provenance.TEXT_BEGIN))
			return fromProvenance(Provenance.findIn(t).orElseThrow(() -> new IllegalArgumentException("No provenance record found in the text")));
		return parse(t);
	}

	/**
	 * @param psfFromRecord the PSF file recorded with the options, used when {@code psf=} is not itself a file
	 */
	public static Recipe fromOptions(final Map<String, String> o, final String psfFromRecord) {
		// the keys of Deconvolve... (a typo is refused as in a macro, not run with the default)
		for (final String key : o.keySet()) CommandKeys.requireKnown(CommandKeys.DECONVOLVE, key);
		final DeconvolveRequest request = DeconvolveRequest.from(o); // the one reader of Deconvolve's keys (DeconvolveKeys)
		final DeconvolutionOptions d = request.deconvolution();
		final String psf = request.psf();
		final String text = MacroOptions.format(o);
		final boolean sixteen = SixteenBit.requested(o.get("output"));
		if (request.optics() != null) return new Recipe(d, null, request.optics(), text, sixteen);
		// a value with a folder in it is a file name even if missing: the PSF loader then says the file does not exist
		if (!psf.isEmpty() && (psf.contains("/") || psf.contains(java.io.File.separator) || java.nio.file.Files.isRegularFile(Path.of(psf))))
			return new Recipe(d, psf, null, text, sixteen);
		if (psfFromRecord != null) return new Recipe(d, psfFromRecord, null, text, sixteen);
		return new Recipe(d, null, null, text, sixteen);
	}

	/** This recipe with its PSF taken from {@code file}. */
	public Recipe withPsfFile(final String file) {
		return new Recipe(options, file, null, text, sixteenBit);
	}

	/** @throws IllegalArgumentException when the recipe does not say where its PSF comes from */
	public void requirePsf() {
		if (psfPath == null && optics == null)
			throw new IllegalArgumentException("The recipe's PSF is an image title, not a file: give the PSF file (--psf FILE) or psf=" + FROM_OPTICS);
	}

	@Override
	public String toString() {
		return String.format(Locale.ROOT, "%s, %d iteration(s), PSF %s", options.method().key(), options.iterations(),
				optics != null ? "from optics (" + optics.model() + ")" : psfPath == null ? "not given" : psfPath);
	}
}
