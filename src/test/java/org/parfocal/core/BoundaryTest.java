package org.parfocal.core;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertSame;

import net.imglib2.RandomAccess;
import net.imglib2.RandomAccessible;
import net.imglib2.img.array.ArrayImg;
import net.imglib2.img.array.ArrayImgs;
import net.imglib2.img.basictypeaccess.array.IntArray;
import net.imglib2.type.numeric.integer.IntType;
import net.imglib2.view.Views;

import org.junit.jupiter.api.Test;

/** The boundary extensions against ImgLib2's out-of-bounds strategies, an independent implementation. */
class BoundaryTest {

	@Test
	void extensionsMatchImgLib2() {
		for (final int n : new int[] { 1, 2, 5, 8 }) {
			final int[] values = new int[n];
			for (int i = 0; i < n; i++) values[i] = 10 + i; // value encodes its index
			final ArrayImg<IntType, IntArray> img = ArrayImgs.ints(values, n);
			check(Boundary.ZERO, Views.extendZero(img), n);
			check(Boundary.MIRROR, Views.extendMirrorDouble(img), n); // edge repeated: f(-1) = f(0)
			check(Boundary.PERIODIC, Views.extendPeriodic(img), n);
		}
	}

	private static void check(final Boundary b, final RandomAccessible<IntType> ext, final int n) {
		final RandomAccess<IntType> ra = ext.randomAccess();
		for (int i = -3 * n - 2; i < 4 * n + 2; i++) {
			ra.setPosition(i, 0);
			final int s = b.sourceIndex(i, n);
			assertEquals(ra.get().get(), s < 0 ? 0 : 10 + s, b + " at " + i + " (n=" + n + ")");
		}
	}

	@Test
	void keysRoundTrip() {
		for (final Boundary b : Boundary.values()) assertSame(b, Boundary.parse(b.key().toUpperCase()));
	}
}
