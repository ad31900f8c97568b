package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

import java.lang.management.ManagementFactory;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.security.MessageDigest;
import java.util.ArrayList;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.concurrent.TimeUnit;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import java.util.stream.Stream;

import ij.IJ;
import ij.ImagePlus;
import ij.io.FileSaver;
import ij.measure.Calibration;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.core.Volume;
import org.parfocal.core.VoxelSize;
import org.parfocal.ij1.ImageBridge;
import org.parfocal.provenance.Provenance;

/**
 * Fault injection into the batch runner (issue 13, "Done when"; items 1, 2, 4 and 12): 50 stacks in a 200 MB heap
 * — 44 good ones under two PSF map rows whose PSF files are both named {@code psf.tif}, and corrupt, truncated,
 * RGB, 0-byte, non-TIFF stacks and stacks mapped to a truncated PSF. Every good stack must be {@code ok} with its
 * own PSF, every bad one {@code failed} with a one-line reason, the heap flat, the inputs byte-identical.
 * <p>
 * Each good stack holds one bright voxel, so its convolution with the PSF is the PSF itself around that voxel
 * (the delta is the identity of convolution, a textbook identity): output(p + d) = 1000·h(c + d) with h the mapped
 * PSF normalised to unit sum, which tells the two PSFs' results apart voxel by voxel.
 */
class BatchFaultInjectionTest {

	static final int NX = 64, NY = 64, NZ = 16, GOOD_PER_PSF = 22;
	static final VoxelSize VOXEL = VoxelSize.microns(0.08, 0.08, 0.2);

	@Test
	void fiftyStacksWithFaultsInASmallHeap(@TempDir final Path dir) throws Exception {
		final Path in = Files.createDirectories(dir.resolve("in")), out = dir.resolve("out");
		final Volume psfA = psf(1.0, 1.0, 0.7), psfB = psf(2.2, 0.6, 1.5);
		savePsf(psfA, Files.createDirectories(dir.resolve("psfA")).resolve("psf.tif"));
		savePsf(psfB, Files.createDirectories(dir.resolve("psfB")).resolve("psf.tif"));
		final Path psfC = Files.createDirectories(dir.resolve("psfC")).resolve("psf.tif");
		savePsf(psfA, psfC);
		TiffCheckTest.cut(psfC, Files.size(psfC) / 2);
		final Map<String, int[]> deltas = new LinkedHashMap<>();
		final Random rnd = new Random(13);
		for (int k = 1; k <= GOOD_PER_PSF; k++)
			for (final String p : new String[] { "a", "b" }) {
				final int[] at = { 10 + rnd.nextInt(NX - 20), 10 + rnd.nextInt(NY - 20), 4 + rnd.nextInt(NZ - 8) };
				final String name = String.format("%s%02d.tif", p, k);
				saveDelta(in.resolve(name), at);
				deltas.put(name, at);
			}
		// the faults
		saveDelta(in.resolve("c-corrupt.tif"), new int[] { 5, 5, 5 });
		final byte[] c = Files.readAllBytes(in.resolve("c-corrupt.tif"));
		for (int i = 8; i < 200; i++) c[i] = (byte) rnd.nextInt(256); // a TIFF signature, then garbage headers
		Files.write(in.resolve("c-corrupt.tif"), c);
		saveDelta(in.resolve("d-truncated.tif"), new int[] { 5, 5, 5 });
		TiffCheckTest.cut(in.resolve("d-truncated.tif"), Files.size(in.resolve("d-truncated.tif")) / 2);
		assertTrue(new FileSaver(IJ.createImage("rgb", "RGB ramp", 32, 32, 1)).saveAsTiff(in.resolve("e-rgb.tif").toString()));
		Files.createFile(in.resolve("f-empty.tif"));
		Files.writeString(in.resolve("g-notes.tif"), "stage positions, not an image\n");
		saveDelta(in.resolve("h-bad-psf.tif"), new int[] { 30, 30, 10 });
		final Path map = dir.resolve("map.csv");
		Files.writeString(map, "pattern,psf\na*.tif,psfA/psf.tif\nb*.tif,psfB/psf.tif\nh*.tif,psfC/psf.tif\n*.tif,psfA/psf.tif\n");
		final Path recipe = dir.resolve("blur.ijm");
		Files.writeString(recipe, "run(\"Convolve with PSF...\", \"image=[\" + inputTitle + \"] psf=[\" + psfTitle + \"] boundary=zero normalize "
				+ "background=0 photons=0 seed=1 offset=0\");\n");
		final Map<Path, String> before = hashes(dir);
		assertEquals(50, list(in).size());

		final List<String> cmd = new ArrayList<>(List.of(Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-Xmx200m"));
		for (final String a : ManagementFactory.getRuntimeMXBean().getInputArguments())
			if (a.startsWith("-javaagent:") || a.startsWith("--add-opens") || a.startsWith("-Dij1.")) cmd.add(a);
		final String cp = System.getProperty("surefire.test.class.path", System.getProperty("java.class.path"));
		cmd.addAll(List.of("-Djava.awt.headless=true", "-Dparfocal.batch.heap=true", "-cp", cp.isEmpty() ? System.getProperty("java.class.path") : cp,
				BatchRunner.class.getName(), recipe.toString(), in.toString(), out.toString(), map.toString()));
		final Path log = dir.resolve("log.txt");
		final Process p = new ProcessBuilder(cmd).redirectErrorStream(true).redirectOutput(log.toFile()).start();
		if (!p.waitFor(600, TimeUnit.SECONDS)) {
			p.destroyForcibly();
			fail("batch did not end in 600 s");
		}
		final String text = Files.readString(log);
		assertEquals(1, p.exitValue(), text);

		// summary: every good stack ok, every bad one failed with its one-line reason
		final Map<String, String[]> rows = new LinkedHashMap<>();
		final List<String> lines = Files.readAllLines(out.resolve("summary.csv"));
		for (final String l : lines.subList(1, lines.size())) {
			final String[] f = csv(l);
			rows.put(f[0], f);
		}
		assertEquals(50, rows.size(), text);
		for (final String name : deltas.keySet()) assertEquals("ok", rows.get(name)[1], String.join(",", rows.get(name)));
		final Map<String, String> reasons = Map.of("c-corrupt.tif", "c-corrupt.tif", "d-truncated.tif", "d-truncated.tif is truncated: its header declares " + NZ + " planes",
				"e-rgb.tif", "is an RGB image", "f-empty.tif", "f-empty.tif is empty (0 bytes)", "g-notes.tif", "g-notes.tif is not a TIFF file",
				"h-bad-psf.tif", "the PSF " + psfC + " is truncated");
		for (final Map.Entry<String, String> e : reasons.entrySet()) {
			final String[] r = rows.get(e.getKey());
			assertEquals("failed", r[1], e.getKey());
			assertTrue(r[2].contains(e.getValue()), e.getKey() + ": " + r[2]);
			assertFalse(r[2].contains("Exception") || r[2].contains("\n") || r[2].isBlank(), e.getKey() + ": " + r[2]);
		}

		// each good output is its own PSF around its voxel, and its record names the mapped file
		final float[] ha = psfA.data(), hb = psfB.data();
		for (final Map.Entry<String, int[]> e : deltas.entrySet()) {
			final boolean isA = e.getKey().startsWith("a");
			final Volume h = isA ? psfA : psfB;
			final ImagePlus o = IJ.openImage(out.resolve(rows.get(e.getKey())[3]).toString());
			final Volume v = ImageBridge.toVolume(o, "output");
			final int[] at = e.getValue();
			double worst = 0, other = 0;
			for (int z = 0; z < h.nz(); z++)
				for (int y = 0; y < h.ny(); y++)
					for (int x = 0; x < h.nx(); x++) {
						final float got = v.get(at[0] + x - (h.nx() - 1) / 2, at[1] + y - (h.ny() - 1) / 2, at[2] + z - (h.nz() - 1) / 2);
						final int i = x + h.nx() * (y + h.ny() * z);
						worst = Math.max(worst, Math.abs(got - 1000 * (isA ? ha : hb)[i]));
						other = Math.max(other, Math.abs(got - 1000 * (isA ? hb : ha)[i]));
					}
			assertTrue(worst <= 1e-3, e.getKey() + ": largest difference from 1000·own PSF " + worst);
			assertTrue(other > 10, e.getKey() + ": looks like the other PSF's result (" + other + ")");
			final Provenance rec = Provenance.findIn((String) o.getProperty("Info")).orElseThrow();
			final Provenance.Input psfIn = rec.inputs().stream().filter(i -> "psf".equals(i.role())).findFirst().orElseThrow();
			assertEquals(dir.resolve(isA ? "psfA" : "psfB").resolve("psf.tif").toString(), psfIn.path(), e.getKey());
			o.close();
		}

		// memory flat: heap in use after each stack (after a collection), first ten against last ten
		final Matcher m = Pattern.compile("heap after stack (\\d+): (\\d+) bytes").matcher(text);
		final List<Long> heap = new ArrayList<>();
		while (m.find()) heap.add(Long.parseLong(m.group(2)));
		assertEquals(50, heap.size(), text);
		final double first = heap.subList(0, 10).stream().mapToLong(Long::longValue).average().orElseThrow();
		final double last = heap.subList(40, 50).stream().mapToLong(Long::longValue).average().orElseThrow();
		System.out.printf("batch of 50 in -Xmx200m: heap after stacks 1-10 %.1f MB, after 41-50 %.1f MB%n", first / 1048576, last / 1048576);
		assertTrue(last - first < 8 * 1048576, "heap grew from " + first / 1048576 + " MB to " + last / 1048576 + " MB");

		// inputs untouched, and nothing hidden left in the output folder
		assertEquals(before, hashes(dir));
		assertTrue(list(out).stream().noneMatch(f -> f.getFileName().toString().startsWith(".")), list(out).toString());
		assertNotEquals(rows.get("a01.tif")[3], rows.get("b01.tif")[3]);
	}

	/** An anisotropic Gaussian 7 x 7 x 5 of unit sum (the sums in double, then the array in float). */
	static Volume psf(final double sx, final double sy, final double sz) {
		final Volume h = Volume.zeros(7, 7, 5, VOXEL);
		double sum = 0;
		for (int z = 0; z < 5; z++)
			for (int y = 0; y < 7; y++)
				for (int x = 0; x < 7; x++) sum += Math.exp(-0.5 * (Math.pow((x - 3) / sx, 2) + Math.pow((y - 3) / sy, 2) + Math.pow((z - 2) / sz, 2)));
		for (int z = 0; z < 5; z++)
			for (int y = 0; y < 7; y++)
				for (int x = 0; x < 7; x++)
					h.set(x, y, z, (float) (Math.exp(-0.5 * (Math.pow((x - 3) / sx, 2) + Math.pow((y - 3) / sy, 2) + Math.pow((z - 2) / sz, 2))) / sum));
		return h;
	}

	static void savePsf(final Volume h, final Path file) {
		assertTrue(new FileSaver(ImageBridge.toImagePlus(h, file.getFileName().toString())).saveAsTiffStack(file.toString()));
	}

	/** A 16-bit stack, zero but one voxel of 1000, calibrated as the PSFs. */
	static void saveDelta(final Path file, final int[] at) {
		final ImagePlus imp = IJ.createImage(file.getFileName().toString(), "16-bit black", NX, NY, NZ);
		imp.getStack().getProcessor(at[2] + 1).set(at[0], at[1], 1000);
		final Calibration cal = imp.getCalibration();
		cal.pixelWidth = VOXEL.dx();
		cal.pixelHeight = VOXEL.dy();
		cal.pixelDepth = VOXEL.dz();
		cal.setUnit("micron");
		assertTrue(new FileSaver(imp).saveAsTiffStack(file.toString()));
	}

	/** SHA-256 of every file's bytes under {@code root} (but the output folder and the log). */
	static Map<Path, String> hashes(final Path root) throws Exception {
		final Map<Path, String> h = new java.util.TreeMap<>();
		try (Stream<Path> s = Files.walk(root)) {
			for (final Path f : s.filter(Files::isRegularFile).toList()) {
				if (f.startsWith(root.resolve("out")) || f.getFileName().toString().equals("log.txt")) continue;
				h.put(f, HexFormat.of().formatHex(MessageDigest.getInstance("SHA-256").digest(Files.readAllBytes(f))));
			}
		}
		return h;
	}

	static List<Path> list(final Path d) throws Exception {
		try (Stream<Path> s = Files.list(d)) {
			return s.sorted().toList();
		}
	}

	/** One CSV line (RFC 4180 quoting). */
	static String[] csv(final String line) {
		final List<String> f = new ArrayList<>();
		final StringBuilder sb = new StringBuilder();
		boolean q = false;
		for (int i = 0; i < line.length(); i++) {
			final char ch = line.charAt(i);
			if (q && ch == '"' && i + 1 < line.length() && line.charAt(i + 1) == '"') {
				sb.append('"');
				i++;
			} else if (ch == '"') q = !q;
			else if (ch == ',' && !q) {
				f.add(sb.toString());
				sb.setLength(0);
			} else sb.append(ch);
		}
		f.add(sb.toString());
		return f.toArray(String[]::new);
	}
}
