package dev.runoff.chaos;

import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.TreeMap;
import org.apache.kafka.clients.producer.ProducerRecord;

/**
 * A seeded feed of outcome events (JSON, as a producer would send them) over several experiments, with the
 * truth the job must count: every unit is exposed once to an arm drawn uniformly (the weights stay equal: the
 * experiments never leave their warm-up, so the audit's sample-ratio test holds), Bernoulli units click with an
 * arm-dependent rate, value units carry one value; 5% of the events are sent twice (the job drops the
 * repeats), and a few records are deliberately bad (half malformed JSON, half for an unknown experiment).
 */
final class ChaosFeed {

    /** Bad records the feed sends on purpose: reason -> count. */
    static final Map<String, Long> BAD = Map.of("malformed-json", 10L, "unknown-experiment", 10L);

    private final List<ProducerRecord<String, byte[]>> records = new ArrayList<>();
    private final Map<String, List<String>> arms = new TreeMap<>();
    private final Map<String, long[]> trials = new HashMap<>();
    private final Map<String, long[]> successes = new HashMap<>();
    private final Map<String, double[]> valueSums = new HashMap<>();
    private int duplicates;

    /**
     * The feed for {@code experiments} (id -> arms; an id starting with {@code value} is a VALUE metric),
     * {@code units} units each, on {@code topic}.
     */
    ChaosFeed(long seed, Map<String, List<String>> experiments, int units, String topic, long timestamp) {
        SplittableRandom random = new SplittableRandom(seed);
        arms.putAll(experiments);
        arms.forEach((id, a) -> {
            trials.put(id, new long[a.size()]);
            successes.put(id, new long[a.size()]);
            valueSums.put(id, new double[a.size()]);
        });
        for (int u = 0; u < units; u++) {
            for (Map.Entry<String, List<String>> e : experiments.entrySet()) {
                unit(random, topic, e.getKey(), e.getValue(), "u" + u, timestamp);
            }
        }
        long badCount = BAD.values().stream().mapToLong(Long::longValue).sum();
        for (int i = 0; i < badCount; i++) {
            records.add(random.nextInt(records.size() + 1), badRecord(topic, i, timestamp));
        }
    }

    private void unit(SplittableRandom random, String topic, String id, List<String> arms, String unit, long ts) {
        int arm = random.nextInt(arms.size());
        send(random, topic, unit, json(id, unit, unit + "-x", "EXPOSURE", ts, arms.get(arm), null));
        if (id.startsWith("value")) {
            double value = Math.round((20 + 5 * arm + 4 * random.nextGaussian()) * 100) / 100.0;
            send(random, topic, unit, json(id, unit, unit + "-v", "VALUE", ts + 1, null, value));
            trials.get(id)[arm]++;
            valueSums.get(id)[arm] += value;
            return;
        }
        trials.get(id)[arm]++;
        if (random.nextDouble() < 0.1 + 0.04 * arm) {
            send(random, topic, unit, json(id, unit, unit + "-c", "CLICK", ts + 1, null, null));
            successes.get(id)[arm]++;
        }
    }

    private void send(SplittableRandom random, String topic, String key, byte[] event) {
        records.add(new ProducerRecord<>(topic, key, event));
        if (random.nextDouble() < 0.05) {
            records.add(new ProducerRecord<>(topic, key, event));
            duplicates++;
        }
    }

    private static ProducerRecord<String, byte[]> badRecord(String topic, int i, long ts) {
        byte[] value = i % 2 == 0 ? ("{\"experimentId\":\"broken\",\"unitId\":" + i).getBytes(StandardCharsets.UTF_8)
                : json("nobody-defined-this", "b" + i, "b" + i, "EXPOSURE", ts, "a", null);
        return new ProducerRecord<>(topic, "bad-" + i, value);
    }

    private static byte[] json(String id, String unit, String eventId, String type, long ts, String arm, Double value) {
        StringBuilder json = new StringBuilder(160).append("{\"experimentId\":\"").append(id)
                .append("\",\"unitId\":\"").append(unit).append("\",\"eventId\":\"").append(eventId)
                .append("\",\"type\":\"").append(type).append("\",\"timestamp\":").append(ts);
        if (arm != null) {
            json.append(",\"arm\":\"").append(arm).append('"');
        }
        if (value != null) {
            json.append(",\"value\":").append(value);
        }
        return json.append('}').toString().getBytes(StandardCharsets.UTF_8);
    }

    /** Every record in sending order. */
    List<ProducerRecord<String, byte[]>> records() {
        return records;
    }

    /** The experiments and their arms. */
    Map<String, List<String>> arms() {
        return arms;
    }

    /** True trials per arm of {@code id}. */
    List<Long> trials(String id) {
        return list(trials.get(id));
    }

    /** True successes per arm of {@code id}. */
    List<Long> successes(String id) {
        return list(successes.get(id));
    }

    /** True mean value per arm of {@code id}. */
    double mean(String id, int arm) {
        return valueSums.get(id)[arm] / trials.get(id)[arm];
    }

    /** Events sent twice. */
    int duplicates() {
        return duplicates;
    }

    private static List<Long> list(long[] values) {
        List<Long> list = new ArrayList<>();
        for (long v : values) {
            list.add(v);
        }
        return list;
    }
}
