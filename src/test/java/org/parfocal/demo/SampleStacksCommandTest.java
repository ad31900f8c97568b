package org.parfocal.demo;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.process.ImageProcessor;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.Test;
import org.parfocal.provenance.Provenance;
import org.parfocal.testing.ImageJHarness;

/**
 * The sample stacks and their menu entry. Outside references: the committed files in {@code sample-stacks/}
 * (read back with ImageJ's own TIFF reader), the number of beads the generator placed, and ImageJ's menu convention
 * that a label ends in "..." only when a dialog follows (common practice in ImageJ's own menus).
 */
class SampleStacksCommandTest {

	@AfterEach
	void closeAll() {
		ImageJHarness.closeAll();
	}

	private static List<String[]> menu() throws IOException {
		final List<String[]> entries = new ArrayList<>();
		for (final String line : Files.readAllLines(Path.of("src/main/resources/plugins.config"))) {
			if (line.startsWith("#") || line.isBlank() || line.contains("\"-\"")) continue;
			final int q = line.indexOf('"'), q2 = line.indexOf('"', q + 1);
			entries.add(new String[] { line.substring(q + 1, q2), line.substring(q2 + 1).replace(",", "").trim() });
		}
		return entries;
	}

	@Test
	void makeSampleStacksComesFirstAndOnlyCommandsWithADialogEndInDots() throws IOException {
		final List<String[]> m = menu();
		assertEquals("Make Sample Stacks", m.get(0)[0]);
		for (final String[] e : m) {
			// the command's class and the classes beside it named after it (a command's dialog may live in CommandDialog)
			final Path file = Path.of("src/main/java/" + e[1].replace('.', '/') + ".java");
			final String name = file.getFileName().toString().replace(".java", "");
			final StringBuilder sources = new StringBuilder();
			try (var siblings = Files.list(file.getParent())) {
				for (final Path f : siblings.filter(f -> f.getFileName().toString().matches(java.util.regex.Pattern.quote(name) + "[A-Za-z]*\\.java")).toList())
					sources.append(Files.readString(f));
			}
			final String source = sources.toString();
			final boolean dialog = source.contains("new GenericDialog(") || source.contains("showDialog(");
			assertEquals(dialog, e[0].endsWith("..."), e[0] + " (" + e[1] + ")");
		}
		assertTrue(ImageJHarness.installedCommands().containsKey("Make Sample Stacks"));
	}

	@Test
	void theMenuCommandOpensSevenStacksEachShowingStructure() {
		final List<ImagePlus> made = ImageJHarness.run(null, "Make Sample Stacks", "").created();
		final List<String> titles = made.stream().map(ImagePlus::getTitle).toList();
		assertEquals(List.of("quillwort-widefield.tif", "quillwort-psf.tif", "quillwort-truth.tif", "quillwort-beads.tif", "quillwort-beads-psf.tif",
				"quillwort-two-channel.tif", "quillwort-two-channel-psf.tif"), titles);
		for (final ImagePlus imp : made) {
			// the shown plane: at least 0.5 % of its pixels (20 for the sparse beads) are in the upper half of the
			// display range (a black or saturated plane fails), and fewer than 50 % are at or above its top
			for (int c = 1; c <= imp.getNChannels(); c++) {
				imp.setPositionWithoutUpdate(c, imp.getSlice(), 1);
				final ImageProcessor ip = imp.getStack().getProcessor(imp.getStackIndex(c, imp.getSlice(), 1));
				final double lo = imp.getDisplayRangeMin(), hi = imp.getDisplayRangeMax();
				int upper = 0, top = 0;
				for (int i = 0; i < ip.getPixelCount(); i++) {
					if (ip.getf(i) >= (lo + hi) / 2) upper++;
					if (ip.getf(i) >= hi) top++;
				}
				assertTrue(hi > lo, imp.getTitle());
				assertTrue(upper >= (imp.getTitle().equals("quillwort-beads.tif") ? 20 : 0.005 * ip.getPixelCount()), imp.getTitle() + " channel " + c + ": " + upper + " bright pixels on plane " + imp.getSlice());
				assertTrue(top < 0.5 * ip.getPixelCount(), imp.getTitle());
			}
		}
		assertTrue(made.get(0).getSlice() > 1, "the widefield sample no longer opens on its (black) first plane");
		assertEquals(2, made.get(5).getNChannels());
		assertEquals(2, made.get(6).getNChannels());
	}

	@Test
	void theCommittedFilesHoldTheGeneratorsPixels() {
		for (final Map.Entry<String, ImagePlus> e : SampleStacks.make().entrySet()) {
			final ImagePlus file = IJ.openImage(Path.of("sample-stacks", e.getKey()).toString());
			assertEquals(e.getValue().getStackSize(), file.getStackSize(), e.getKey());
			assertEquals(e.getValue().getNChannels(), file.getNChannels(), e.getKey());
			// The first three are rebuilt bit for bit here. The newer noisy stacks were drawn in a JVM whose FFT path
			// (JTransforms or FFTW, see Parfocal Options) may differ from this one's by float rounding, which can move a
			// Poisson draw: for them the stack means agree within 0.5 % and the noise-free PSFs within 1e-6.
			final boolean exact = !e.getKey().contains("beads") && !e.getKey().contains("two-channel") || e.getKey().endsWith("psf.tif");
			double sa = 0, sb = 0;
			for (int i = 1; i <= file.getStackSize(); i++) {
				final float[] a = (float[]) e.getValue().getStack().getProcessor(i).convertToFloat().getPixels();
				final float[] b = (float[]) file.getStack().getProcessor(i).convertToFloat().getPixels();
				if (exact && !e.getKey().endsWith("psf.tif") || e.getKey().equals("quillwort-psf.tif")) assertArrayEquals(a, b, e.getKey() + " plane " + i);
				else if (exact) assertArrayEquals(a, b, 1e-6f, e.getKey() + " plane " + i);
				for (int k = 0; k < a.length; k++) {
					sa += a[k];
					sb += b[k];
				}
			}
			assertEquals(sa, sb, 0.005 * Math.abs(sa), e.getKey() + " stack sum");
			assertEquals(e.getValue().getCalibration().pixelDepth, file.getCalibration().pixelDepth, 1e-9, e.getKey());
		}
	}

	@Test
	void psfFromBeadsFindsTheBeadsOfTheBeadSample() {
		final ImagePlus beads = SampleStacks.make().get("quillwort-beads.tif");
		ImageJHarness.open(beads);
		final ImagePlus psf = ImageJHarness.run(beads, "PSF from Beads...", "image=quillwort-beads.tif box_xy=2 box_z=3 bead_diameter=0.1 threshold=6 "
				+ "reject_saturated outlier_z=3.5 background=stack averaging=mean voxel_xy=0 voxel_z=0 optics=none").onlyCreated();
		final Provenance p = org.parfocal.provenance.Provenance.findIn((String) psf.getProperty("Info")).orElseThrow();
		final int accepted = ((Number) p.run().get("beads_accepted")).intValue();
		// the generator placed 14 beads, 30 voxels or more apart and away from the edges
		final int found = ((Number) p.run().get("beads_found")).intValue();
		assertTrue(found == 14, "found " + found);
		assertTrue(accepted >= 10 && accepted <= 14, "accepted " + accepted + ": " + p.run());
		assertFalse(p.warnings().stream().anyMatch(w -> w.toLowerCase().contains("saturat")), p.warnings().toString());
	}
}
