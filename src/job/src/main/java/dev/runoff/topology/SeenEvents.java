package dev.runoff.topology;

import org.apache.kafka.streams.state.WindowStore;
import org.apache.kafka.streams.state.WindowStoreIterator;

/**
 * Deduplication (stage 1, step 3): an event whose id was already seen for the same experiment and unit within
 * the window is dropped and counted as a duplicate, not rejected (redelivery is normal: a redelivered event
 * names the same unit). Ids are kept per unit: two events of different units that share an id are both
 * counted (a job before format 6 of the unit entries kept them per experiment and dropped the second). The
 * window is measured on the injected wall clock (when the job saw the event, not the event's own timestamp,
 * so a redelivery with any timestamp is caught).
 *
 * <p>Where the ids live. Each unit's entry ({@link UnitEntry}) keeps the ids of its newest events, so the read
 * and write of the entry that attribution does anyway also deduplicate: no separate store lookup and no second
 * changelog record per event. Ids pushed out of an entry by its bound go to the overflow window store (retention
 * the window), which is read only for a unit that has ids there. Events of a unit without a trial event (held
 * or rejected) are kept in an entry without attribution state, as are the ids of a unit whose entry the clean-up
 * drops while they are inside the window.
 *
 * <p>Upgrade: a job of an earlier version kept every id in the window store {@link RunoffTopology#DEDUPE_STORE}
 * (the earlier store), which this job only reads (and anchors, below). If that store holds an id seen within
 * the window when the task reads its first event, every event is also looked up there until one window after
 * that moment; after it the store holds nothing that could still match.
 *
 * <p>Anchors: when its task starts, each of the two window stores gets one record under {@link #ANCHOR}
 * ({@link #anchor}), so that a clean restart keeps the task's local state. Design: under exactly-once, Kafka
 * Streams 4.4 asks every persistent logged store of a task for its committed changelog offset when the task
 * starts ({@code ProcessorStateManager.initializeStoreOffsets}, through {@code StateStore.committedOffset}); a
 * store without one, in a task directory that is not empty, may hold uncommitted writes, so the whole task is
 * wiped and restored from its changelogs ({@code TaskCorruptedException}). {@code ProcessorStateManager.commit}
 * hands each store its offset when the task closes cleanly, but a RocksDB window store keeps it in its segments
 * ({@code AbstractSegments.commit} and {@code committedOffset}): a window store without a segment, one that was
 * never written (the earlier store, on a job that never ran the earlier version) or has nothing yet (the
 * overflow store until some unit overflows), has nowhere to keep it and reports none. The anchor is a write
 * like any other (logged to the changelog inside the task's transaction), so it creates a segment; a segment
 * is dropped only when a later write moves the store's observed time a retention past it
 * ({@code AbstractSegments.cleanupExpiredSegments}), so the newest segment always stays. Exactly-once is
 * untouched: each segment is a {@code RocksDBStore} (as {@code KeyValueSegment}), which keeps its offset the way
 * the task's key-value stores keep theirs, so after a crash Kafka Streams treats it as it treats them. The
 * anchor key holds no NUL, so no event key (experiment, NUL, event id) or overflow key can equal it, and the
 * check of the earlier store skips it.
 */
final class SeenEvents {

    /** Key of the anchor record of both window stores (see the class comment). */
    static final String ANCHOR = "restart-anchor";

    private static final byte[] SEEN = {1};

    private final WindowStore<String, byte[]> overflow;
    private final WindowStore<String, byte[]> earlier;
    private final long windowMs;
    private boolean earlierChecked;
    private long earlierUntil;

    SeenEvents(WindowStore<String, byte[]> overflow, WindowStore<String, byte[]> earlier, long windowMs) {
        this.overflow = overflow;
        this.earlier = earlier;
        this.windowMs = windowMs;
    }

    /** Whether {@code event} was seen within the window before {@code now}, {@code entry} being its unit's. */
    boolean seen(UnitEntry entry, UnitEvent event, long now) {
        long since = Math.max(0L, now - windowMs);
        if (entry != null && entry.saw(event.eventId(), since)) {
            return true;
        }
        if (entry != null && now <= entry.spilledUntil()
                && holds(overflow, overflowKey(event, event.eventId()), since, now)) {
            return true;
        }
        return now <= earlierUntil(now) && holds(earlier, event.eventKey(), since, now);
    }

    /** Writes the anchor record into both window stores at {@code now}; called when the task starts. */
    void anchor(long now) {
        overflow.put(ANCHOR, SEEN, now);
        earlier.put(ANCHOR, SEEN, now);
    }

    /** {@code entry} (or a new one) with {@code event} seen at {@code now}; ids it pushes out are kept apart. */
    UnitEntry remember(UnitEntry entry, UnitEvent event, long now) {
        UnitEntry.Remembered remembered = (entry == null ? UnitEntry.EMPTY : entry).remember(event.eventId(), now,
                windowMs);
        for (UnitEntry.Seen s : remembered.spilled()) {
            overflow.put(overflowKey(event, s.eventId()), SEEN, s.at());
        }
        return remembered.entry();
    }

    /**
     * Until when the earlier store may hold a matching id: decided at the first event this task reads (after its
     * stores are restored), from whether the store holds any id seen within the window (anchors are not ids).
     */
    private long earlierUntil(long now) {
        if (!earlierChecked) {
            earlierChecked = true;
            earlierUntil = holdsAnId(Math.max(0L, now - windowMs), now) ? now + windowMs : Long.MIN_VALUE;
        }
        return earlierUntil;
    }

    private boolean holdsAnId(long since, long now) {
        try (var all = earlier.fetchAll(since, now)) {
            while (all.hasNext()) {
                if (!ANCHOR.equals(all.next().key.key())) {
                    return true;
                }
            }
        }
        return false;
    }

    /** Key of an id in the overflow store: the unit's key, NUL, the event id. */
    private static String overflowKey(UnitEvent event, String eventId) {
        return UnitEvent.unitKey(event.experimentId(), event.unitId()) + '\u0000' + eventId;
    }

    private static boolean holds(WindowStore<String, byte[]> store, String key, long since, long now) {
        try (WindowStoreIterator<byte[]> found = store.fetch(key, since, now)) {
            return found.hasNext();
        }
    }
}
