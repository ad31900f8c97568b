package org.parfocal.blocks;

import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Locale;
import java.util.Map;

import org.parfocal.core.SixteenBit;
import org.parfocal.core.Volume;
import org.parfocal.deconv.DeconvolutionMethod;
import org.parfocal.deconv.DeconvolutionOptions;
import org.parfocal.deconv.EdgeMode;
import org.parfocal.deconv.Level;
import org.parfocal.deconv.Stopping;
import org.parfocal.provenance.CommandKeys;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.provenance.Provenance;
import org.parfocal.psf.Modality;
import org.parfocal.psf.Optics;
import org.parfocal.psf.PsfGrid;
import org.parfocal.psf.PsfModels;

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
public record Recipe(DeconvolutionOptions options, String psfPath, OpticsPsf optics, String text, boolean sixteenBit) {

	/** The {@code psf=} value that computes the PSF from the optics. */
	public static final String FROM_OPTICS = "from_optics";

	/** A PSF from the optics: model key, optics, voxel sizes (µm) and grid sizes (0 = from the optics). */
	public record OpticsPsf(String model, Optics optics, double voxelXY, double voxelZ, int sizeXY, int sizeZ) {

		/** The grid the PSF is sampled on (as {@code PSF from Optics...} chooses it). */
		public PsfGrid grid() {
			final PsfGrid auto = PsfGrid.forOptics(optics, voxelXY, voxelXY, voxelZ);
			return new PsfGrid(sizeXY == 0 ? auto.nx() : sizeXY, sizeXY == 0 ? auto.ny() : sizeXY, sizeZ == 0 ? auto.nz() : sizeZ, voxelXY, voxelXY,
					voxelZ);
		}

		/** Computes the PSF (µm, unit sum, centred). */
		public Volume compute() {
			return PsfModels.get(model).compute(optics, grid());
		}
	}

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
		final DeconvolutionMethod method = DeconvolutionMethod.parse(get(o, "method", org.parfocal.deconv.DefaultRun.METHOD.key()));
		final int iterations = (int) whole(o, "iterations", org.parfocal.deconv.DefaultRun.CAP);
		final double regularization = number(o, "regularization", 0.002);
		final Stopping stop = Stopping.parse(get(o, "stop", org.parfocal.deconv.DefaultRun.stop(o.containsKey("iterations")).key()));
		final double threshold = number(o, "threshold", 0.001);
		final EdgeMode edges = EdgeMode.parse(get(o, "edges", EdgeMode.NON_CIRCULANT.key()));
		final DeconvolutionOptions d = new DeconvolutionOptions(method, iterations, regularization, stop,
				stop == Stopping.RELATIVE_CHANGE ? threshold : threshold > 0 && threshold < 1 ? threshold : 0.001, edges,
				level("offset", get(o, "offset", "auto")), level("background", get(o, "background", org.parfocal.deconv.DefaultRun.BACKGROUND)));
		final String psf = get(o, "psf", "");
		final String text = MacroOptions.format(o);
		final boolean sixteen = SixteenBit.requested(o.get("output"));
		if (FROM_OPTICS.equalsIgnoreCase(psf)) return new Recipe(d, null, optics(o), text, sixteen);
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

	/** "auto" = estimated, "0" or "" = none, else a number (as {@code Deconvolve}). */
	public static Level level(final String key, final String text) {
		final String t = text.trim();
		if (t.isEmpty() || t.equals("0")) return Level.NONE;
		if (t.equalsIgnoreCase("auto")) return Level.ESTIMATED;
		if (t.equalsIgnoreCase("dark") && key.equals("background")) return Level.DARK;
		if (t.equalsIgnoreCase("fit") && key.equals("background")) return Level.FIT; // whole-stack runs fit it; block runs refuse it in one line
		if (t.equalsIgnoreCase("fit-smooth") && key.equals("background")) return Level.FIT_SMOOTH;
		try {
			final double v = Double.parseDouble(t);
			return v == 0 ? Level.NONE : Level.of(v);
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException("'" + t + "' is not a number or auto (" + key + "=)");
		}
	}

	private static OpticsPsf optics(final Map<String, String> o) {
		final String model = get(o, "model", "gibson-lanni");
		PsfModels.get(model);
		final Modality modality = Modality.parse(get(o, "modality", "widefield"));
		final double emission = number(o, "emission", 0.52), excitation = number(o, "excitation", 0.488);
		final Optics optics = Optics.builder().modality(modality).na(number(o, "na", 1.4)).immersionIndex(number(o, "immersion_index", 1.518))
				.immersionIndexDesign(number(o, "immersion_index_design", 1.518)).sampleIndex(number(o, "sample_index", 1.518))
				.coverslipIndex(number(o, "coverslip_index", 1.522)).coverslipIndexDesign(number(o, "coverslip_index_design", 1.522))
				.coverslipThickness(number(o, "coverslip_thickness", 170)).coverslipThicknessDesign(number(o, "coverslip_thickness_design", 170))
				.workingDistance(number(o, "working_distance", 150)).depth(number(o, "depth", 0))
				.emissionWavelength(modality.usesEmission() || emission > 0 ? emission : Double.NaN)
				.excitationWavelength(modality.usesExcitation() ? excitation : Double.NaN).pinholeAiryUnits(number(o, "pinhole", 1))
				.sheetThickness(modality == Modality.LIGHT_SHEET ? number(o, "sheet_thickness", 2) : Double.NaN).build();
		final double vxy = number(o, "voxel_xy", 0), vz = number(o, "voxel_z", 0);
		if (!(vxy > 0) || !(vz > 0))
			throw new IllegalArgumentException("Give the voxel size (voxel_xy and voxel_z in µm): the PSF cannot assume 1 pixel = 1 µm");
		final int sxy = (int) whole(o, "size_xy", 0), sz = (int) whole(o, "size_z", 0);
		if (sxy < 0 || sz < 0) throw new IllegalArgumentException("Sizes must be 0 (from the optics) or positive odd numbers");
		return new OpticsPsf(model, optics, vxy, vz, sxy, sz);
	}

	private static String get(final Map<String, String> o, final String key, final String def) {
		final String v = o.get(key);
		return v == null ? def : v;
	}

	private static double number(final Map<String, String> o, final String key, final double def) {
		final String v = o.get(key);
		if (v == null) return def;
		try {
			return Double.parseDouble(v.trim());
		} catch (final NumberFormatException e) {
			throw new IllegalArgumentException("'" + v + "' is not a number (" + key + "=)");
		}
	}

	private static double whole(final Map<String, String> o, final String key, final double def) {
		final double v = number(o, key, def);
		if (v != Math.rint(v)) throw new IllegalArgumentException(key + " must be a whole number, got " + v);
		return v;
	}

	@Override
	public String toString() {
		return String.format(Locale.ROOT, "%s, %d iteration(s), PSF %s", options.method().key(), options.iterations(),
				optics != null ? "from optics (" + optics.model() + ")" : psfPath == null ? "not given" : psfPath);
	}
}
