package org.parfocal.psf;

import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.scijava.plugin.PluginIndex;
import org.scijava.plugin.PluginInfo;

/**
 * The available PSF models, by key. Built-in models are listed here; further models are discovered as SciJava
 * plugins ({@code @Plugin(type = PsfModel.class)}), so adding a model is adding one class.
 * <p>
 * Why SciJava discovery and not a hand-kept list or {@code java.util.ServiceLoader}: SciJava Common is already on
 * the class path of every ImageJ/Fiji installation and its annotation processor writes the plugin index at compile
 * time, so a model in another jar needs no registration file; {@link PluginIndex} works without an application
 * context, so the core stays usable from plain Java. The built-ins are also listed explicitly, so they are
 * present even if a build skipped annotation processing.
 */
public final class PsfModels {

	private static volatile Map<String, PsfModel> models;

	private PsfModels() {}

	private static Map<String, PsfModel> models() {
		Map<String, PsfModel> m = models;
		if (m != null) return m;
		synchronized (PsfModels.class) {
			if (models != null) return models;
			m = new LinkedHashMap<>();
			for (final PsfModel p : new PsfModel[] { new GaussianModel(), new BornWolfModel(), new GibsonLanniModel(), new RichardsWolfModel() })
				m.put(p.key(), p);
			try {
				final PluginIndex index = new PluginIndex();
				index.discover();
				for (final PluginInfo<PsfModel> info : index.getPlugins(PsfModel.class)) {
					try {
						final PsfModel p = info.createInstance();
						m.putIfAbsent(p.key(), p);
					} catch (final Exception | LinkageError e) {
						// a broken third-party model must not hide the others; it is simply not offered
					}
				}
			} catch (final RuntimeException | LinkageError e) {
				// no plugin index on this class path: the built-ins remain
			}
			models = Collections.unmodifiableMap(m);
			return models;
		}
	}

	/** Keys of all models, built-ins first, for a dialog's choice list. */
	public static String[] keys() { return models().keySet().toArray(new String[0]); }

	/** All models. */
	public static List<PsfModel> all() { return new ArrayList<>(models().values()); }

	/** The model with this key (case-insensitive). */
	public static PsfModel get(final String key) {
		if (key != null)
			for (final Map.Entry<String, PsfModel> e : models().entrySet())
				if (e.getKey().equalsIgnoreCase(key.trim())) return e.getValue();
		throw new IllegalArgumentException("Unknown PSF model '" + key + "': use " + String.join(", ", keys()));
	}
}
