package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.image.BufferedImage;
import java.io.ByteArrayInputStream;
import java.io.File;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import javax.imageio.ImageIO;

import ij.ImagePlus;
import ij.macro.Interpreter;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.demo.SampleStacks;
import org.parfocal.testing.ImageJHarness;

/**
 * The report's figures: they exist as decodable PNGs with the captions a reader needs, and a real browser
 * (headless Chromium, when {@code /usr/bin/chromium} exists; skipped otherwise) renders the page with the warnings
 * box at the top and the figures visible. Outside references: ImageIO's PNG decoder and Chromium's renderer.
 */
class WriteReportFiguresTest {

	static final Path CHROMIUM = Path.of("/usr/bin/chromium");

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	/** Captions (alt texts) of the page's PNG figures; each must decode. */
	static List<String> figures(final String page) throws Exception {
		final Matcher m = Pattern.compile("<img alt=\"([^\"]*)\" src=\"data:image/png;base64,([A-Za-z0-9+/=]+)\"").matcher(page);
		final List<String> alts = new ArrayList<>();
		while (m.find()) {
			assertNotNull(ImageIO.read(new ByteArrayInputStream(Base64.getDecoder().decode(m.group(2)))), m.group(1));
			alts.add(m.group(1));
		}
		return alts;
	}

	@Test
	void aWatchedDeconvolutionOfTheSampleHasConvergenceWatchProjectionAndPsfFigures(@TempDir final Path dir) throws Exception {
		final var samples = SampleStacks.make();
		final ImagePlus img = samples.get("quillwort-widefield.tif"), psf = samples.get("quillwort-psf.tif");
		ImageJHarness.open(img, psf);
		final List<ImagePlus> made = ImageJHarness.run(img, "Deconvolve...", "image=quillwort-widefield.tif psf=quillwort-psf.tif method=richardson-lucy-tv "
				+ "iterations=6 regularization=0.002 stop=fixed threshold=0.001 edges=extended offset=100 background=auto watch every=2 references=[] "
				+ "open_references=[] photons=1 read_noise=0").created();
		final ImagePlus out = made.stream().filter(i -> i.getTitle().equals("quillwort-widefield-deconvolved.tif")).findFirst().orElseThrow();
		final Path html = dir.resolve("report.html");
		WriteReport.write(out, new WriteReport.Options(html.toString(), false)); // the command's own writer (the quality plot is the current image)
		final String page = Files.readString(html);
		final List<String> alts = figures(page);
		assertTrue(alts.stream().anyMatch(a -> a.startsWith("Convergence: relative change")), alts.toString());
		assertTrue(alts.stream().anyMatch(a -> a.startsWith("Watch") && a.contains("suggested iteration")), alts.toString());
		assertTrue(alts.stream().anyMatch(a -> a.startsWith("result: maximum projection along z (XY), display range")), alts.toString());
		assertTrue(alts.stream().anyMatch(a -> a.contains("psf 'quillwort-psf.tif': XY maximum projection, log scale")), alts.toString());
		// the PSF view shows the PSF: more than a handful of non-black pixels (it was one white pixel)
		final Matcher m = Pattern.compile("<img alt=\"psf 'quillwort-psf.tif': XY[^\"]*\" src=\"data:image/png;base64,([A-Za-z0-9+/=]+)\"").matcher(page);
		assertTrue(m.find());
		final BufferedImage view = ImageIO.read(new ByteArrayInputStream(Base64.getDecoder().decode(m.group(1))));
		int lit = 0;
		for (int y = 0; y < view.getHeight(); y++)
			for (int x = 0; x < view.getWidth(); x++) if ((view.getRGB(x, y) & 0xff) > 40) lit++;
		assertTrue(lit > 0.1 * view.getWidth() * view.getHeight(), "lit pixels " + lit + " of " + view.getWidth() * view.getHeight());
		if (Files.isExecutable(CHROMIUM)) {
			final BufferedImage shot = screenshot(html, dir);
			assertTrue(shot.getWidth() >= 1000 && shot.getHeight() >= 1000);
		}
	}

	@Test
	void warningsOfThePsfAreInABoxAtTheTopAsChromiumRendersIt(@TempDir final Path dir) throws Exception {
		final ImagePlus psf = ImageJHarness.run(null, "PSF from Optics...", PsfFromOpticsCommandTest.OPTIONS.replace("voxel_xy=0.08", "voxel_xy=0.2"))
				.onlyCreated();
		Interpreter.addBatchModeImage(psf);
		final Path html = dir.resolve("psf-report.html");
		ImageJHarness.run(psf, "Write Report...", "file=[" + html + "]");
		final String page = Files.readString(html);
		final int warn = page.indexOf("<section id=\"warnings\" class=\"warnings\">");
		assertTrue(warn > 0 && warn < page.indexOf("What was done") && page.indexOf("Undersampled", warn) > warn, "warnings section first");
		assertTrue(figures(page).size() >= 3, "PSF XY, XZ and profiles");
		Assumptions.assumeTrue(Files.isExecutable(CHROMIUM), "no /usr/bin/chromium: the browser check is skipped");
		final BufferedImage shot = screenshot(html, dir);
		// the warnings box's background (#fdecec) appears in the first 700 pixels of the page
		int box = 0;
		for (int y = 0; y < Math.min(700, shot.getHeight()); y++)
			for (int x = 0; x < shot.getWidth(); x++) if ((shot.getRGB(x, y) & 0xffffff) == 0xfdecec) box++;
		assertTrue(box > 5000, "warning-box pixels near the top: " + box);
	}

	/** Renders the page in headless Chromium (fresh profile, no network services) to a PNG and reads it back. */
	static BufferedImage screenshot(final Path html, final Path dir) throws Exception {
		final Path profile = Files.createTempDirectory(dir, "chromium-profile");
		final Path png = dir.resolve(html.getFileName() + ".png");
		final Process p = new ProcessBuilder(CHROMIUM.toString(), "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
				"--disable-background-networking", "--disable-component-update", "--disable-sync", "--user-data-dir=" + profile, "--hide-scrollbars",
				"--window-size=1280,2400", "--screenshot=" + png, html.toUri().toString()).redirectErrorStream(true)
				.redirectOutput(dir.resolve("chromium.log").toFile()).start();
		assertTrue(p.waitFor(180, TimeUnit.SECONDS), "chromium finished");
		assertEquals(0, p.exitValue(), () -> readLog(dir));
		final File f = png.toFile();
		assertTrue(f.isFile(), () -> "no screenshot; " + readLog(dir));
		final BufferedImage img = ImageIO.read(f);
		assertNotNull(img);
		if (System.getProperty("parfocal.keepScreenshots") != null) Files.copy(png, Path.of(System.getProperty("parfocal.keepScreenshots"), png.getFileName().toString()),
				java.nio.file.StandardCopyOption.REPLACE_EXISTING);
		return img;
	}

	private static String readLog(final Path dir) {
		try {
			return Files.readString(dir.resolve("chromium.log"));
		} catch (final java.io.IOException e) {
			return e.getMessage();
		}
	}
}
