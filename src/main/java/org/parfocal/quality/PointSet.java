package org.parfocal.quality;

/**
 * {@code count} points of ℝ^{@code dim}, stored row by row: point i is {@code values[i·dim … i·dim + dim − 1]}.
 * The array is shared, not copied.
 */
public record PointSet(int dim, int count, double[] values) {

	public PointSet {
		if (dim < 1 || count < 1) throw new IllegalArgumentException("A point set needs at least one point of at least one coordinate, got " + count + " x " + dim);
		if (values == null || values.length != (long) dim * count)
			throw new IllegalArgumentException("Point set of " + count + " x " + dim + " needs " + (long) dim * count + " values");
	}

	/** Coordinate k of point i. */
	public double get(final int i, final int k) {
		return values[i * dim + k];
	}
}
