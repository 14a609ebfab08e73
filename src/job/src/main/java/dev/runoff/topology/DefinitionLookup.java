package dev.runoff.topology;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ExperimentDefinition;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.Map;
import org.apache.kafka.streams.state.KeyValueStore;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Finds the accepted definition of an experiment in the global store, keeping the decoded views of recently
 * used experiments so that an event costs one store read and a comparison of bytes. One instance per
 * processor (not thread-safe).
 */
final class DefinitionLookup {

    /** Store value of an experiment whose definition was deleted. */
    static final byte[] ENDED = new byte[0];

    private static final Logger LOG = LoggerFactory.getLogger(DefinitionLookup.class);
    private static final int CACHE_ENTRIES = 10_000;

    private final KeyValueStore<String, byte[]> store;
    private final RecordCodec<ExperimentDefinition> codec = RecordCodec.definitions();
    private final Map<String, Cached> cache = new LinkedHashMap<>(256, 0.75f, true) {
        @Override
        protected boolean removeEldestEntry(Map.Entry<String, Cached> eldest) {
            return size() > CACHE_ENTRIES;
        }
    };

    DefinitionLookup(KeyValueStore<String, byte[]> store) {
        this.store = store;
    }

    /** The definition of {@code experimentId}: found, ended or unknown. */
    Lookup find(String experimentId) {
        byte[] bytes = store.get(experimentId);
        if (bytes == null) {
            return Lookup.UNKNOWN;
        }
        if (bytes.length == 0) {
            return Lookup.ENDED;
        }
        Cached cached = cache.get(experimentId);
        if (cached != null && (cached.bytes == bytes || Arrays.equals(cached.bytes, bytes))) {
            return cached.lookup;
        }
        Lookup lookup = decode(experimentId, bytes);
        cache.put(experimentId, new Cached(bytes, lookup));
        return lookup;
    }

    private Lookup decode(String experimentId, byte[] bytes) {
        Decoded<ExperimentDefinition> decoded = codec.decode(bytes, 0L);
        if (!decoded.isValid()) {
            LOG.warn("Accepted definition of experiment {} is unreadable, events for it are rejected: {}",
                    experimentId, decoded.problems());
            return Lookup.UNKNOWN;
        }
        return new Lookup(Status.FOUND, DefinitionView.of(decoded.orThrow()));
    }

    /** Whether a definition was found. */
    enum Status {
        /** An accepted definition is in force. */
        FOUND,
        /** No accepted definition. */
        UNKNOWN,
        /** The definition was deleted. */
        ENDED
    }

    /**
     * Result of a lookup.
     *
     * @param status found, unknown or ended
     * @param view   the definition when found, else {@code null}
     */
    record Lookup(Status status, DefinitionView view) {
        static final Lookup UNKNOWN = new Lookup(Status.UNKNOWN, null);
        static final Lookup ENDED = new Lookup(Status.ENDED, null);
    }

    private record Cached(byte[] bytes, Lookup lookup) {
    }
}
