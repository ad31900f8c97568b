package org.parfocal.command;

/** The keys of {@code Convolve with PSF...}, in dialog order, each described once ({@link Key}). */
public final class ConvolveKeys {

	private ConvolveKeys() {}

	public static final KeyTable MAIN = KeyTable.of("Convolve with PSF")
			.text("image", "Image:", "", "", "the object (a sharp image or a simulated scene)")
			.text("psf", "PSF:", "", "", "the point spread function; its centre voxel is at (k&minus;1)/2 along each axis")
			.word("boundary", "Boundary:", "mirror", "how the object continues past its edges while blurring: <code>zero</code>, "
					+ "<code>mirror</code> (reflected) or <code>periodic</code> (wrapped)")
			.flag("normalize", "Normalize PSF to unit sum", true, "divide the PSF by its sum so blurring keeps the total intensity")
			.number("background", "Background:", 0, Double.NaN, Double.NaN, "intensity units", "constant added after blurring (out-of-focus haze, autofluorescence)")
			.number("photons", "Photons per unit:", 0, Double.NaN, Double.NaN, "photons per intensity unit", "noise level: each voxel's mean is scaled to photons, drawn "
					+ "from a Poisson law and scaled back; 0 = no noise")
			.number("seed", "Seed:", 1, Double.NaN, Double.NaN, "", "seed of the noise: the same seed gives the same noise")
			.number("offset", "Offset:", 0, Double.NaN, Double.NaN, "intensity units", "camera offset added at the end, without noise")
			.flag("recentre", "Recentre the PSF (shift its centre of mass to the centre voxel)", false,
					"shift the PSF so its centre of mass sits on the centre voxel before blurring")
			.build();
}
