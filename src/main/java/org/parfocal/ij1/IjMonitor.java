package org.parfocal.ij1;

import ij.IJ;

import org.parfocal.core.Monitor;

/** Bridges the core's {@link Monitor} to ImageJ's progress bar, status line and the Escape key. */
final class IjMonitor implements Monitor {

	private final String command;

	IjMonitor(final String command) {
		this.command = command;
		IJ.resetEscape();
	}

	@Override
	public void progress(final int done, final int total, final String status) {
		IJ.showProgress(done, total);
		if (status != null) IJ.showStatus(command + ": " + status + " (Esc to cancel)");
	}

	@Override
	public boolean isCancelled() {
		return IJ.escapePressed();
	}

	/** Clears the progress bar and status line. */
	void done(final String status) {
		IJ.showProgress(1.0);
		IJ.showStatus(status == null ? "" : command + ": " + status);
	}
}
