package org.parfocal.core;

/**
 * How a long computation reports progress and learns that it must stop. The core never touches a progress
 * bar or a key: the ImageJ layer bridges this to {@code IJ.showProgress} and the Escape key, a batch run to
 * its log. Implementations must be thread-safe.
 */
public interface Monitor {

	/** Monitor that reports nothing and never cancels. */
	Monitor NONE = new Monitor() {};

	/** {@code done} of {@code total} steps are finished; {@code status} says what is running. */
	default void progress(final int done, final int total, final String status) {}

	/** True once the user asked to stop. */
	default boolean isCancelled() { return false; }

	/**
	 * Throws {@link CancelledException} if the user asked to stop or the thread was interrupted. Call between
	 * steps; callers discard partial results.
	 */
	default void checkCancelled() {
		if (isCancelled() || Thread.currentThread().isInterrupted()) throw new CancelledException();
	}

	/** Thrown when a computation stops at the user's request; it carries no partial result. */
	final class CancelledException extends RuntimeException {
		private static final long serialVersionUID = 1L;

		public CancelledException() {
			super("Cancelled by the user");
		}
	}
}
