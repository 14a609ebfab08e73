package dev.runoff.audit;

import java.util.List;

/** Where decision records are read from: the decisions topic or an exported file. */
public interface DecisionSource {

    /**
     * Every record, in the order of the source (per partition offset order for a topic, line order for a
     * file).
     *
     * @param experimentId only this experiment's records, or {@code null} for all; a record whose experiment
     *                     cannot be read is kept only when this is {@code null}
     */
    List<Entry> read(String experimentId);
}
