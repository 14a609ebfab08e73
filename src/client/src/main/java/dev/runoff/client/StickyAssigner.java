package dev.runoff.client;

import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Objects;

/**
 * Keeps a returning unit on the arm it was served, as long as that arm still has weight: a bounded memory of
 * the arm last served to each (experiment, unit key), in front of an {@link AllocationTable}.
 *
 * <p>Why. The table's pick is a function of the current weights alone ({@link ExponentialRace}): when the
 * weights change it moves as few units as such a function can, but it does move some (a unit whose arm lost
 * weight relatively to another may be drawn to that other arm), and the job then rejects the moved unit's
 * exposures and outcomes ({@code arm-conflict}, {@code arm-mismatch}). This class serves the remembered arm
 * instead, while the table could still serve it (the arm has weight in what the table draws from now, stale
 * fallback and after-stop policy included). A unit whose arm lost all its weight (switched off, or every arm but the winner after STOP) takes
 * the table's draw and is remembered on its new arm, so it moves once. A unit's first pick is the table's
 * draw, so first exposures, the ones the job counts, still follow the current weights.
 *
 * <p>Bounds. At most {@code capacity} units are remembered, the least recently served forgotten first; a
 * forgotten unit falls back to the table's sticky draw, which keeps it on its arm unless the weights moved it.
 * The memory lives in this process: replicas that do not share traffic by unit key, or a restart, start
 * from the table's draw. Definition updates change nothing here: like the job, which keeps a unit's first
 * arm across definition versions, the assigner keeps the unit on its arm while the arm has weight.
 *
 * <p>Thread-safe: the memory is guarded by this object's lock (one short critical section per call); the
 * table's pick itself stays lock-free. Raw unit keys are held in memory only, as in {@link ArmAssignment}.
 */
public final class StickyAssigner {

    private final AllocationTable table;
    private final int capacity;
    private final Map<String, String> memory;
    private long kept;

    private StickyAssigner(AllocationTable table, int capacity) {
        this.table = table;
        this.capacity = capacity;
        this.memory = new LinkedHashMap<>(16, 0.75f, true) {
            @Override
            protected boolean removeEldestEntry(Map.Entry<String, String> eldest) {
                return size() > StickyAssigner.this.capacity;
            }
        };
    }

    /**
     * An assigner in front of {@code table} remembering at most {@code capacity} units.
     *
     * @throws IllegalArgumentException when {@code capacity} is below 1
     */
    public static StickyAssigner over(AllocationTable table, int capacity) {
        Objects.requireNonNull(table, "table");
        if (capacity < 1) {
            throw new IllegalArgumentException("capacity must be >= 1, got " + capacity);
        }
        return new StickyAssigner(table, capacity);
    }

    /**
     * The arm to serve to {@code unitKey} in {@code experimentId}: the arm this assigner last served the unit
     * when the table could still serve it now, else the table's {@link AllocationTable#assign} (remembered when
     * drawn). Never throws for any experiment id or unit key.
     *
     * @return the assignment, for the {@link OutcomeReporter}
     */
    public ArmAssignment assign(String experimentId, String unitKey) {
        ArmAssignment drawn = table.assign(experimentId, unitKey);
        if (!drawn.drawn() || unitKey == null) {
            return drawn;
        }
        String key = experimentId + '\u0000' + unitKey;
        synchronized (this) {
            String last = memory.get(key);
            if (last != null && !last.equals(drawn.arm()) && table.servable(experimentId, last)) {
                kept++;
                return new ArmAssignment(experimentId, unitKey, last, true);
            }
            memory.put(key, drawn.arm());
            return drawn;
        }
    }

    /** Picks that served a remembered arm where the table's draw was another arm. */
    public synchronized long keptPicks() {
        return kept;
    }

    /** Units remembered now, at most the capacity. */
    public synchronized int remembered() {
        return memory.size();
    }

    /** The most units remembered. */
    public int capacity() {
        return capacity;
    }
}
