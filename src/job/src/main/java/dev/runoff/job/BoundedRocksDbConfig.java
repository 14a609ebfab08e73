package dev.runoff.job;

import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.kafka.streams.state.RocksDBConfigSetter;
import org.rocksdb.BlockBasedTableConfig;
import org.rocksdb.Cache;
import org.rocksdb.LRUCache;
import org.rocksdb.Options;
import org.rocksdb.WriteBufferManager;

/**
 * Bounds the off-heap memory of every RocksDB store of one application instance: block cache, index and
 * filter blocks and memtables all draw from one LRU cache of {@value AppSettings#ROCKSDB_CACHE_KEY} bytes,
 * of which memtables may hold {@value AppSettings#MEMTABLE_KEY} through a write-buffer manager charged to
 * that cache. This follows the bounded-memory configuration described in the Kafka Streams documentation
 * (Memory management, "RocksDB"): without it each store segment keeps its own cache and memtables, and
 * memory grows with the number of partitions.
 *
 * <p>Kafka Streams creates one instance of this class per store, so the cache and the manager are shared
 * statically: one pair per distinct (cache, memtable) size, made by the first store that asks for it, so two
 * jobs with different settings in one process each get the memory they were configured with. They live as
 * long as the process (closing them per store would pull them from under the other stores).
 */
public final class BoundedRocksDbConfig implements RocksDBConfigSetter {

    /** Share of the cache kept for index and filter blocks (high priority). */
    private static final double INDEX_FILTER_RATIO = 0.1;
    /** Block size of the tables: larger blocks mean smaller indexes. */
    private static final long BLOCK_SIZE = 16 * 1024L;
    /** Memtables per store before a flush is forced. */
    private static final int MEMTABLES_PER_STORE = 2;

    private static final Map<List<Long>, Shared> SHARED = new HashMap<>();

    /** The shared memory, made on first use. */
    private record Shared(long cacheBytes, long memtableBytes, Cache cache, WriteBufferManager manager) {
    }

    /** Kafka Streams instantiates the setter reflectively. */
    public BoundedRocksDbConfig() {
        // stateless; the shared cache is static
    }

    @Override
    public void setConfig(String storeName, Options options, Map<String, Object> configs) {
        Shared memory = shared(size(configs, AppSettings.ROCKSDB_CACHE_KEY, AppSettings.ROCKSDB_CACHE_BYTES),
                size(configs, AppSettings.MEMTABLE_KEY, AppSettings.MEMTABLE_BYTES));
        BlockBasedTableConfig table = (BlockBasedTableConfig) options.tableFormatConfig();
        table.setBlockCache(memory.cache());
        table.setCacheIndexAndFilterBlocks(true);
        table.setCacheIndexAndFilterBlocksWithHighPriority(true);
        table.setPinTopLevelIndexAndFilter(true);
        table.setBlockSize(BLOCK_SIZE);
        options.setWriteBufferManager(memory.manager());
        options.setMaxWriteBufferNumber(MEMTABLES_PER_STORE);
        options.setWriteBufferSize(Math.max(1L << 20, memory.memtableBytes() / 4));
        options.setTableFormatConfig(table);
    }

    @Override
    public void close(String storeName, Options options) {
        // the cache and the write-buffer manager are shared by every store: never closed here
    }

    private static synchronized Shared shared(long cacheBytes, long memtableBytes) {
        return SHARED.computeIfAbsent(List.of(cacheBytes, memtableBytes), k -> {
            Cache cache = new LRUCache(cacheBytes, -1, false, INDEX_FILTER_RATIO);
            return new Shared(cacheBytes, memtableBytes, cache, new WriteBufferManager(memtableBytes, cache));
        });
    }

    private static long size(Map<String, Object> configs, String key, long fallback) {
        Object value = configs.get(key);
        return value == null ? fallback : Long.parseLong(value.toString().trim());
    }
}
