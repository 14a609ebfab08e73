package dev.runoff.broker;

import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.kafka.common.Uuid;
import org.apache.kafka.metadata.storage.Formatter;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Formats a KRaft log directory the first time it is used.
 *
 * <p>A KRaft node refuses to start on a directory without {@code meta.properties}, and formatting a
 * formatted directory again with a new cluster id fails ("Invalid cluster.id"), so the directory is
 * formatted only while that file is absent.
 */
final class StorageFormat {
    static final String META_PROPERTIES = "meta.properties";
    private static final Logger LOG = LoggerFactory.getLogger(StorageFormat.class);

    private StorageFormat() {
    }

    /**
     * Formats {@code logDirectory} as the metadata and data directory of node {@link BrokerProperties#NODE_ID},
     * with a new random cluster id, unless it already holds {@code meta.properties}.
     *
     * @param logDirectory the directory; created when missing
     * @param scramArguments SCRAM credentials to write into the metadata log, in the form of the formatter's
     *                       {@code --add-scram} option ({@code SCRAM-SHA-512=[name=u,password=p]}); may be empty
     * @return {@code true} if the directory was formatted now, {@code false} if it was already formatted
     */
    static boolean formatIfAbsent(Path logDirectory, List<String> scramArguments) {
        if (Files.exists(logDirectory.resolve(META_PROPERTIES))) {
            return false;
        }
        createDirectory(logDirectory);
        format(logDirectory.toAbsolutePath().toString(), scramArguments);
        return true;
    }

    private static void createDirectory(Path logDirectory) {
        try {
            Files.createDirectories(logDirectory);
        } catch (IOException e) {
            throw new EmbeddedBrokerException("could not create broker log directory " + logDirectory, e);
        }
    }

    private static void format(String directory, List<String> scramArguments) {
        ByteArrayOutputStream output = new ByteArrayOutputStream();
        try (PrintStream out = new PrintStream(output, true, StandardCharsets.UTF_8)) {
            new Formatter()
                    .setPrintStream(out)
                    .setNodeId(BrokerProperties.NODE_ID)
                    .setClusterId(Uuid.randomUuid().toString())
                    .setControllerListenerName(BrokerPorts.CONTROLLER_LISTENER)
                    .addDirectory(directory)
                    .setMetadataLogDirectory(directory)
                    .setScramArguments(scramArguments)
                    .run();
        } catch (Exception e) {
            throw new EmbeddedBrokerException("could not format broker log directory " + directory
                    + ": " + e.getMessage(), e);
        }
        LOG.debug("{}", output.toString(StandardCharsets.UTF_8).strip());
    }
}
