package dev.runoff.topology;

import dev.runoff.engine.core.Metric;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.engine.stats.ValueStats;

/** Internal encoding of sufficient statistics and their deltas. */
final class Stats {

    private static final int BERNOULLI = 0;
    private static final int VALUE = 1;

    private Stats() {
    }

    /** The metric kind of {@code stats}. */
    static Metric metric(ArmStats stats) {
        return stats instanceof BernoulliStats ? Metric.BERNOULLI : Metric.VALUE;
    }


    static void write(BinaryOut out, ArmStats stats) {
        if (stats instanceof BernoulliStats b) {
            out.writeByte(BERNOULLI).writeLong(b.trials()).writeLong(b.successes());
        } else {
            ValueStats v = (ValueStats) stats;
            out.writeByte(VALUE).writeLong(v.count()).writeDouble(v.mean()).writeDouble(v.m2());
        }
    }

    static ArmStats read(BinaryIn in) {
        int kind = in.readByte();
        return switch (kind) {
            case BERNOULLI -> new BernoulliStats(in.readLong(), in.readLong());
            case VALUE -> new ValueStats(in.readLong(), in.readDouble(), in.readDouble());
            default -> throw new IllegalArgumentException("corrupt internal value: statistics kind " + kind);
        };
    }

    static byte[] encode(ArmStats stats) {
        BinaryOut out = new BinaryOut();
        write(out, stats);
        return out.toByteArray();
    }

    static ArmStats decode(byte[] bytes) {
        BinaryIn in = new BinaryIn(bytes);
        ArmStats stats = read(in);
        in.end();
        return stats;
    }
}
