package org.parfocal.quality;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.parfocal.testing.TestVolumes;

/**
 * Reader of the text golden files written by {@code tools/golden/gen_wasserstein.py}: a line
 * "case name key=value…" opens a case, each following line is "field v1 v2 …", '#' starts a comment.
 */
final class GoldenCases {

	static final String DIR = "/golden/wasserstein/";

	/** One case: its name, its key=value attributes and its numeric fields. */
	record Case(String name, Map<String, String> attributes, Map<String, double[]> fields) {
		int integer(final String key) {
			return Integer.parseInt(attributes.get(key));
		}

		double number(final String key) {
			return Double.parseDouble(attributes.get(key));
		}

		double[] field(final String key) {
			final double[] f = fields.get(key);
			if (f == null) throw new IllegalStateException("case " + name + " has no field " + key);
			return f;
		}

		double[] optional(final String key) {
			return fields.get(key);
		}

		double scalar(final String key) {
			return field(key)[0];
		}
	}

	private GoldenCases() {}

	static List<Case> read(final String file) {
		final List<Case> cases = new ArrayList<>();
		Case current = null;
		for (final String raw : TestVolumes.resourceLines(DIR + file)) {
			final String line = raw.strip();
			if (line.isEmpty() || line.startsWith("#")) continue;
			final String[] t = line.split("\\s+");
			if (t[0].equals("case")) {
				final Map<String, String> attrs = new LinkedHashMap<>();
				for (int i = 2; i < t.length; i++) {
					final int eq = t[i].indexOf('=');
					attrs.put(t[i].substring(0, eq), t[i].substring(eq + 1));
				}
				current = new Case(t[1], attrs, new LinkedHashMap<>());
				cases.add(current);
				continue;
			}
			final double[] v = new double[t.length - 1];
			for (int i = 1; i < t.length; i++) v[i - 1] = Double.parseDouble(t[i]);
			current.fields().put(t[0], v);
		}
		if (cases.isEmpty()) throw new IllegalStateException("no cases in " + file);
		return cases;
	}

	/** Rows of a C-order (rows × cols) matrix as a point set. */
	static PointSet points(final double[] values, final int rows, final int cols) {
		return new PointSet(cols, rows, values);
	}

	static double relativeError(final double ref, final double got) {
		return Math.abs(got - ref) / Math.max(Math.abs(ref), Double.MIN_NORMAL);
	}
}
