package org.parfocal.scijava;

import ij.ImagePlus;

import java.io.File;
import java.lang.reflect.Field;
import java.lang.reflect.Modifier;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import org.parfocal.command.CommandKeys;
import org.parfocal.provenance.MacroOptions;
import org.scijava.ItemIO;
import org.scijava.command.ContextCommand;
import org.scijava.plugin.Parameter;

/**
 * A SciJava command that runs one Parfocal menu command: its input fields are the command's macro keys (field name
 * = key), turned into the options string a macro would pass and run through {@code IJ.run(label, options)} in macro
 * mode, so the typed path and the menu path are one code path (same checks, same provenance record, same pixels).
 * Images given as {@code ImagePlus} are found by title as the dialogs' choices expect: images ImageJ does not know
 * yet (a headless script's) are registered for the run as batch-mode images and forgotten afterwards. A command's
 * one-line failure cancels the module with that line as the reason.
 * <p>
 * Without a {@code menuPath} these commands add no menu entries: Fiji shows the {@code plugins.config} entry once.
 * While a command runs, ImageJ's batch mode is on (results are registered, not shown), unless it already was.
 */
public abstract class MenuCommand extends ContextCommand {

	/** The menu label with "...", as in plugins.config. */
	public abstract String menuLabel();

	/** The keys of this command (CommandKeys' table). */
	protected CommandKeys.Command keys() {
		return CommandKeys.of(menuLabel()).orElseThrow();
	}

	/** The options string this command's current inputs make (key order: field order). */
	public String macroOptions() {
		final Map<String, CommandKeys.Kind> kinds = keys().keys();
		final List<String> parts = new ArrayList<>();
		for (final Field f : inputFields()) {
			final String key = f.getName();
			if (!kinds.containsKey(key) || !include(key)) continue; // e.g. the current image of Export Provenance as Macro
			final Object v = get(f);
			if (v == null || v instanceof Double d && d.isNaN()) continue; // omitted: the command's macro default applies
			final String text;
			if (v instanceof Boolean b) {
				if (b) parts.add(key);
				continue;
			} else if (v instanceof ImagePlus imp) text = MacroOptions.quote(imp.getTitle());
			else if (v instanceof File file) text = MacroOptions.quote(file.getPath());
			else if (v instanceof Number n) text = MacroOptions.number(n.doubleValue());
			else text = kinds.get(key) == CommandKeys.Kind.TEXT ? MacroOptions.quote(v.toString()) : v.toString();
			if (text.isEmpty() && kinds.get(key) != CommandKeys.Kind.TEXT) continue;
			parts.add(key + "=" + text);
		}
		for (final Map.Entry<String, String> e : extraOptions().entrySet()) parts.add(e.getKey() + "=" + MacroOptions.quote(e.getValue()));
		return String.join(" ", parts);
	}

	/** False for a key this run must not send (e.g. second-dialog keys whose dialog is not shown). */
	protected boolean include(final String key) {
		return true;
	}

	/** Options the fields do not make (e.g. {@code psf=from_optics} when no PSF image is given). */
	protected Map<String, String> extraOptions() {
		return Map.of();
	}

	/**
	 * Hands the images the command made to the output fields. The default gives the command's result (the current
	 * image after the run, which every Parfocal command makes last) to the field named {@code result}.
	 */
	protected void collect(final List<ImagePlus> created, final ImagePlus current) {
		if (current != null && created.contains(current)) set("result", current);
	}

	@Override
	public void run() {
		final String options = macroOptions();
		MenuRun.run(menuLabel(), currentImage(), options, imageInputs(), this::cancel, this::collect);
	}

	/** The image the command works on as the current image (commands without an image key), or null. */
	protected ImagePlus currentImage() {
		return null;
	}

	private List<ImagePlus> imageInputs() {
		final List<ImagePlus> list = new ArrayList<>();
		for (final Field f : inputFields())
			if (get(f) instanceof ImagePlus imp && !list.contains(imp)) list.add(imp);
		final ImagePlus cur = currentImage();
		if (cur != null && !list.contains(cur)) list.add(cur);
		return list;
	}

	private List<Field> inputFields() {
		final List<Field> fields = new ArrayList<>();
		for (Class<?> c = getClass(); c != MenuCommand.class; c = c.getSuperclass())
			for (final Field f : c.getDeclaredFields()) {
				final Parameter p = f.getAnnotation(Parameter.class);
				if (p == null || Modifier.isStatic(f.getModifiers()) || p.type() == ItemIO.OUTPUT) continue;
				fields.add(f);
			}
		return fields;
	}

	private Object get(final Field f) {
		try {
			f.setAccessible(true);
			return f.get(this);
		} catch (final IllegalAccessException e) {
			throw new IllegalStateException(e);
		}
	}

	/** Sets an output field by name. */
	protected void set(final String name, final Object value) {
		try {
			final Field f = getClass().getDeclaredField(name);
			f.setAccessible(true);
			f.set(this, value);
		} catch (final ReflectiveOperationException e) {
			throw new IllegalStateException(e);
		}
	}

	/** The names of the input fields (the keys this command can send), for tests. */
	public List<String> inputNames() {
		return inputFields().stream().map(Field::getName).toList();
	}
}
