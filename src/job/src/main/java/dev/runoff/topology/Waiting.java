package dev.runoff.topology;

import java.util.ArrayList;
import java.util.List;

/**
 * Outcome events of one unit that arrived before its first trial event, each with the wall-clock time it
 * arrived, oldest first.
 *
 * @param events the waiting events
 */
record Waiting(List<Entry> events) {

    /** Serde of the early-outcomes store. */
    static final InternalSerde<Waiting> SERDE = new InternalSerde<>(Waiting::encode, Waiting::decode);

    /** Copies the list. */
    Waiting {
        events = List.copyOf(events);
    }

    /**
     * One waiting event.
     *
     * @param arrivedAt wall-clock time it arrived
     * @param event     the event
     */
    record Entry(long arrivedAt, UnitEvent event) {
    }

    /** This list with {@code entry} appended. */
    Waiting with(Entry entry) {
        List<Entry> more = new ArrayList<>(events);
        more.add(entry);
        return new Waiting(more);
    }

    private static byte[] encode(Waiting w) {
        BinaryOut out = new BinaryOut().writeInt(w.events.size());
        for (Entry e : w.events) {
            out.writeLong(e.arrivedAt).writeBytes(UnitEvent.SERDE.serializer().serialize(null, e.event));
        }
        return out.toByteArray();
    }

    private static Waiting decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        int count = in.readInt();
        List<Entry> events = new ArrayList<>(Math.min(count, 1024));
        for (int i = 0; i < count; i++) {
            events.add(new Entry(in.readLong(), UnitEvent.SERDE.deserializer().deserialize(null, in.readBytes())));
        }
        in.end();
        return new Waiting(events);
    }
}
