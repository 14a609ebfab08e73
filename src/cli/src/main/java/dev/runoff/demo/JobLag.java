package dev.runoff.demo;

import dev.runoff.job.JobConfig;
import java.util.HashMap;
import java.util.Map;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.TimeUnit;
import java.util.concurrent.TimeoutException;
import org.apache.kafka.clients.admin.Admin;
import org.apache.kafka.clients.admin.ListOffsetsResult;
import org.apache.kafka.clients.admin.OffsetSpec;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.common.TopicPartition;

/**
 * How far the job's consumers are behind their input topics (the outcome topic and the job's repartition
 * topics): the sum over partitions of the end offset less the group's committed offset. The demo pauses its
 * visitors while this is large, so that its traffic stays within what the job folds in time on a busy machine.
 */
final class JobLag implements AutoCloseable {

    private static final long TIMEOUT_MS = 5_000;

    private final Admin admin;
    private final String groupId;

    /** @param groupId the job's consumer group (its {@code application.id}) */
    JobLag(JobConfig config, String groupId) {
        this.admin = Admin.create(config.clientProperties(JobConfig.Client.ADMIN));
        this.groupId = groupId;
    }

    /** Records the job has yet to read, over its input partitions; 0 before the group has committed anything. */
    long records() throws InterruptedException {
        try {
            Map<TopicPartition, OffsetAndMetadata> committed = admin.listConsumerGroupOffsets(groupId)
                    .partitionsToOffsetAndMetadata().get(TIMEOUT_MS, TimeUnit.MILLISECONDS);
            Map<TopicPartition, OffsetSpec> latest = new HashMap<>();
            committed.keySet().forEach(p -> latest.put(p, OffsetSpec.latest()));
            Map<TopicPartition, ListOffsetsResult.ListOffsetsResultInfo> ends = admin.listOffsets(latest).all()
                    .get(TIMEOUT_MS, TimeUnit.MILLISECONDS);
            long lag = 0;
            for (Map.Entry<TopicPartition, OffsetAndMetadata> e : committed.entrySet()) {
                if (e.getValue() != null && ends.containsKey(e.getKey())) {
                    lag += Math.max(0, ends.get(e.getKey()).offset() - e.getValue().offset());
                }
            }
            return lag;
        } catch (ExecutionException | TimeoutException e) {
            throw new IllegalStateException("cannot read the lag of consumer group " + groupId + ": " + e, e);
        }
    }

    @Override
    public void close() {
        admin.close();
    }
}
