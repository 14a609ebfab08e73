package dev.runoff.topology;

import dev.runoff.decision.ExperimentState;
import dev.runoff.decision.GuardrailCounts;

import dev.runoff.engine.stats.ArmStats;
import java.util.ArrayList;
import java.util.List;

/** Internal encoding of {@link ExperimentState} for the experiments store. */
final class ExperimentStateSerde {

    /** Serde of the experiments store. */
    static final InternalSerde<ExperimentState> SERDE =
            new InternalSerde<>(ExperimentStateSerde::encode, ExperimentStateSerde::decode);

    private static final int FORMAT = 4;
    /** The format before value guardrails; entries an earlier job wrote are still read (no totals). */
    private static final int FORMAT_WITHOUT_TOTALS = 3;
    /** The format before guardrail counts; entries an earlier job wrote are still read (no counts). */
    private static final int FORMAT_WITHOUT_GUARDRAILS = 2;

    private ExperimentStateSerde() {
    }

    static byte[] encode(ExperimentState s) {
        BinaryOut out = new BinaryOut().writeByte(FORMAT).writeBytes(StageTwo.DefinitionBytes.encode(s.definition()))
                .writeInt(s.stats().size());
        s.stats().forEach(stats -> Stats.write(out, stats));
        out.writeBoolean(s.stop() != null);
        if (s.stop() != null) {
            ExperimentState.Stop stop = s.stop();
            out.writeString(stop.winner()).writeLong(stop.definitionVersion()).writeInt(stop.arms().size());
            stop.arms().forEach(out::writeString);
            writeDoubles(out, stop.weights());
        }
        out.writeLong(s.decisionSequence()).writeLong(s.allocationSequence()).writeString(s.lastHash())
                .writeBoolean(s.lastWeights() != null);
        if (s.lastWeights() != null) {
            writeDoubles(out, s.lastWeights());
        }
        out.writeLong(s.startedAt()).writeLong(s.lastComputedAt()).writeLong(s.lastPublishedAt())
                .writeBoolean(s.dirty()).writeBoolean(s.due()).writeBoolean(s.pending() != null);
        if (s.pending() != null) {
            writeLongs(out, s.pending());
        }
        writeLongs(out, s.armSince());
        writeGuardrails(out, s.guardrails());
        return out.toByteArray();
    }

    static ExperimentState decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        int format = in.readByte();
        if (format != FORMAT && format != FORMAT_WITHOUT_TOTALS && format != FORMAT_WITHOUT_GUARDRAILS) {
            throw new IllegalArgumentException("experiment state format " + format + " is not " + FORMAT);
        }
        var definition = StageTwo.DefinitionBytes.decode(in.readBytes());
        int arms = in.readInt();
        List<ArmStats> stats = new ArrayList<>(Math.min(arms, 1024));
        for (int i = 0; i < arms; i++) {
            stats.add(Stats.read(in));
        }
        ExperimentState.Stop stop = in.readBoolean() ? readStop(in) : null;
        long decisionSequence = in.readLong();
        long allocationSequence = in.readLong();
        String lastHash = in.readString();
        double[] lastWeights = in.readBoolean() ? readDoubles(in, arms) : null;
        long startedAt = in.readLong();
        long lastComputedAt = in.readLong();
        long lastPublishedAt = in.readLong();
        boolean dirty = in.readBoolean();
        boolean due = in.readBoolean();
        long[] pending = in.readBoolean() ? readLongs(in, arms) : null;
        long[] armSince = readLongs(in, arms);
        GuardrailCounts guardrails = format == FORMAT_WITHOUT_GUARDRAILS ? null
                : readGuardrails(in, arms, format == FORMAT);
        ExperimentState state = new ExperimentState(definition, stats, stop, decisionSequence, allocationSequence,
                lastHash, lastWeights, startedAt, lastComputedAt, lastPublishedAt, dirty, due, pending, armSince,
                guardrails);
        in.end();
        return state;
    }

    private static void writeGuardrails(BinaryOut out, GuardrailCounts counts) {
        out.writeInt(counts.guardrails().size());
        counts.guardrails().forEach(out::writeString);
        for (int a = 0; a < counts.counted().length; a++) {
            for (int g = 0; g < counts.guardrails().size(); g++) {
                out.writeLong(counts.counted(a, g)).writeLong(counts.hits(a, g)).writeDouble(counts.total(a, g));
            }
        }
    }

    private static GuardrailCounts readGuardrails(BinaryIn in, int arms, boolean totals) {
        int count = in.readInt();
        if (count < 0 || count > 64) {
            throw new IllegalArgumentException("corrupt experiment state: " + count + " guardrails");
        }
        List<String> names = new ArrayList<>(count);
        for (int g = 0; g < count; g++) {
            names.add(in.readString());
        }
        long[][] counted = new long[arms][count];
        long[][] hits = new long[arms][count];
        double[][] sums = new double[arms][count];
        for (int a = 0; a < arms; a++) {
            for (int g = 0; g < count; g++) {
                counted[a][g] = in.readLong();
                hits[a][g] = in.readLong();
                sums[a][g] = totals ? in.readDouble() : 0;
            }
        }
        return new GuardrailCounts(names, counted, hits, sums);
    }

    private static ExperimentState.Stop readStop(BinaryIn in) {
        String winner = in.readString();
        long version = in.readLong();
        int count = in.readInt();
        List<String> arms = new ArrayList<>(Math.min(count, 1024));
        for (int i = 0; i < count; i++) {
            arms.add(in.readString());
        }
        return new ExperimentState.Stop(winner, version, arms, readDoubles(in, count));
    }

    private static void writeLongs(BinaryOut out, long[] values) {
        for (long v : values) {
            out.writeLong(v);
        }
    }

    private static long[] readLongs(BinaryIn in, int count) {
        long[] values = new long[count];
        for (int i = 0; i < count; i++) {
            values[i] = in.readLong();
        }
        return values;
    }

    private static void writeDoubles(BinaryOut out, double[] values) {
        for (double v : values) {
            out.writeDouble(v);
        }
    }

    private static double[] readDoubles(BinaryIn in, int count) {
        double[] values = new double[count];
        for (int i = 0; i < count; i++) {
            values[i] = in.readDouble();
        }
        return values;
    }
}
