package dev.runoff.topology;


import dev.runoff.engine.stats.ArmStats;
import dev.runoff.records.avro.ExperimentDefinition;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.ByteBuffer;
import java.util.Objects;

/**
 * The envelope of the repartition topic keyed by experiment id: pre-aggregated statistics of one arm, a
 * validated definition, or the end of an experiment. Definitions and statistics share the topic so that
 * they reach the same task by construction.
 *
 * @param kind         which of the three
 * @param experimentId the experiment (also the record key)
 * @param arm          DELTA: the arm; otherwise {@code null}
 * @param version      DELTA: the definition version of the units' first exposure; otherwise 0
 * @param stats        DELTA: the statistics to merge; otherwise {@code null}
 * @param pending      DELTA: the change of the arm's pending units; otherwise 0
 * @param definition   DEFINITION: the validated definition as submitted; otherwise {@code null}
 * @param signalUnits  DELTA: per guardrail signal, the counted units that had it; otherwise empty
 * @param signalTotals DELTA: per signal of value guardrails, the total of the counted units' observations;
 *                     otherwise empty
 */
record StageTwo(Kind kind, String experimentId, String arm, long version, ArmStats stats, long pending,
                ExperimentDefinition definition, java.util.Map<String, Long> signalUnits,
                java.util.Map<String, Double> signalTotals) {

    /** Serde of the repartition topic. */
    static final InternalSerde<StageTwo> SERDE = new InternalSerde<>(StageTwo::encode, StageTwo::decode);

    private static final int FORMAT = 4;
    /** The format before value guardrails (no signal totals); still read, from a repartition topic an earlier job wrote. */
    private static final int FORMAT_WITHOUT_TOTALS = 3;
    /** The format before guardrail signals; still read, from a repartition topic an earlier job wrote. */
    private static final int FORMAT_WITHOUT_SIGNALS = 2;

    /** Checks that the fields of the kind are present. */
    StageTwo {
        Objects.requireNonNull(kind, "kind");
        Objects.requireNonNull(experimentId, "experimentId");
        if (kind == Kind.DELTA) {
            Objects.requireNonNull(arm, "arm");
            Objects.requireNonNull(stats, "stats");
        }
        if (kind == Kind.DEFINITION) {
            Objects.requireNonNull(definition, "definition");
        }
        signalUnits = java.util.Map.copyOf(signalUnits);
        signalTotals = java.util.Map.copyOf(signalTotals);
    }

    /** An envelope without signal totals. */
    StageTwo(Kind kind, String experimentId, String arm, long version, ArmStats stats, long pending,
             ExperimentDefinition definition, java.util.Map<String, Long> signalUnits) {
        this(kind, experimentId, arm, version, stats, pending, definition, signalUnits, java.util.Map.of());
    }

    /** An envelope without guardrail signals. */
    StageTwo(Kind kind, String experimentId, String arm, long version, ArmStats stats, long pending,
             ExperimentDefinition definition) {
        this(kind, experimentId, arm, version, stats, pending, definition, java.util.Map.of());
    }

    /** What the envelope carries. */
    enum Kind {
        /** Statistics to merge into one arm. */
        DELTA,
        /** A validated definition; the fold assigns its version. */
        DEFINITION,
        /** The definition was deleted: the experiment ends. */
        ENDED
    }

    static StageTwo delta(ArmDelta delta) {
        return new StageTwo(Kind.DELTA, delta.experimentId(), delta.arm(), delta.version(), delta.stats(),
                delta.pending(), null, delta.signalUnits(), delta.signalTotals());
    }

    static StageTwo definition(ExperimentDefinition definition) {
        return new StageTwo(Kind.DEFINITION, definition.getExperimentId(), null, 0, null, 0, definition);
    }

    static StageTwo ended(String experimentId) {
        return new StageTwo(Kind.ENDED, experimentId, null, 0, null, 0, null);
    }

    private static byte[] encode(StageTwo s) {
        BinaryOut out = new BinaryOut().writeByte(FORMAT).writeByte(s.kind.ordinal()).writeString(s.experimentId);
        switch (s.kind) {
            case DELTA -> {
                out.writeString(s.arm).writeLong(s.version);
                Stats.write(out, s.stats);
                out.writeLong(s.pending);
                ArmDelta.writeSignals(out, s.signalUnits);
                ArmDelta.writeTotals(out, s.signalTotals);
            }
            case DEFINITION -> out.writeBytes(DefinitionBytes.encode(s.definition));
            case ENDED -> {
                // nothing more
            }
        }
        return out.toByteArray();
    }

    private static StageTwo decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        int format = in.readByte();
        if (format != FORMAT && format != FORMAT_WITHOUT_TOTALS && format != FORMAT_WITHOUT_SIGNALS) {
            throw new IllegalArgumentException("stage-two format " + format + " is not " + FORMAT);
        }
        Kind kind = Kind.values()[in.readByte()];
        String experimentId = in.readString();
        StageTwo result = switch (kind) {
            case DELTA -> new StageTwo(kind, experimentId, in.readString(), in.readLong(), Stats.read(in),
                    in.readLong(), null, format == FORMAT_WITHOUT_SIGNALS ? java.util.Map.of() : ArmDelta.readSignals(in),
                    format == FORMAT ? ArmDelta.readTotals(in) : java.util.Map.of());
            case DEFINITION -> new StageTwo(kind, experimentId, null, 0, null, 0,
                    DefinitionBytes.decode(in.readBytes()));
            case ENDED -> new StageTwo(kind, experimentId, null, 0, null, 0, null);
        };
        in.end();
        return result;
    }

    /** Internal encoding of definitions: Avro single-object bytes of the current schema, unchecked. */
    static final class DefinitionBytes {
        private DefinitionBytes() {
        }

        static byte[] encode(ExperimentDefinition definition) {
            try {
                ByteBuffer buffer = definition.toByteBuffer();
                byte[] bytes = new byte[buffer.remaining()];
                buffer.get(bytes);
                return bytes;
            } catch (IOException e) {
                throw new UncheckedIOException("encoding a definition in memory failed", e);
            }
        }

        /** Reads definitions of the current schema and of every earlier one, which older jobs wrote. */
        static ExperimentDefinition decode(byte[] bytes) {
            return dev.runoff.records.Definitions.fromInternalBytes(bytes);
        }
    }
}
