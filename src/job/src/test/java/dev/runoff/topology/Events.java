package dev.runoff.topology;

import java.nio.charset.StandardCharsets;

/** Outcome events as the JSON a producer would send. */
final class Events {

    private Events() {
    }

    static byte[] exposure(String experiment, String unit, String eventId, String arm, long timestamp) {
        return json(experiment, unit, eventId, "EXPOSURE", timestamp, arm, null);
    }

    static byte[] click(String experiment, String unit, String eventId, String arm, long timestamp) {
        return json(experiment, unit, eventId, "CLICK", timestamp, arm, null);
    }

    static byte[] value(String experiment, String unit, String eventId, String arm, long timestamp, double value) {
        return json(experiment, unit, eventId, "VALUE", timestamp, arm, value);
    }

    /** A CONVERSION event carrying a guardrail signal, arm-less (attributed to the unit's arm). */
    static byte[] signal(String experiment, String unit, String eventId, String signal, long timestamp) {
        String json = new String(json(experiment, unit, eventId, "CONVERSION", timestamp, null, null),
                StandardCharsets.UTF_8);
        return (json.substring(0, json.length() - 1) + ",\"signal\":\"" + signal + "\"}")
                .getBytes(StandardCharsets.UTF_8);
    }

    static byte[] json(String experiment, String unit, String eventId, String type, long timestamp, String arm,
                       Double value) {
        StringBuilder json = new StringBuilder(160).append("{\"experimentId\":\"").append(experiment)
                .append("\",\"unitId\":\"").append(unit).append("\",\"eventId\":\"").append(eventId)
                .append("\",\"type\":\"").append(type).append("\",\"timestamp\":").append(timestamp);
        if (arm != null) {
            json.append(",\"arm\":\"").append(arm).append('"');
        }
        if (value != null) {
            json.append(",\"value\":").append(value);
        }
        return json.append('}').toString().getBytes(StandardCharsets.UTF_8);
    }
}
