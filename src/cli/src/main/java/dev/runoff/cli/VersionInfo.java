package dev.runoff.cli;

import dev.runoff.engine.AllocationEngine;
import picocli.CommandLine.IVersionProvider;

/** The version line: the jar's implementation version and the engine's arithmetic version. */
public final class VersionInfo implements IVersionProvider {

    @Override
    public String[] getVersion() {
        String jar = Main.class.getPackage().getImplementationVersion();
        return new String[] {
            "runoff " + (jar == null ? "(development build)" : jar) + ", engine " + AllocationEngine.VERSION
        };
    }
}
