package org.parfocal.provenance;

import java.util.ArrayList;
import java.util.Base64;
import java.util.List;
import java.util.Map;
import java.util.Objects;

/**
 * A self-contained HTML page describing one run: the caution, what was made and from what, every parameter, the
 * run's facts, versions, figures (PNG embedded as data URIs, so the page is one file) and tables. No scripts, no
 * external resources: it opens in any browser and can be archived with the data.
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

	public String toHtml() {
		final Provenance p = provenance;
		final StringBuilder h = new StringBuilder();
		h.append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\"><title>Parfocal report: ").append(esc(outputTitle)).append("</title>\n");
		h.append("<style>body{font-family:sans-serif;max-width:60em;margin:2em auto;color:#222}table{border-collapse:collapse;margin:.5em 0 1.5em}"
				+ "td,th{border:1px solid #bbb;padding:.25em .6em;text-align:left;vertical-align:top;overflow-wrap:anywhere}th{background:#eee}"
				+ ".caution{border:2px solid #b60;background:#fff4e5;padding:.6em 1em}figure{display:inline-block;margin:.5em 1em .5em 0}"
				+ "figcaption{font-size:.9em;color:#555}code{background:#f3f3f3;padding:0 .2em}</style></head><body>\n");
		h.append("<h1>").append(esc(outputTitle)).append("</h1>\n");
		h.append("<p class=\"caution\"><b>Caution.</b> ").append(esc(Provenance.CAUTION)).append("</p>\n");
		h.append("<h2>What was done</h2>\n<p>Command <b>").append(esc(p.command())).append("...</b>, ").append(esc(String.valueOf(p.date())))
				.append(", ").append(String.format(java.util.Locale.ROOT, "%.2f", p.seconds())).append(" s on ").append(p.threads()).append(" thread(s).</p>\n");
		h.append("<p>To run it again: <code>").append(esc(p.macro())).append("</code></p>\n");
		h.append(mapTable("Parameters", p.options()));
		if (!p.run().isEmpty()) h.append(mapTable("Run", p.run()));
		if (!p.inputs().isEmpty()) {
			final List<List<String>> rows = new ArrayList<>();
			for (final Provenance.Input in : p.inputs())
				// a field may be missing (the blocks runner records no pixel hash: it never holds the stack): List.of takes no null
				rows.add(List.of(Objects.toString(in.role(), ""), Objects.toString(in.title(), ""), Objects.toString(in.path(), ""),
						Objects.toString(in.shape(), ""), Objects.toString(in.sha256(), "not recorded"),
						in.source() == null ? "" : in.source().command() + "... " + MacroOptions.format(new java.util.LinkedHashMap<>(in.source().options()))));
			h.append(tableHtml(new Table("Inputs", List.of("role", "title", "file", "shape", "SHA-256 of pixels", "made by"), rows)));
		}
		for (final Table t : tables) h.append(tableHtml(t));
		if (!figures.isEmpty()) {
			h.append("<h2>Figures</h2>\n");
			for (final Figure f : figures)
				h.append("<figure><img alt=\"").append(esc(f.caption())).append("\" src=\"data:image/png;base64,")
						.append(Base64.getEncoder().encodeToString(f.png())).append("\"><figcaption>").append(esc(f.caption())).append("</figcaption></figure>\n");
		}
		h.append("<h2>Versions</h2>\n<p>Parfocal ").append(esc(String.valueOf(p.parfocalVersion()))).append(", ImageJ ")
				.append(esc(String.valueOf(p.imagejVersion()))).append(", Java ").append(esc(String.valueOf(p.javaVersion()))).append("</p>\n");
		h.append("<h2>Provenance record (JSON)</h2>\n<pre style=\"white-space:pre-wrap;font-size:.8em\">").append(esc(p.toJson())).append("</pre>\n");
		h.append("</body></html>\n");
		return h.toString();
	}

	private static String mapTable(final String caption, final Map<String, ?> map) {
		final List<List<String>> rows = new ArrayList<>();
		for (final Map.Entry<String, ?> e : map.entrySet()) rows.add(List.of(e.getKey(), String.valueOf(e.getValue())));
		return tableHtml(new Table(caption, List.of("name", "value"), rows));
	}

	private static String tableHtml(final Table t) {
		final StringBuilder h = new StringBuilder("<h2>").append(esc(t.caption())).append("</h2>\n<table><tr>");
		for (final String c : t.header()) h.append("<th>").append(esc(c)).append("</th>");
		h.append("</tr>\n");
		for (final List<String> r : t.rows()) {
			h.append("<tr>");
			for (final String c : r) h.append("<td>").append(esc(c)).append("</td>");
			h.append("</tr>\n");
		}
		return h.append("</table>\n").toString();
	}

	static String esc(final String s) {
		return s == null ? "" : s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;").replace("\"", "&quot;");
	}
}
