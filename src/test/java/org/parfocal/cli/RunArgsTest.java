package org.parfocal.cli;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayOutputStream;
import java.io.PrintStream;
import java.util.List;

import org.junit.jupiter.api.Test;

/**
 * The block runners' one option parser (issue 16: {@code BlockRunner} and {@code SparkRunner} read their options
 * differently): values and refusals. The Spark module's {@code SparkRunnerTest} checks that the Spark command
 * line prints the same unknown-option line.
 */
class RunArgsTest {

	@Test
	void optionsAnywhereBetweenThePositionalArguments() {
		final RunArgs a = RunArgs.parse(new String[] { "r.txt", "--block", "0,0,16", "in.tif", "--psf", "a.tif,b.tif", "out.tif", "--budget", "1.5",
				"--threads", "3" });
		assertEquals(List.of("r.txt", "in.tif", "out.tif"), a.positional());
		assertArrayEquals(new int[] { 0, 0, 16 }, a.tile(), "0 leaves an axis uncut");
		assertEquals(List.of("a.tif", "b.tif"), a.psfs());
		assertEquals(1.5 * 1024 * 1024, a.budgetBytes(), 0.5);
		assertEquals(3, a.threads());
		final RunArgs none = RunArgs.parse(new String[] { "r", "i", "o" });
		assertNull(none.tile());
		assertEquals(0, none.budgetBytes());
		assertEquals(0, none.threads());
		assertEquals(List.of(), none.psfs());
		assertArrayEquals(new int[] { 32 }, RunArgs.parse(new String[] { "--block", "32" }).tile(), "one size for every axis (BlockPlan repeats the last)");
	}

	@Test
	void badValuesAreRefusedInOneLine() {
		assertEquals("--block takes whole numbers of voxels, got 20.5",
				assertThrows(IllegalArgumentException.class, () -> RunArgs.parse(new String[] { "--block", "20.5,20,8" }).tile()).getMessage());
		assertEquals("--block must be positive, got -4",
				assertThrows(IllegalArgumentException.class, () -> RunArgs.parse(new String[] { "--block", "-4" }).tile()).getMessage());
		assertTrue(assertThrows(IllegalArgumentException.class, () -> RunArgs.parse(new String[] { "--threads", "2.5" }).threads()).getMessage()
				.startsWith("--threads takes a whole number from 1 to 1024"));
		assertEquals("--budget takes a number, got 'lots'",
				assertThrows(IllegalArgumentException.class, () -> RunArgs.parse(new String[] { "--budget", "lots" }).budgetBytes()).getMessage());
		assertEquals("missing value after --psf", assertThrows(RunArgs.Usage.class, () -> RunArgs.parse(new String[] { "r", "--psf" })).getMessage());
	}

	@Test
	void anUnknownOptionIsOneLineNamingTheOptionsAndExitCode2() {
		final PrintStream e = System.err;
		final ByteArrayOutputStream b = new ByteArrayOutputStream();
		System.setErr(new PrintStream(b, true));
		final int code;
		try {
			code = BlockRunner.runMain(new String[] { "r", "in.tif", "out.tif", "--blok", "8" });
		} finally {
			System.setErr(e);
		}
		assertEquals(2, code);
		assertEquals("Error: unknown option --blok (the options are --budget MB, --block X,Y,Z, --psf FILE[,FILE per channel], --threads N)",
				b.toString().strip());
	}
}
