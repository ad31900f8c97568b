package org.parfocal.core;

import java.util.ArrayList;
import java.util.List;
import java.util.function.IntConsumer;

import net.imglib2.parallel.Parallelization;
import net.imglib2.parallel.TaskExecutor;

/**
 * Index loops spread over the threads of the caller's {@link Parallelization} context. Callers choose the
 * thread count, e.g. {@code Parallelization.runWithNumThreads(2, () -> op.apply(x))}; by default the
 * context uses all cores.
 * <p>
 * Every index is processed by the same code whatever the split, so a body that writes only to its own
 * index gives bitwise identical results for 1 and N threads. Reductions must not depend on the split:
 * use {@link #sum} which combines fixed blocks in a fixed order.
 */
public final class Parallel {

	private Parallel() {}

	/** Calls {@code body} for every i in [0, n), in contiguous chunks on the context's threads. */
	public static void forRange(final int n, final IntConsumer body) {
		final TaskExecutor ex = Parallelization.getTaskExecutor();
		final int tasks = Math.min(n, ex.getParallelism() <= 1 ? 1 : ex.suggestNumberOfTasks());
		if (tasks <= 1) {
			for (int i = 0; i < n; i++) body.accept(i);
			return;
		}
		final List<int[]> chunks = new ArrayList<>(tasks);
		for (int c = 0; c < tasks; c++)
			chunks.add(new int[] { (int) ((long) n * c / tasks), (int) ((long) n * (c + 1) / tasks) });
		try {
			ex.forEach(chunks, ch -> {
				for (int i = ch[0]; i < ch[1]; i++) body.accept(i);
			});
		} catch (final RuntimeException e) {
			throw unwrap(e);
		}
	}

	/**
	 * The exception a task threw, rather than the executor's wrapper of it, so that one-line messages and
	 * cancellation reach the caller as they were thrown.
	 */
	static RuntimeException unwrap(final RuntimeException e) {
		for (Throwable c = e; c != null; c = c.getCause()) {
			if (c instanceof Error err) throw err;
			if (c instanceof IllegalArgumentException || c instanceof IllegalStateException || c instanceof Monitor.CancelledException)
				return (RuntimeException) c;
		}
		return e;
	}

	/** Fixed block length of {@link #sum}: the split into blocks never depends on the thread count. */
	public static final int SUM_BLOCK = 1 << 16;

	/**
	 * Σ term(i) for i in [0, n): compensated sums over fixed blocks, added in block order, so the result is the
	 * same for any number of threads.
	 */
	public static double sum(final int n, final java.util.function.IntToDoubleFunction term) {
		final int blocks = (n + SUM_BLOCK - 1) / SUM_BLOCK;
		final double[] partial = new double[blocks];
		forRange(blocks, b -> {
			final Sums.Compensated s = new Sums.Compensated();
			for (int i = b * SUM_BLOCK, e = Math.min(n, i + SUM_BLOCK); i < e; i++) s.add(term.applyAsDouble(i));
			partial[b] = s.value();
		});
		final Sums.Compensated s = new Sums.Compensated();
		for (final double v : partial) s.add(v);
		return s.value();
	}
}
