package org.parfocal.scenes;

import java.io.IOException;
import java.io.Reader;
import java.nio.file.Files;
import java.nio.file.Path;

import com.google.gson.JsonObject;
import com.google.gson.JsonParser;

import ij.IJ;
import ij.ImagePlus;

import org.parfocal.core.Volume;
import org.parfocal.ij1.ImageBridge;

/**
 * One scene of the independent generator ({@code tools/scenes/make_scenes.py}, numpy/scipy, no Parfocal code):
 * the 16-bit recording (camera values), the true PSF, the true object in photons, the true background in
 * photons, and the camera's true parameters from the JSON sidecar.
 *
 * @param recording camera values (ADU) as floats
 * @param truth the object in photons per voxel
 * @param background the true background b(x) in photons per voxel
 * @param gain ADU per photon
 * @param readNoise read noise in ADU (standard deviation)
 * @param offset camera offset in ADU
 * @param meta the whole sidecar
 */
public record Scene(String name, Volume recording, Volume psf, Volume truth, Volume background, double gain, double readNoise,
		double offset, String backgroundKind, JsonObject meta) {

	/** Reads scene {@code name} from {@code dir}. */
	public static Scene load(final Path dir, final String name) {
		final JsonObject m;
		try (Reader r = Files.newBufferedReader(dir.resolve(name + ".json"))) {
			m = JsonParser.parseReader(r).getAsJsonObject();
		} catch (final IOException e) {
			throw new IllegalStateException("Cannot read " + dir.resolve(name + ".json") + ": " + e.getMessage(), e);
		}
		return new Scene(name, open(dir, name, "recording"), open(dir, name, "psf"), open(dir, name, "truth"), open(dir, name, "background"),
				m.get("gain_adu_per_photon").getAsDouble(), m.get("read_noise_adu").getAsDouble(), m.get("offset_adu").getAsDouble(),
				m.getAsJsonObject("background").get("kind").getAsString(), m);
	}

	private static Volume open(final Path dir, final String name, final String what) {
		final Path f = dir.resolve(name + "-" + what + ".tif");
		final ImagePlus imp = IJ.openImage(f.toString());
		if (imp == null) throw new IllegalStateException("Cannot open " + f);
		return ImageBridge.toVolume(imp, what);
	}

	/** Mean of the true background, in ADU after offset removal (the constant closest to it). */
	public double meanBackgroundAdu() {
		return background.sum() / background.data().length * gain;
	}

	/** The true background map in ADU after offset removal (a new volume). */
	public Volume backgroundAdu() {
		final float[] b = background.data().clone();
		for (int i = 0; i < b.length; i++) b[i] *= (float) gain;
		return Volume.wrap(b, background.nx(), background.ny(), background.nz(), background.voxelSize());
	}
}
