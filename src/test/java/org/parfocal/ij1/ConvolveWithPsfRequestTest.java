package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;

import java.util.Arrays;
import java.util.List;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.command.ConvolveRequest;
import org.parfocal.command.ConvolveRunner;
import org.parfocal.core.Hyperstack;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.provenance.MacroOptions;
import org.parfocal.testing.ImageJHarness;
import org.parfocal.testing.TestVolumes;

/**
 * The menu command {@code Convolve with PSF...} and the front-end-free path ({@link ConvolveRequest#from} +
 * {@link ConvolveRunner#run}) give the same floats, bit for bit, on seeded cases that use every key: noise,
 * background, offset, each boundary, normalisation on and off, a re-centred off-centre PSF, a hyperstack. When
 * this test was written, the menu side was still the command's own dialog → options → acquisition path, so it
 * proved the new path bit-identical to it before that code was deleted. The comparison is the project's own
 * consistency.
 */
class ConvolveWithPsfRequestTest {

	private static final String CMD = "Convolve with PSF...";

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** A PSF whose centre of mass lies one voxel off its centre along x, so {@code recentre} shifts it. */
	static ImagePlus offCentrePsf(final String title) {
		final Volume v = TestVolumes.gaussianPsf(7, 7, 5, 1.2, 1.0, 0.9);
		final Volume shifted = Volume.zeros(9, 7, 5, v.voxelSize());
		for (int z = 0; z < 5; z++)
			for (int y = 0; y < 7; y++)
				for (int x = 0; x < 7; x++) shifted.set(x + 2, y, z, v.get(x, y, z));
		return ImageBridge.toImagePlus(shifted, title);
	}

	@Test
	void theMenuPathAndTheRequestPathGiveTheSameFloats() {
		final ImagePlus obj = ConvolveWithPsfCommandTest.object("cell.tif"), h = ConvolveWithPsfCommandTest.psf("psf.tif", 3);
		final ImagePlus off = offCentrePsf("off-psf.tif");
		final ImagePlus hs = ImageBridgeTest.coded(16, 12, 2, 5, 2);
		hs.setTitle("hyper.tif");
		ImageJHarness.open(obj, h, off, hs);
		final List<String> cases = List.of("image=cell.tif psf=psf.tif boundary=mirror normalize background=2 photons=20 seed=7 offset=100",
				"image=cell.tif psf=psf.tif boundary=zero background=0.5 photons=3.5 seed=8 offset=0",
				"image=cell.tif psf=off-psf.tif boundary=periodic normalize background=1.25 photons=50 seed=11 offset=-3 recentre",
				"image=cell.tif psf=off-psf.tif boundary=mirror normalize background=0 photons=0 seed=1 offset=0",
				"image=hyper.tif psf=psf.tif boundary=periodic normalize background=3 photons=2 seed=5 offset=10",
				"image=cell.tif psf=psf.tif");
		for (final String options : cases) {
			final ConvolveRequest request = ConvolveRequest.from(MacroOptions.parse(options));
			final ImagePlus object = ij.WindowManager.getImage(request.image()), psf = ij.WindowManager.getImage(request.psf());
			final Hyperstack viaRequest = ConvolveRunner.run(request, ImageBridge.toCore(object), ImageBridge.toVolume(psf, "The PSF"), Monitor.NONE).image();
			final Hyperstack viaMenu = ImageBridge.toCore(ImageJHarness.run(object, CMD, options).onlyCreated());
			assertEquals(viaMenu.volumes().size(), viaRequest.volumes().size(), options);
			for (int i = 0; i < viaMenu.volumes().size(); i++) {
				final float[] a = viaMenu.volumes().get(i).data(), b = viaRequest.volumes().get(i).data();
				assertEquals(hash(a), hash(b), options + ": volume " + i);
				assertArrayEquals(a, b, options + ": volume " + i);
			}
		}
	}

	@Test
	void theRecentredPsfIsReportedAndAnOffCentreOneWarned() {
		final ImagePlus obj = ConvolveWithPsfCommandTest.object("cell.tif"), off = offCentrePsf("off-psf.tif");
		ImageJHarness.open(obj, off);
		final String options = "image=cell.tif psf=off-psf.tif boundary=mirror normalize background=0 photons=0 seed=1 offset=0";
		final ConvolveRunner.Outcome plain = ConvolveRunner.run(ConvolveRequest.from(MacroOptions.parse(options)), ImageBridge.toCore(obj),
				ImageBridge.toVolume(off, "The PSF"), Monitor.NONE);
		assertNotNull(plain.offCentre(), "the PSF is off centre");
		assertEquals(null, plain.centreOffset());
		final ConvolveRunner.Outcome recentred = ConvolveRunner.run(ConvolveRequest.from(MacroOptions.parse(options + " recentre")),
				ImageBridge.toCore(obj), ImageBridge.toVolume(off, "The PSF"), Monitor.NONE);
		assertNotNull(recentred.centreOffset());
		final var record = ImageProvenance.of(ImageJHarness.run(obj, CMD, options + " recentre").onlyCreated()).orElseThrow();
		assertEquals(Arrays.toString(recentred.centreOffset()), record.run().get("psf_centre_of_mass_offset"));
	}

	/** A hash of the floats' bits (equal arrays, equal hashes; -0 and 0 differ). */
	static int hash(final float[] a) {
		int h = 1;
		for (final float f : a) h = 31 * h + Float.floatToRawIntBits(f);
		return h;
	}
}
