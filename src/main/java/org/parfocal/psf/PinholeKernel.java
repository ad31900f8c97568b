package org.parfocal.psf;

/**
 * Lateral convolution of a radially symmetric intensity with a uniform disk of radius R (the confocal pinhole
 * projected into the sample), on the radial grid r<sub>j</sub> = j·h:
 * <pre>  C(r) = (1/πR²) ∫₀^∞ I(ρ) · Θ(r, ρ) · ρ dρ,</pre>
 * where Θ(r, ρ) is the angle of the circle of radius ρ around a point at distance r from the centre that lies
 * inside the disk: 2π if ρ + r ≤ R, 0 if |r − ρ| ≥ R, else 2(π − acos((R² − r² − ρ²)/(2rρ))) (law of cosines).
 * I is taken piecewise linear on the grid; the weight of each node is integrated with 16 midpoints per
 * interval, because Θ has square-root kinks at |r − ρ| = R. Written by hand: a one-off geometric kernel.
 */
final class PinholeKernel {

	private static final int SUB = 16;

	private final int[] lo;
	private final double[][] k;

	PinholeKernel(final double radius, final double h, final int nOut, final int nIn) {
		lo = new int[nOut];
		k = new double[nOut][];
		final double norm = 1 / (Math.PI * radius * radius);
		for (int j = 0; j < nOut; j++) {
			final double r = j * h;
			final int a = Math.max(0, (int) Math.floor((r - radius) / h) - 1), b = Math.min(nIn - 1, (int) Math.ceil((r + radius) / h) + 1);
			lo[j] = a;
			final double[] row = new double[b - a + 1];
			// integrate over intervals [l·h, (l+1)·h] for l in [a, b): hat functions of nodes l and l+1
			for (int l = a; l < b; l++)
				for (int s = 0; s < SUB; s++) {
					final double t = (s + 0.5) / SUB, rho = (l + t) * h;
					final double g = theta(r, rho, radius) * rho * h / SUB * norm;
					row[l - a] += (1 - t) * g;
					row[l + 1 - a] += t * g;
				}
			k[j] = row;
		}
	}

	static double theta(final double r, final double rho, final double radius) {
		if (rho + r <= radius) return 2 * Math.PI;
		if (Math.abs(r - rho) >= radius) return 0;
		final double c = (radius * radius - r * r - rho * rho) / (2 * r * rho);
		return 2 * (Math.PI - Math.acos(Math.max(-1, Math.min(1, c))));
	}

	/** out[j] = C(r_j) for j &lt; nOut. */
	void apply(final double[] in, final double[] out) {
		for (int j = 0; j < k.length; j++) {
			final double[] row = k[j];
			double s = 0;
			for (int i = 0, a = lo[j]; i < row.length; i++) s += row[i] * in[a + i];
			out[j] = s;
		}
	}
}
