package org.parfocal.ij1;

import static org.junit.jupiter.api.Assertions.assertEquals;

import ij.ImagePlus;
import ij.ImageStack;
import ij.Macro;
import ij.process.FloatProcessor;

import org.junit.jupiter.api.Test;

/** A result opens where its signal is, for a person; under a macro it stays on plane 1 with ImageJ's range. */
class FirstViewTest {

	/** 8 planes of a dim floor (1) with one bright spot (1000) and a faint square (5) on plane 6. */
	private static ImagePlus stack() {
		final ImageStack st = new ImageStack(32, 32);
		for (int z = 1; z <= 8; z++) {
			final FloatProcessor fp = new FloatProcessor(32, 32);
			fp.set(1);
			if (z == 6) {
				for (int y = 8; y < 24; y++) for (int x = 8; x < 24; x++) fp.setf(x, y, 5);
				fp.setf(2, 2, 1000);
			}
			st.addSlice(fp);
		}
		final ImagePlus imp = new ImagePlus("result", st);
		imp.resetDisplayRange();
		return imp;
	}

	@Test
	void aPersonSeesThePlaneWithSignalAndTheFaintStructure() {
		final ImagePlus imp = stack();
		FirstView.forPerson(imp);
		assertEquals(6, imp.getZ());
		// median of all voxels (1) to their 99.9th percentile (5, the square): the spot saturates, the square shows
		assertEquals(1, imp.getDisplayRangeMin(), 0);
		assertEquals(5, imp.getDisplayRangeMax(), 0);
	}

	@Test
	void underAMacroNothingMoves() {
		final ImagePlus imp = stack();
		final double min = imp.getDisplayRangeMin(), max = imp.getDisplayRangeMax();
		final Thread t = Thread.currentThread();
		final String name = t.getName();
		t.setName("Run$_test"); // ImageJ reads macro options only on such threads
		Macro.setOptions("image=result");
		try {
			FirstView.forPerson(imp);
		} finally {
			Macro.setOptions(null);
			t.setName(name);
		}
		assertEquals(1, imp.getZ());
		assertEquals(min, imp.getDisplayRangeMin(), 0);
		assertEquals(max, imp.getDisplayRangeMax(), 0);
	}
}
