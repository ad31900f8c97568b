package org.parfocal.provenance;

import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import java.util.Map;
import java.util.Objects;

/**
 * A self-contained HTML page describing one run: the caution, what was made and from what, every parameter, the
 * run's facts, versions, figures (PNG embedded as data URIs, so the page is one file) and tables. Warnings (the
 * record's {@link Provenance#WARNINGS} list and its inputs') come first, in a section of their own. No scripts,
 * no external resources: it opens in any browser and can be archived with the data.
 */
public final class HtmlReport {

	/** A figure: caption and PNG bytes. */
	public record Figure(String caption, byte[] png) {}

	/** A table: caption, header, rows. */
	public record Table(String caption, List<String> header, List<List<String>> rows) {}

	private final Provenance provenance;
	private final String outputTitle;
	private final List<Figure> figures = new ArrayList<>();
	private final List<Table> tables = new ArrayList<>();

	public HtmlReport(final Provenance provenance, final String outputTitle) {
		this.provenance = provenance;
		this.outputTitle = outputTitle;
	}

	public HtmlReport figure(final String caption, final byte[] png) {
		figures.add(new Figure(caption, png));
		return this;
	}

	public HtmlReport table(final Table t) {
		tables.add(t);
		return this;
	}

	/** Run facts shown as figures or too long for the table: summarised there. */
	private static boolean isCurve(final String key) {
		return key.equals("relative_change") || key.startsWith("watch_curve") || key.equals(Provenance.WARNINGS);
	}

	/** Words that mark a note of the run as a warning (commands that wrote warnings into {@code notes}). */
	private static final java.util.regex.Pattern WARNING_NOTE = java.util.regex.Pattern.compile("(?i)warning|cut off|undersampl|saturat|truncat");

	/**
	 * The warnings of the run (its {@link Provenance#WARNINGS} list, and the parts of its {@code notes} that are
	 * warnings) and of the inputs' own records, each once.
	 */
	public static List<String> warnings(final Provenance p) {
		final List<String> w = new ArrayList<>(p.warnings());
		final Object notes = p.run().get("notes");
		if (notes != null)
			for (final String part : String.valueOf(notes).split("; "))
				if (WARNING_NOTE.matcher(part).find() && !w.contains(part.trim())) w.add(part.trim());
		for (final Provenance.Input in : p.inputs())
			if (in.source() != null)
				for (final String s : in.source().warnings()) {
					final String t = in.role() + " '" + in.title() + "' (" + in.source().command() + "): " + s;
					if (!w.contains(t)) w.add(t);
				}
		return w;
	}

	public String toHtml() {
		final Provenance p = provenance;
		final StringBuilder h = new StringBuilder();
		h.append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Parfocal report: ").append(esc(outputTitle)).append("</title>\n");
		h.append("<style>body{font-family:sans-serif;max-width:64em;margin:2em auto;padding:0 1em;color:#222;line-height:1.35}"
				+ "table{border-collapse:collapse;margin:.5em 0 1.5em;max-width:100%}"
				+ "td,th{border:1px solid #bbb;padding:.25em .6em;text-align:left;vertical-align:top;overflow-wrap:break-word;word-break:normal;hyphens:none}"
				+ "th{background:#eee;white-space:nowrap}td:first-child{white-space:nowrap}td.long{word-break:break-all;font-family:monospace;font-size:.85em;min-width:12em}"
				+ ".caution{border:2px solid #b60;background:#fff4e5;padding:.6em 1em}.warnings{border:2px solid #b00;background:#fdecec;padding:.4em 1em}"
				+ ".ok{border:1px solid #6a6;background:#eef8ee;padding:.4em 1em}"
				+ "figure{display:inline-block;margin:.5em 1.5em 1em 0;vertical-align:top;max-width:100%}figure img{max-width:100%;image-rendering:pixelated;border:1px solid #ccc}"
				+ "figcaption{font-size:.85em;color:#444;max-width:30em}code{background:#f3f3f3;padding:0 .2em;overflow-wrap:anywhere}</style></head><body>\n");
		h.append("<h1>").append(esc(outputTitle)).append("</h1>\n");
		h.append("<p class=\"caution\"><b>Caution.</b> ").append(esc(Provenance.CAUTION)).append("</p>\n");
		final List<String> warnings = warnings(p);
		if (warnings.isEmpty()) h.append("<section id=\"warnings\" class=\"ok\"><b>Warnings:</b> none were recorded for this run.</section>\n");
		else {
			h.append("<section id=\"warnings\" class=\"warnings\"><h2>Warnings (").append(warnings.size()).append(")</h2><ul>");
			for (final String w : warnings) h.append("<li>").append(esc(w)).append("</li>");
			h.append("</ul></section>\n");
		}
		final Object notes = p.run().get("notes");
		if (notes != null) h.append("<p><b>Notes:</b> ").append(esc(String.valueOf(notes))).append("</p>\n");
		h.append("<h2>What was done</h2>\n<p>Command <b>").append(esc(Provenance.menuLabel(p.command()))).append("</b>, ").append(esc(String.valueOf(p.date())))
				.append(", ").append(String.format(java.util.Locale.ROOT, "%.2f", p.seconds())).append(" s on ").append(p.threads()).append(" thread(s).</p>\n");
		h.append("<p>To run it again: <code>").append(esc(p.macro())).append("</code></p>\n");
		if (!figures.isEmpty()) {
			h.append("<h2>Figures</h2>\n<div id=\"figures\">");
			for (final Figure f : figures)
				h.append("<figure><img alt=\"").append(esc(f.caption())).append("\" src=\"data:image/png;base64,")
						.append(Base64.getEncoder().encodeToString(f.png())).append("\"><figcaption>").append(esc(f.caption())).append("</figcaption></figure>\n");
			h.append("</div>\n");
		}
		if (!p.inputs().isEmpty()) {
			final List<List<String>> rows = new ArrayList<>();
			for (final Provenance.Input in : p.inputs())
				// a field may be missing (the blocks runner records no pixel hash: it never holds the stack): List.of takes no null
				rows.add(List.of(Objects.toString(in.role(), ""), Objects.toString(in.title(), ""), Objects.toString(in.shape(), ""), in.calibration() == null ? "not recorded" : in.calibration(),
						in.source() == null ? (in.path() == null ? "open image" : "file") : Provenance.menuLabel(in.source().command()),
						in.path() == null ? "" : in.path(), in.sha256() == null ? "not recorded" : in.sha256()));
			h.append(tableHtml(new Table("Inputs", List.of("role", "title", "shape", "voxel size", "made by", "file", "SHA-256 of pixels"), rows), 5));
		}
		h.append(mapTable("Parameters", p.options()));
		if (!p.run().isEmpty()) {
			final Map<String, Object> shown = new java.util.LinkedHashMap<>();
			for (final Map.Entry<String, Object> e : p.run().entrySet()) {
				if (e.getKey().equals("notes")) continue;
				if (isCurve(e.getKey())) {
					if (!e.getKey().equals(Provenance.WARNINGS))
						shown.put(e.getKey(), (e.getValue() instanceof List<?> l ? l.size() + " values" : "a curve") + " (see the figures and the JSON record)");
				} else shown.put(e.getKey(), e.getValue());
			}
			h.append(mapTable("Run", shown));
		}
		for (final Table t : tables) h.append(tableHtml(t, -1));
		h.append("<h2>Versions</h2>\n<p>Parfocal ").append(esc(String.valueOf(p.parfocalVersion()))).append(", ImageJ ")
				.append(esc(String.valueOf(p.imagejVersion()))).append(", Java ").append(esc(String.valueOf(p.javaVersion()))).append("</p>\n");
		h.append("<details><summary>Provenance record (JSON)</summary><pre style=\"white-space:pre-wrap;overflow-wrap:anywhere;font-size:.8em\">")
				.append(esc(p.toJson())).append("</pre></details>\n");
		h.append("</body></html>\n");
		return h.toString();
	}

	private static String mapTable(final String caption, final Map<String, ?> map) {
		final List<List<String>> rows = new ArrayList<>();
		for (final Map.Entry<String, ?> e : map.entrySet()) rows.add(List.of(e.getKey(), String.valueOf(e.getValue())));
		return tableHtml(new Table(caption, List.of("name", "value"), rows), -1);
	}

	/** A table; columns from {@code longFrom} on (paths, hashes) may break anywhere, the others only between words. */
	private static String tableHtml(final Table t, final int longFrom) {
		final StringBuilder h = new StringBuilder("<h2>").append(esc(t.caption())).append("</h2>\n<table><tr>");
		for (final String c : t.header()) h.append("<th>").append(esc(c)).append("</th>");
		h.append("</tr>\n");
		for (final List<String> r : t.rows()) {
			h.append("<tr>");
			for (int i = 0; i < r.size(); i++)
				h.append(longFrom >= 0 && i >= longFrom ? "<td class=\"long\">" : "<td>").append(esc(r.get(i))).append("</td>");
			h.append("</tr>\n");
		}
		return h.append("</table>\n").toString();
	}

	static String esc(final String s) {
		return s == null ? "" : s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;").replace("\"", "&quot;");
	}

}
