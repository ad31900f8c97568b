package org.parfocal.fft;

import static org.bytedeco.fftw.global.fftw3.FFTW_ESTIMATE;
import static org.bytedeco.fftw.global.fftw3.FFTW_MEASURE;
import static org.bytedeco.fftw.global.fftw3.fftwf_destroy_plan;
import static org.bytedeco.fftw.global.fftw3.fftwf_export_wisdom_to_filename;
import static org.bytedeco.fftw.global.fftw3.fftwf_import_wisdom_from_filename;

import java.nio.ByteOrder;
import java.nio.FloatBuffer;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayDeque;
import java.util.ArrayList;
import java.util.Deque;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.bytedeco.fftw.global.fftw3;
import org.bytedeco.fftw.global.fftw3.fftwf_plan;
import org.bytedeco.javacpp.FloatPointer;
import org.bytedeco.javacpp.Loader;
import org.bytedeco.javacpp.Pointer;

/**
 * The process-wide side of the FFTW backend: loading the natives, the planner (FFTW's planner is not
 * thread-safe, so every plan is made under one lock; executing plans is, so plans are shared by all threads),
 * the cache of plans by transform size, and the pool of native work buffers.
 * <p>
 * <b>Planning</b> ({@code -Dparfocal.fft.planning=auto|estimate|measure}, default {@code auto}): FFTW_ESTIMATE
 * plans take milliseconds and depend only on the size and the processor, so a result is the same bits in every
 * run; FFTW_MEASURE times candidate algorithms (a second or so for the slice and line plans of a large grid, the
 * first time) and keeps what it chose as wisdom in {@code ~/.parfocal/fftw-wisdom-float.txt}, so later runs plan
 * from it at once; on the deconvolution benchmark's grids measured plans ran 1.5–1.9× faster. {@code auto}
 * measures grids of at least {@link #MEASURE_FLOATS} floats and estimates smaller ones (tests, small stacks).
 * With measured plans a rerun in another process gives the same bits when it plans from the same wisdom, and
 * otherwise agrees within float rounding. Planning time is counted in {@link #planningSeconds()}.
 * <p>
 * <b>Memory</b>: a transform borrows small native buffers (one slice, or one block of lines) for each step and
 * gives them back; at most {@link #IDLE_BUFFERS} idle buffers are kept for the next call and the others are freed at
 * once (JavaCPP {@link Pointer#close}), so native memory never grows with the number of runs;
 * {@link #releaseIdle} frees them all. Plans of at most {@link #MAX_PLANS} sizes are kept.
 */
final class FftwLibrary {

	/** Idle native buffers kept for reuse (slice and block buffers of a few threads, each a few hundred KB). */
	static final int IDLE_BUFFERS = 8;
	/** Sizes whose plans are kept. */
	static final int MAX_PLANS = 16;
	/** Alignment of buffers, in bytes (FFTW's SIMD codelets want 16 or 32). */
	static final int ALIGN = 64;

	private static final String LOAD_ERROR;
	private static final String VERSION;
	/** Grids of at least this many floats get measured plans in the {@code auto} planning mode (16 MB). */
	static final long MEASURE_FLOATS = 1L << 22;
	private static final String PLANNING = System.getProperty("parfocal.fft.planning", "auto").trim().toLowerCase(Locale.ROOT);
	private static final Path WISDOM = Path.of(System.getProperty("user.home"), ".parfocal", "fftw-wisdom-float.txt");

	static {
		String error = null, version = null;
		try {
			Loader.load(fftw3.class);
			version = FftBackend.version(fftw3.class, "3.3.10-1.5.10");
		} catch (final Throwable t) {
			error = t.getClass().getSimpleName() + (t.getMessage() == null ? "" : ": " + t.getMessage().lines().findFirst().orElse(""));
		}
		LOAD_ERROR = error;
		VERSION = version;
	}

	private static final Object PLANNER = new Object();
	private static final Map<Long, FftwTransform.Plans> PLANS = new LinkedHashMap<>(16, 0.75f, true);
	private static final Deque<Buffer> IDLE = new ArrayDeque<>();
	private static boolean wisdomLoaded;
	private static double planningSeconds;

	private FftwLibrary() {}

	/** Null if FFTW loaded, else the reason in one line. */
	static String loadError() { return LOAD_ERROR; }

	static String description() {
		if (LOAD_ERROR != null) return "FFTW (not loaded: " + LOAD_ERROR + ")";
		final int dash = VERSION.indexOf('-');
		return "FFTW " + (dash > 0 ? VERSION.substring(0, dash) + " (JavaCPP presets " + VERSION.substring(dash + 1) + ")" : VERSION) + ", single precision, "
				+ switch (PLANNING) {
				case "estimate" -> "estimated plans";
				case "measure" -> "measured plans";
				default -> "plans measured for grids of " + (MEASURE_FLOATS >> 20) + " M values or more, estimated below";
				};
	}

	static long nativeBytes() { return Pointer.totalBytes(); }

	/** FFTW planner flag for a grid of {@code floats} floats. */
	static int planFlags(final long floats) {
		return measure(floats) ? FFTW_MEASURE : FFTW_ESTIMATE;
	}

	private static boolean measure(final long floats) {
		return "measure".equals(PLANNING) || !"estimate".equals(PLANNING) && floats >= MEASURE_FLOATS;
	}

	/** Seconds spent in FFTW's planner in this process so far. */
	static synchronized double planningSeconds() { return planningSeconds; }

	/** A native work buffer of {@code length} floats, 64-byte aligned (so every buffer of a size has the alignment its plans were made with). */
	static final class Buffer {
		final FloatPointer pointer;
		final FloatBuffer floats;
		final long length;

		private Buffer(final long length) {
			final FloatPointer raw = new FloatPointer(length + ALIGN / 4);
			final long misalign = raw.address() % ALIGN;
			final long shift = misalign == 0 ? 0 : (ALIGN - misalign) / 4;
			raw.position(shift).limit(shift + length);
			this.pointer = raw;
			this.floats = raw.asByteBuffer().order(ByteOrder.nativeOrder()).asFloatBuffer();
			this.length = length;
		}
	}

	/** A buffer of {@code floats} floats: an idle one of that size, or a new one. */
	static Buffer borrow(final long floats) {
		synchronized (IDLE) {
			for (final Iterator<Buffer> it = IDLE.iterator(); it.hasNext();) {
				final Buffer b = it.next();
				if (b.length == floats) {
					it.remove();
					return b;
				}
			}
		}
		return new Buffer(floats);
	}

	/** Gives a buffer back: kept for reuse, the oldest idle one freed beyond {@link #IDLE_BUFFERS}. */
	static void giveBack(final Buffer b) {
		final List<Buffer> free = new ArrayList<>();
		synchronized (IDLE) {
			IDLE.addFirst(b);
			while (IDLE.size() > IDLE_BUFFERS) free.add(IDLE.removeLast());
		}
		for (final Buffer f : free) f.pointer.close();
	}

	/** Frees every idle native buffer and every plan not in use. */
	static void releaseIdle() {
		final List<Buffer> free;
		synchronized (IDLE) {
			free = new ArrayList<>(IDLE);
			IDLE.clear();
		}
		for (final Buffer f : free) f.pointer.close();
		synchronized (PLANNER) {
			for (final Iterator<FftwTransform.Plans> it = PLANS.values().iterator(); it.hasNext();) {
				final FftwTransform.Plans p = it.next();
				if (p.users == 0) {
					p.destroy();
					it.remove();
				}
			}
		}
	}

	/**
	 * The plans of a transform size (a grid of {@code gridFloats} floats), made by {@code planner} if not cached.
	 * Every caller must {@link #unuse} them afterwards.
	 */
	static FftwTransform.Plans use(final long key, final long gridFloats, final java.util.function.Supplier<FftwTransform.Plans> planner) {
		synchronized (PLANNER) {
			FftwTransform.Plans p = PLANS.get(key);
			if (p == null) {
				final boolean measure = measure(gridFloats);
				if (measure && !wisdomLoaded) {
					wisdomLoaded = true;
					if (Files.isRegularFile(WISDOM)) fftwf_import_wisdom_from_filename(WISDOM.toString());
				}
				final long t0 = System.nanoTime();
				p = planner.get();
				synchronized (FftwLibrary.class) {
					planningSeconds += (System.nanoTime() - t0) * 1e-9;
				}
				if (measure) saveWisdom();
				PLANS.put(key, p);
				evict();
			}
			p.users++;
			return p;
		}
	}

	static void unuse(final FftwTransform.Plans p) {
		synchronized (PLANNER) {
			p.users--;
			if (!PLANS.containsValue(p) && p.users == 0) p.destroy();
		}
	}

	/** Drops the least recently used sizes beyond MAX_PLANS (destroyed now if unused, else by their last user). */
	private static void evict() {
		for (final Iterator<FftwTransform.Plans> it = PLANS.values().iterator(); it.hasNext() && PLANS.size() > MAX_PLANS;) {
			final FftwTransform.Plans p = it.next();
			it.remove();
			if (p.users == 0) p.destroy();
		}
	}

	private static void saveWisdom() {
		try {
			Files.createDirectories(WISDOM.getParent());
			// written next to the file and moved, so that two processes never see a half-written file
			final Path tmp = Files.createTempFile(WISDOM.getParent(), "fftw-wisdom", ".tmp");
			if (fftwf_export_wisdom_to_filename(tmp.toString()) != 0)
				Files.move(tmp, WISDOM, java.nio.file.StandardCopyOption.REPLACE_EXISTING, java.nio.file.StandardCopyOption.ATOMIC_MOVE);
			else Files.deleteIfExists(tmp);
		} catch (final java.io.IOException | RuntimeException e) {
			// wisdom is only a cache: without it the next run plans again
		}
	}

	static void destroy(final fftwf_plan plan) {
		if (plan != null && !plan.isNull()) fftwf_destroy_plan(plan);
	}
}
