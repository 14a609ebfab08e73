package dev.runoff.records;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.util.ArrayList;
import java.util.List;
import org.apache.avro.Schema;

/**
 * Earlier versions of the output schemas, of the outcome event (which older clients keep writing) and of the
 * definition (which the job's stores and the definitions topic hold), kept so that Avro records written before
 * a change still decode.
 * Rule: whenever a released schema of an output record changes, its last released text (as
 * {@code Schema.toString(true)} printed it, every named type inlined) is added as
 * {@code dev/runoff/records/writers/NAME-N.avsc} (N = 1, 2, ...) and never removed; the codecs register every
 * one of them ({@link RecordCodec#withWriterSchema}) and Avro's schema resolution fills the added fields with
 * their defaults.
 */
final class WriterSchemas {

    /** How many earlier versions each record has; a change adds one. */
    private static final int DECISION_RECORD_VERSIONS = 4;
    private static final int ALLOCATION_UPDATE_VERSIONS = 1;
    private static final int OUTCOME_EVENT_VERSIONS = 1;
    private static final int EXPERIMENT_DEFINITION_VERSIONS = 2;

    private WriterSchemas() {
    }

    /** The earlier writer schemas of record {@code name}, oldest first. */
    static List<Schema> previous(String name) {
        int count = switch (name) {
            case "DecisionRecord" -> DECISION_RECORD_VERSIONS;
            case "AllocationUpdate" -> ALLOCATION_UPDATE_VERSIONS;
            case "OutcomeEvent" -> OUTCOME_EVENT_VERSIONS;
            case "ExperimentDefinition" -> EXPERIMENT_DEFINITION_VERSIONS;
            default -> 0;
        };
        List<Schema> schemas = new ArrayList<>(count);
        for (int version = 1; version <= count; version++) {
            schemas.add(load(name + "-" + version + ".avsc"));
        }
        return List.copyOf(schemas);
    }

    private static Schema load(String file) {
        try (InputStream in = WriterSchemas.class.getResourceAsStream("writers/" + file)) {
            if (in == null) {
                throw new IllegalStateException("writer schema " + file + " is missing from the jar");
            }
            return new Schema.Parser().parse(in);
        } catch (IOException e) {
            throw new UncheckedIOException("cannot read writer schema " + file, e);
        }
    }
}
