package org.parfocal.blocks;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Random;

import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.parfocal.cli.TiffBlockSink;
import org.parfocal.cli.TiffBlockSource;
import org.parfocal.core.Volume;
import org.parfocal.deconv.Deconvolution;
import org.parfocal.deconv.DeconvolutionOptions;

/**
 * A 151 MB stack deconvolved block-wise by a JVM with a 64 MB heap (the stack is 2.4× the heap), and the output
 * checked against a block-free run of the same engine on a crop.
 */
class LargerThanHeapTest {

	@TempDir
	Path dir;

	static final int NX = 512, NY = 512, NZ = 144;

	@Test
	void stackLargerThanTheHeapIsDeconvolvedAndMatchesABlockFreeCrop() throws Exception {
		final Volume psf = BlockScenes.psf(5, 3, 1.0, 0.8);
		final Path in = dir.resolve("big.tif"), out = dir.resolve("big-deconvolved.tif"), psfFile = dir.resolve("psf.tif");
		BlockRunnerFilesTest.write(psf, psfFile);
		// generated plane by plane: granules on a dim level, a camera offset of 100; never whole in memory
		try (TiffBlockSink s = new TiffBlockSink(in, new int[] { NX, NY, NZ }, BlockScenes.VOXEL, null)) {
			final Random r = new Random(42);
			for (int z = 0; z < NZ; z++) {
				final Volume p = Volume.zeros(NX, NY, 1, BlockScenes.VOXEL);
				final float[] d = p.data();
				for (int i = 0; i < d.length; i++) d[i] = 105 + (float) r.nextGaussian();
				for (int g = 0; g < 300; g++) {
					final int x = 1 + r.nextInt(NX - 2), y = 1 + r.nextInt(NY - 2);
					for (int dy = -1; dy <= 1; dy++)
						for (int dx = -1; dx <= 1; dx++) d[x + dx + NX * (y + dy)] += 60 * (dx == 0 && dy == 0 ? 2 : 1);
				}
				s.add(p, new int[] { 0, 0, z });
			}
			s.commit();
		}
		final long bytes = Files.size(in);
		assertTrue(bytes >= 150_000_000L, "input of " + bytes + " bytes");
		final String recipe = "psf=" + psfFile + " method=richardson-lucy iterations=3 stop=fixed edges=non-circulant offset=100 background=0";
		final String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
		final Process p = new ProcessBuilder(java, "-Xmx64m", "-Djava.awt.headless=true", "-cp", System.getProperty("java.class.path"),
				"org.parfocal.cli.BlockRunner", recipe, in.toString(), out.toString(), "--threads", "2").redirectErrorStream(true).start();
		final String log = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
		assertEquals(0, p.waitFor(), log);
		System.out.print("64 MB heap, " + bytes / 1_000_000 + " MB stack: " + log);
		assertTrue(bytes > 2L * 64 * 1024 * 1024);
		// block-free run on a crop (the engine on the crop as a whole), compared away from the crop's own edges
		final int[] o = { 200, 180, 50 }, s = { 80, 80, 40 }, m = { 12, 12, 8 };
		try (TiffBlockSource src = TiffBlockSource.open(in); TiffBlockSource res = TiffBlockSource.open(out)) {
			assertEquals(List.of(NX, NY, NZ), List.of(res.shape()[0], res.shape()[1], res.shape()[2]));
			final Volume crop = src.read(o, s);
			final Volume ref = Deconvolution.run(crop, psf, Recipe.parse(recipe).options(), null).estimate();
			final Volume got = res.read(o, s);
			float mn = Float.MAX_VALUE, mx = -Float.MAX_VALUE;
			for (final float v : ref.data()) {
				mn = Math.min(mn, v);
				mx = Math.max(mx, v);
			}
			double worst = 0;
			for (int z = m[2]; z < s[2] - m[2]; z++)
				for (int y = m[1]; y < s[1] - m[1]; y++)
					for (int x = m[0]; x < s[0] - m[0]; x++) worst = Math.max(worst, Math.abs(got.get(x, y, z) - ref.get(x, y, z)) / (mx - mn));
			System.out.printf("crop check: largest difference %.2e of the range%n", worst);
			assertTrue(worst <= 1e-3, "largest difference on the crop " + worst + " of the range");
		}
		DeconvolutionOptions.class.getName();
	}
}
