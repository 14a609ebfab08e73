package dev.runoff.job;

import dev.runoff.records.Decoded;
import dev.runoff.records.RecordCodec;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import java.util.Comparator;
import java.util.Locale;
import java.util.Map;
import org.apache.kafka.clients.producer.ProducerInterceptor;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.clients.producer.RecordMetadata;
import org.slf4j.Logger;
import org.slf4j.LoggerFactory;

/**
 * Logs one INFO line per decision record the job sends, as {@code key=value} pairs: a producer interceptor
 * on the Kafka Streams producers that looks only at records for the decisions topic (named by
 * {@value #TOPIC_KEY} in its configuration). Under exactly-once a record of a transaction that is later
 * aborted is logged too, and its retry again; the decisions topic stays the authority.
 */
public final class DecisionLog implements ProducerInterceptor<byte[], byte[]> {

    /** Producer configuration key (set with the {@code producer.} prefix) naming the decisions topic. */
    public static final String TOPIC_KEY = "runoff.decision.log.topic";

    private static final Logger LOG = LoggerFactory.getLogger(DecisionLog.class);
    private static final RecordCodec<DecisionRecord> CODEC = RecordCodec.decisionRecords();

    private String topic;

    /** Kafka instantiates the interceptor reflectively. */
    public DecisionLog() {
        // configured by configure(...)
    }

    @Override
    public void configure(Map<String, ?> configs) {
        Object value = configs.get(TOPIC_KEY);
        topic = value == null ? null : value.toString();
    }

    @Override
    public ProducerRecord<byte[], byte[]> onSend(ProducerRecord<byte[], byte[]> record) {
        if (topic != null && topic.equals(record.topic()) && record.value() != null && LOG.isInfoEnabled()) {
            long time = record.timestamp() == null ? 0 : Math.max(0, record.timestamp());
            Decoded<DecisionRecord> decoded = CODEC.decode(record.value(), time);
            if (decoded.isValid()) {
                LOG.info(line(decoded.orThrow()));
            }
        }
        return record;
    }

    /** The log line of {@code d}. */
    static String line(DecisionRecord d) {
        ArmState leader = d.getArms().stream().max(Comparator.comparingDouble(ArmState::getAlpha)).orElseThrow();
        long trials = d.getArms().stream().mapToLong(ArmState::getTrials).sum();
        StringBuilder b = new StringBuilder(200).append("event=decision experiment=").append(d.getExperimentId())
                .append(" version=").append(d.getDefinitionVersion()).append(" sequence=").append(d.getSequence())
                .append(" decision=").append(d.getDecision()).append(" reason=").append(d.getReason());
        if (d.getWinner() != null) {
            b.append(" winner=").append(d.getWinner());
        }
        b.append(" rule=").append(d.getStoppingRule());
        if (d.getStatistic() != null) {
            b.append(String.format(Locale.ROOT, " statistic=%.4g threshold=%.4g", d.getStatistic(), d.getThreshold()));
        }
        return b.append(" trials=").append(trials).append(" leader=").append(leader.getArm())
                .append(String.format(Locale.ROOT, " pBest=%.4f", leader.getAlpha()))
                .append(" hash=").append(d.getHash(), 0, Math.min(12, d.getHash().length())).toString();
    }

    @Override
    public void onAcknowledgement(RecordMetadata metadata, Exception exception) {
        // nothing to do: the line is written when the record is sent
    }

    @Override
    public void close() {
        // no resources
    }
}
