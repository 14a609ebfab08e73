package dev.runoff.chaos;

import dev.runoff.broker.EmbeddedKafkaBroker;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;

/**
 * The in-JVM broker in a process of its own, so that killing job JVMs never touches it and a fatal broker
 * fault (Kafka halts its JVM) cannot take the test down: {@code ChaosBroker DIR FILE} starts it on {@code DIR},
 * writes its bootstrap address to {@code FILE} and runs until its standard input closes.
 */
public final class ChaosBroker {

    private ChaosBroker() {
    }

    /** Starts the broker; see the class comment. */
    public static void main(String[] args) throws Exception {
        Path dir = Path.of(args[0]);
        Path address = Path.of(args[1]);
        try (EmbeddedKafkaBroker broker = EmbeddedKafkaBroker.builder(dir).build().start()) {
            Path partial = address.resolveSibling(address.getFileName() + ".partial");
            Files.writeString(partial, broker.bootstrapServers(), StandardCharsets.UTF_8);
            Files.move(partial, address, StandardCopyOption.ATOMIC_MOVE);
            while (System.in.read() >= 0) {
                // runs until the test closes our standard input (or kills us)
            }
        }
    }
}
