package org.parfocal.testing;

/** An ImageJ command or macro run by {@link ImageJHarness} failed; the message says why, in one line. */
public class ImageJCommandException extends RuntimeException {

	private static final long serialVersionUID = 1L;

	public ImageJCommandException(final String message) {
		super(message);
	}

	public ImageJCommandException(final String message, final Throwable cause) {
		super(message, cause);
	}
}
