package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.TextField;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import ij.IJ;
import ij.ImagePlus;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Tag;
import org.junit.jupiter.api.Test;
import org.parfocal.conv.Acquisition;
import org.parfocal.testing.TestVolumes;
import org.parfocal.core.Boundary;
import org.parfocal.core.Monitor;
import org.parfocal.core.Volume;
import org.parfocal.testing.ImageJCommandException;
import org.parfocal.testing.ImageJHarness;

/** The first command end to end: run by menu name headless, recorded and replayed, bad input refused. */
class ConvolveWithPsfCommandTest {

	private static final String CMD = "Convolve with PSF...";

	/** The frozen macro keys of this command (public API). */
	private static final List<String> KEYS = List.of("image", "psf", "boundary", "normalize", "background", "photons", "seed", "offset");

	static ImagePlus object(final String title) {
		final Volume v = TestVolumes.random(21, 24, 20, 9).withVoxelSize(org.parfocal.core.VoxelSize.microns(0.1, 0.1, 0.25));
		return ImageBridge.toImagePlus(v, title);
	}

	static ImagePlus psf(final String title, final int kz) {
		return ImageBridge.toImagePlus(TestVolumes.random(22, 5, 5, kz), title);
	}

	static void open(final ImagePlus... imps) {
		ImageJHarness.open(imps);
	}

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	@Test
	void runByMenuNameEqualsTheCoreAndKeepsInputs() {
		final ImagePlus obj = object("cell.tif"), h = psf("psf.tif", 3);
		open(obj, h);
		final float[] before = ((float[]) obj.getStack().getPixels(4)).clone();
		final String options = "image=cell.tif psf=psf.tif boundary=mirror normalize background=2 photons=0 seed=1 offset=100";
		final ImagePlus out = ImageJHarness.run(obj, CMD, options).onlyCreated();
		assertEquals(32, out.getBitDepth());
		assertEquals(obj.getStackSize(), out.getStackSize());
		assertEquals(0.25, out.getCalibration().pixelDepth, 0);
		assertArrayEquals(before, (float[]) obj.getStack().getPixels(4), "input unchanged");
		final Volume expected = new Acquisition(ImageBridge.toVolume(h, "psf"), ImageBridge.toCore(obj).first().shape(),
				new Acquisition.Options(Boundary.MIRROR, true, 2, 0, 1, 100)).record(ImageBridge.toCore(obj).first(), Monitor.NONE);
		assertArrayEquals(expected.data(), ImageBridge.toCore(out).first().data(), "command output = core output");
		assertEquals("run(\"Convolve with PSF...\", \"" + options + "\");", ImageProvenance.of(out).orElseThrow().macro());
	}

	/**
	 * Provenance end to end: saved as TIFF by ImageJ and reopened, the record is still there, names every
	 * dialog key, hashes the inputs, and its macro line rebuilds the same pixels.
	 */
	@Test
	void provenanceSurvivesTiffAndItsMacroRebuildsTheOutput(@org.junit.jupiter.api.io.TempDir final java.nio.file.Path dir) {
		final ImagePlus obj = object("cell.tif"), h = psf("psf.tif", 3);
		open(obj, h);
		final ImagePlus out = ImageJHarness.run(obj, CMD, "image=cell.tif psf=psf.tif boundary=zero normalize background=1 photons=5 seed=9 offset=0").onlyCreated();
		final String path = dir.resolve("out.tif").toString();
		assertTrue(new ij.io.FileSaver(out).saveAsTiff(path));
		final ImagePlus reopened = IJ.openImage(path);
		final org.parfocal.provenance.Provenance p = ImageProvenance.of(reopened).orElseThrow();
		assertEquals(KEYS, List.copyOf(p.options().keySet()), "every dialog key is in the provenance");
		assertEquals(ImageProvenance.sha256(obj), p.inputs().get(0).sha256());
		assertEquals(ImageProvenance.sha256(h), p.inputs().get(1).sha256());
		final String[] call = ImageJHarness.parseRunLine(p.macro());
		final ImagePlus again = ImageJHarness.run(obj, call[0], call[1]).onlyCreated();
		ImageJHarness.assertSamePixels(reopened, again, 0);
	}

	@Test
	void hyperstacksAreConvolvedPerChannelAndFrame() {
		final ImagePlus hs = ImageBridgeTest.coded(16, 12, 2, 5, 2);
		hs.setTitle("hyper.tif");
		final ImagePlus h = psf("psf.tif", 3);
		open(hs, h);
		final ImagePlus out = ImageJHarness.run(hs, CMD, "image=hyper.tif psf=psf.tif boundary=periodic normalize background=0 photons=0 seed=1 offset=0").onlyCreated();
		assertArrayEquals(hs.getDimensions(), out.getDimensions());
		// Periodic boundary with a unit-sum PSF keeps each volume's total (circulant operator, common practice).
		final var in = ImageBridge.toCore(hs);
		final var res = ImageBridge.toCore(out);
		for (int t = 0; t < 2; t++)
			for (int c = 0; c < 2; c++)
				assertEquals(in.get(c, t).sum(), res.get(c, t).sum(), 1e-5 * in.get(c, t).sum(), "c" + c + " t" + t);
	}

	@Test
	void badInputIsRefusedInOneLineAndNothingIsCreated() {
		final ImagePlus obj = object("cell.tif");
		final ImagePlus rgb = IJ.createImage("colour.tif", "RGB ramp", 24, 20, 1);
		open(obj, psf("flat-psf.tif", 1), psf("big-psf.tif", 11), rgb);
		assertFails("2D but the image is 3D", obj, "image=cell.tif psf=flat-psf.tif boundary=zero normalize background=0 photons=0 seed=1 offset=0");
		assertFails("larger than the image", obj, "image=cell.tif psf=big-psf.tif boundary=zero normalize background=0 photons=0 seed=1 offset=0");
		assertFails("RGB image", rgb, "image=colour.tif psf=flat-psf.tif boundary=zero normalize background=0 photons=0 seed=1 offset=0");
		assertFails("'missing.tif'", obj, "image=missing.tif psf=flat-psf.tif boundary=zero normalize background=0 photons=0 seed=1 offset=0");
		assertFails("Photons must be 0", obj, "image=cell.tif psf=flat-psf.tif boundary=zero normalize background=0 photons=-3 seed=1 offset=0");
		assertFails("'lots' is not a number", obj, "image=cell.tif psf=flat-psf.tif boundary=zero normalize background=0 photons=lots seed=1 offset=0");
		assertFails("'reflect'", obj, "image=cell.tif psf=flat-psf.tif boundary=reflect normalize background=0 photons=0 seed=1 offset=0");
	}

	private static void assertFails(final String expected, final ImagePlus current, final String options) {
		final int before = Interpreter.getBatchModeImageIDs().length;
		final ImageJCommandException e = assertThrows(ImageJCommandException.class, () -> ImageJHarness.run(current, CMD, options));
		assertTrue(e.getMessage().contains(expected), e.getMessage());
		assertEquals(before, Interpreter.getBatchModeImageIDs().length, "no image was created");
	}

	/**
	 * Record → replay: the dialog filled as a user would, the line the Recorder writes, its keys (frozen),
	 * and a replay both in this JVM and in a fresh headless JVM giving the same pixels.
	 */
	@Test
	@Tag("display")
	void recordedLineReplaysToTheSamePixels() throws Exception {
		ImageJHarness.assumeDisplay();
		final ImagePlus obj = object("cell.tif"), h = psf("psf.tif", 3);
		open(obj, h);
		final ImageJHarness.Recording rec = ImageJHarness.record(obj, CMD, dialog -> {
			final List<Choice> choices = dialog.getChoices().stream().map(Choice.class::cast).toList();
			choices.get(0).select("cell.tif");
			choices.get(1).select("psf.tif");
			choices.get(2).select("periodic");
			((Checkbox) dialog.getCheckboxes().get(0)).setState(true);
			final List<TextField> numbers = dialog.getNumericFields().stream().map(TextField.class::cast).toList();
			numbers.get(0).setText("1.5"); // background
			numbers.get(1).setText("20"); // photons: noise on, seeded
			numbers.get(2).setText("42"); // seed
			numbers.get(3).setText("100"); // offset
		});
		final Set<String> keys = new LinkedHashSet<>();
		final Matcher m = Pattern.compile("(?:^|\\s)([a-z]+)(?==|\\s|$)").matcher(ImageJHarness.parseRunLine(rec.line())[1]);
		while (m.find()) keys.add(m.group(1));
		assertEquals(KEYS, List.copyOf(keys), "recorded keys: " + rec.line());
		assertTrue(rec.line().contains("boundary=periodic") && rec.line().contains("seed=42"), rec.line());
		final ImagePlus recorded = rec.result().onlyCreated();
		final ImagePlus replayed = ImageJHarness.replay(obj, rec.line()).onlyCreated();
		ImageJHarness.assertSamePixels(recorded, replayed, 0);
		final ImagePlus headless = ImageJHarness.replayInHeadlessJvm(rec.line(), obj, h);
		ImageJHarness.assertSamePixels(recorded, headless, 0);
		final Volume expected = new Acquisition(ImageBridge.toVolume(h, "psf"), ImageBridge.toCore(obj).first().shape(),
				new Acquisition.Options(Boundary.PERIODIC, true, 1.5, 20, 42, 100)).record(ImageBridge.toCore(obj).first(), Monitor.NONE);
		assertArrayEquals(expected.data(), ImageBridge.toCore(recorded).first().data(), "the dialog's values were used");
	}
}
