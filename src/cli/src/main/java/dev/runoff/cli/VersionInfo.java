package dev.runoff.cli;

import dev.runoff.engine.AllocationEngine;
import dev.runoff.engine.EngineVersion;
import picocli.CommandLine.IVersionProvider;

/**
 * The version line: the jar's implementation version, the engine's arithmetic version that new decisions use,
 * and the versions whose records {@code audit verify} reproduces.
 */
public final class VersionInfo implements IVersionProvider {

    @Override
    public String[] getVersion() {
        String jar = Main.class.getPackage().getImplementationVersion();
        return new String[] {
            "runoff " + (jar == null ? "(development build)" : jar) + ", engine " + AllocationEngine.VERSION
                    + " (audit verify reproduces engine versions " + EngineVersion.supported() + ")"
        };
    }
}
