package org.parfocal.scijava;

import ij.IJ;
import ij.ImagePlus;
import ij.Macro;
import ij.WindowManager;
import ij.macro.Interpreter;

import java.util.ArrayList;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Set;
import java.util.concurrent.atomic.AtomicInteger;
import java.util.concurrent.atomic.AtomicReference;
import java.util.function.BiConsumer;
import java.util.function.Consumer;

import org.parfocal.ij1.CommandFailure;

/**
 * How a {@link MenuCommand} runs its menu command: through {@code IJ.run} in macro mode on a {@code Run$_}
 * thread (ImageJ gives macro options to threads so named), batch mode on for the run unless it already was, the
 * images the command made collected by their new ids, and the command's one-line failure taken from
 * {@link CommandFailure}.
 */
final class MenuRun {

	private static final Object LOCK = new Object();
	private static final AtomicInteger THREADS = new AtomicInteger();

	private MenuRun() {}

	/**
	 * Runs {@code label} with {@code options} on {@code current} (may be null) in macro mode on a {@code Run$_}
	 * thread, with the image inputs ImageJ does not know registered as batch-mode images for the run; then hands
	 * the made images and the current image after the run to {@code collect}, or a one-line failure to
	 * {@code cancel}. One run at a time (ImageJ's macro state is global).
	 */
	static void run(final String label, final ImagePlus current, final String options, final List<ImagePlus> inputs, final Consumer<String> cancel,
			final BiConsumer<List<ImagePlus>, ImagePlus> collect) {
		synchronized (LOCK) {
			final boolean batch = Interpreter.batchMode;
			final Set<ImagePlus> registered = new LinkedHashSet<>();
			final AtomicReference<ImagePlus> after = new AtomicReference<>();
			final AtomicReference<Throwable> thrown = new AtomicReference<>();
			final List<ImagePlus> created = new ArrayList<>();
			try {
				Interpreter.batchMode = true;
				for (final ImagePlus imp : inputs) {
					final ImagePlus known = WindowManager.getImage(imp.getTitle());
					if (known == imp) continue;
					if (known != null) {
						cancel.accept(label.replace("...", "") + ": two images are called '" + imp.getTitle() + "'; give the inputs distinct titles");
						return;
					}
					Interpreter.addBatchModeImage(imp);
					registered.add(imp);
				}
				final Set<Integer> before = ids();
				CommandFailure.take();
				// ImageJ gives macro options to threads named Run$_..., as the macro interpreter's are.
				final Thread t = new Thread(() -> {
					try {
						IJ.run(current, label, options);
						after.set(WindowManager.getCurrentImage());
					} catch (final RuntimeException e) {
						if (!Macro.MACRO_CANCELED.equals(e.getMessage())) thrown.set(e);
					} finally {
						Macro.setOptions(null);
						WindowManager.setTempCurrentImage(null);
					}
				}, "Run$_parfocal-scijava-" + THREADS.incrementAndGet());
				t.start();
				join(t);
				for (final int id : ids())
					if (!before.contains(id)) {
						final ImagePlus imp = WindowManager.getImage(id);
						if (imp != null) created.add(imp);
					}
			} finally {
				if (!batch) {
					for (final ImagePlus imp : created) Interpreter.removeBatchModeImage(imp);
					for (final ImagePlus imp : registered) Interpreter.removeBatchModeImage(imp);
					Interpreter.batchMode = false;
				} else for (final ImagePlus imp : registered) Interpreter.removeBatchModeImage(imp);
			}
			final String failure = CommandFailure.take();
			if (failure != null) {
				cancel.accept(failure);
				return;
			}
			if (thrown.get() != null) {
				cancel.accept(label.replace("...", "") + ": " + thrown.get());
				return;
			}
			collect.accept(created, after.get());
		}
	}

	private static Set<Integer> ids() {
		final Set<Integer> s = new LinkedHashSet<>();
		final int[] ids = WindowManager.getIDList();
		if (ids != null) for (final int id : ids) s.add(id);
		return s;
	}

	private static void join(final Thread t) {
		try {
			t.join();
		} catch (final InterruptedException e) {
			Thread.currentThread().interrupt();
			throw new IllegalStateException("interrupted while " + t.getName() + " ran", e);
		}
	}
}
