package dev.runoff.job;

import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * The application's own settings (beside the topology's {@code runoff.*} keys and the Kafka keys).
 *
 * @param httpPort          port of the HTTP endpoint ({@value #HTTP_PORT_KEY}, default {@value #HTTP_PORT});
 *                          0 picks a free port
 * @param rocksDbCacheBytes off-heap memory shared by every RocksDB store of one instance: block cache,
 *                          index and filter blocks, and memtables ({@value #ROCKSDB_CACHE_KEY}, default
 *                          {@value #ROCKSDB_CACHE_BYTES})
 * @param memtableBytes     the part of that memory memtables may use ({@value #MEMTABLE_KEY}, default
 *                          {@value #MEMTABLE_BYTES}); less than the cache
 * @param shutdownTimeoutMs how long a shutdown waits for the stream threads ({@value #SHUTDOWN_TIMEOUT_KEY},
 *                          default {@value #SHUTDOWN_TIMEOUT_MS})
 */
public record AppSettings(int httpPort, long rocksDbCacheBytes, long memtableBytes, long shutdownTimeoutMs) {

    /** Key of {@link #httpPort()}. */
    public static final String HTTP_PORT_KEY = "runoff.http.port";
    /** Key of {@link #rocksDbCacheBytes()}. */
    public static final String ROCKSDB_CACHE_KEY = "runoff.rocksdb.cache.bytes";
    /** Key of {@link #memtableBytes()}. */
    public static final String MEMTABLE_KEY = "runoff.rocksdb.memtable.bytes";
    /** Key of {@link #shutdownTimeoutMs()}. */
    public static final String SHUTDOWN_TIMEOUT_KEY = "runoff.shutdown.timeout.ms";
    /** Every key of this record. */
    public static final List<String> KEYS = List.of(HTTP_PORT_KEY, ROCKSDB_CACHE_KEY, MEMTABLE_KEY,
            SHUTDOWN_TIMEOUT_KEY);

    /** Default of {@link #httpPort()}. */
    public static final int HTTP_PORT = 8080;
    /** Default of {@link #rocksDbCacheBytes()}: 64 MiB. */
    public static final long ROCKSDB_CACHE_BYTES = 64L << 20;
    /** Default of {@link #memtableBytes()}: 16 MiB. */
    public static final long MEMTABLE_BYTES = 16L << 20;
    /** Default of {@link #shutdownTimeoutMs()}. */
    public static final long SHUTDOWN_TIMEOUT_MS = 30_000L;

    private static final long MEBIBYTE = 1L << 20;

    /** Checks the ranges; the message names the key and the value. */
    public AppSettings {
        if (httpPort < 0 || httpPort > 65_535) {
            throw new IllegalArgumentException(HTTP_PORT_KEY + " must be in [0, 65535], got " + httpPort);
        }
        if (rocksDbCacheBytes < MEBIBYTE) {
            throw new IllegalArgumentException(ROCKSDB_CACHE_KEY + " must be at least 1 MiB (1048576), got "
                    + rocksDbCacheBytes);
        }
        if (memtableBytes < 1 || memtableBytes >= rocksDbCacheBytes) {
            throw new IllegalArgumentException(MEMTABLE_KEY + " must be in [1, " + ROCKSDB_CACHE_KEY + " = "
                    + rocksDbCacheBytes + "), got " + memtableBytes);
        }
        if (shutdownTimeoutMs < 1) {
            throw new IllegalArgumentException(SHUTDOWN_TIMEOUT_KEY + " must be >= 1, got " + shutdownTimeoutMs);
        }
    }

    /** Every setting at its default. */
    public static AppSettings defaults() {
        return new AppSettings(HTTP_PORT, ROCKSDB_CACHE_BYTES, MEMTABLE_BYTES, SHUTDOWN_TIMEOUT_MS);
    }

    /**
     * The settings in {@code values} (other keys are ignored), defaults for the rest. Each problem goes to
     * {@code problems}, one message per key; the result is then {@code null}.
     */
    static AppSettings from(Map<String, String> values, Consumer<String> problems) {
        int[] count = {0};
        Consumer<String> counting = message -> {
            count[0]++;
            problems.accept(message);
        };
        long port = SettingValues.whole(values, HTTP_PORT_KEY, HTTP_PORT, 0, 65_535, counting);
        long cache = SettingValues.whole(values, ROCKSDB_CACHE_KEY, ROCKSDB_CACHE_BYTES, MEBIBYTE, Long.MAX_VALUE, counting);
        long memtables = SettingValues.whole(values, MEMTABLE_KEY, MEMTABLE_BYTES, 1, Long.MAX_VALUE, counting);
        long timeout = SettingValues.whole(values, SHUTDOWN_TIMEOUT_KEY, SHUTDOWN_TIMEOUT_MS, 1, Long.MAX_VALUE, counting);
        if (count[0] == 0 && memtables >= cache) {
            counting.accept(MEMTABLE_KEY + " must be less than " + ROCKSDB_CACHE_KEY + " = " + cache + ", got "
                    + memtables);
        }
        return count[0] == 0 ? new AppSettings((int) port, cache, memtables, timeout) : null;
    }
}
