package org.parfocal.scijava;

import org.scijava.plugin.Plugin;
import org.scijava.script.AdaptedScriptLanguage;
import org.scijava.script.ScriptLanguage;

/**
 * Groovy for the script test: SciJava's own Groovy language (org.scijava:scripting-groovy, what Fiji ships) is not
 * on Maven Central, so the test adapts Groovy's JSR-223 engine the way SciJava adapts any engine.
 */
@Plugin(type = ScriptLanguage.class, name = "Groovy")
public class GroovyForTests extends AdaptedScriptLanguage {

	public GroovyForTests() {
		super("groovy");
	}
}
