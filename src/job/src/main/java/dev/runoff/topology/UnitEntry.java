package dev.runoff.topology;

import java.util.ArrayList;
import java.util.List;
import java.util.Objects;

/**
 * What the units store keeps per (experiment, unit): the unit's attribution state, if it has a trial event
 * (or had one that the clean-up has since dropped: then {@code null}), and the ids of its events seen within the
 * deduplication window, so that an event costs one read and one write of this entry rather than a separate
 * lookup and write of its id ({@link SeenEvents}).
 *
 * <p>The ids are bounded: at most {@link #MAX_SEEN} are kept, oldest first; an id pushed out while still
 * inside the window is handed back by {@link #remember} to be kept elsewhere, and {@code spilledUntil} says
 * until when (wall clock) the unit may have ids there.
 *
 * @param unit         the unit's attribution state, or {@code null}
 * @param seen         event ids seen, with when (wall clock), oldest first
 * @param spilledUntil until when ids pushed out of {@code seen} stay inside the window ({@link Long#MIN_VALUE}
 *                     when none were)
 */
record UnitEntry(UnitState unit, List<Seen> seen, long spilledUntil) {

    /** Serde of the units store. */
    static final InternalSerde<UnitEntry> SERDE = new InternalSerde<>(UnitEntry::encode, UnitEntry::decode);

    /** Most event ids one entry keeps; more within the window go to the overflow store. */
    static final int MAX_SEEN = 16;

    /** A unit never seen. */
    static final UnitEntry EMPTY = new UnitEntry(null, List.of(), Long.MIN_VALUE);

    /** Most ids an entry is read with (room for a later, larger bound); more means the bytes are corrupt. */
    private static final int MAX_READ = 1024;
    /** The first format with seen event ids; formats 2 to {@link UnitState#LAST_FORMAT} are still read. */
    private static final int FORMAT = 6;

    /** Copies the ids. */
    UnitEntry {
        seen = List.copyOf(seen);
    }

    /** An event id and when (wall clock) the job first saw it. */
    record Seen(String eventId, long at) {
        Seen {
            Objects.requireNonNull(eventId, "eventId");
        }
    }

    /** This entry after an event: the entry, and the ids pushed out of it while still inside the window. */
    record Remembered(UnitEntry entry, List<Seen> spilled) {
    }

    /** This entry holding {@code state} (which may be {@code null}) with the same ids. */
    UnitEntry withUnit(UnitState state) {
        return new UnitEntry(state, seen, spilledUntil);
    }

    /** Whether {@code eventId} is among the ids kept, seen at or after {@code since}. */
    boolean saw(String eventId, long since) {
        for (Seen s : seen) {
            if (s.at() >= since && s.eventId().equals(eventId)) {
                return true;
            }
        }
        return false;
    }

    /**
     * This entry with {@code eventId} seen at {@code now}: ids older than the window dropped, and beyond
     * {@link #MAX_SEEN} the oldest pushed out ({@link Remembered#spilled()}, with {@code spilledUntil} moved to
     * the end of their window).
     */
    Remembered remember(String eventId, long now, long windowMs) {
        long since = now - windowMs;
        List<Seen> kept = new ArrayList<>(Math.min(seen.size() + 1, MAX_SEEN + 1));
        for (Seen s : seen) {
            if (s.at() >= since) {
                kept.add(s);
            }
        }
        kept.add(new Seen(eventId, now));
        if (kept.size() <= MAX_SEEN) {
            return new Remembered(new UnitEntry(unit, kept, spilledUntil), List.of());
        }
        List<Seen> out = List.copyOf(kept.subList(0, kept.size() - MAX_SEEN));
        long until = spilledUntil;
        for (Seen s : out) {
            until = Math.max(until, saturatedSum(s.at(), windowMs));
        }
        return new Remembered(new UnitEntry(unit, kept.subList(kept.size() - MAX_SEEN, kept.size()), until), out);
    }

    /**
     * Whether an event seen by {@code now - windowMs} or later may be recorded here or in the overflow
     * store: while so the entry must not be dropped, or a redelivery would be taken for a new event.
     */
    boolean remembersAt(long now, long windowMs) {
        if (now <= spilledUntil) {
            return true;
        }
        long since = now - windowMs;
        for (Seen s : seen) {
            if (s.at() >= since) {
                return true;
            }
        }
        return false;
    }

    private static long saturatedSum(long a, long b) {
        long sum = a + b;
        return ((a ^ sum) & (b ^ sum)) < 0 ? Long.MAX_VALUE : sum;
    }

    private static byte[] encode(UnitEntry e) {
        BinaryOut out = new BinaryOut().writeByte(FORMAT).writeBoolean(e.unit != null);
        if (e.unit != null) {
            e.unit.write(out);
        }
        out.writeInt(e.seen.size());
        e.seen.forEach(s -> out.writeString(s.eventId()).writeLong(s.at()));
        return out.writeLong(e.spilledUntil).toByteArray();
    }

    private static UnitEntry decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        int format = in.readByte();
        UnitEntry entry;
        if (format == FORMAT) {
            UnitState unit = in.readBoolean() ? UnitState.read(in, UnitState.LAST_FORMAT) : null;
            entry = new UnitEntry(unit, readSeen(in), in.readLong());
        } else if (UnitState.known(format)) {
            entry = new UnitEntry(UnitState.read(in, format), List.of(), Long.MIN_VALUE);
        } else {
            throw new IllegalArgumentException("unit entry format " + format + " is not one of 2 to " + FORMAT);
        }
        in.end();
        return entry;
    }

    private static List<Seen> readSeen(BinaryIn in) {
        int count = in.readInt();
        if (count < 0 || count > MAX_READ) {
            throw new IllegalArgumentException("corrupt unit entry: " + count + " seen event ids");
        }
        List<Seen> seen = new ArrayList<>(count);
        for (int i = 0; i < count; i++) {
            seen.add(new Seen(in.readString(), in.readLong()));
        }
        return seen;
    }
}
