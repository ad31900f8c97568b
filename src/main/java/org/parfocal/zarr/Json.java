package org.parfocal.zarr;

import com.google.gson.Gson;
import com.google.gson.GsonBuilder;
import com.google.gson.JsonElement;

/** Gson as the Zarr metadata is written: indented, NaN allowed, no HTML escaping. */
final class Json {
	static final Gson GSON = new GsonBuilder().setPrettyPrinting().serializeNulls().serializeSpecialFloatingPointValues().disableHtmlEscaping().create();

	private Json() {}

	static String pretty(final JsonElement e) {
		return GSON.toJson(e);
	}
}
