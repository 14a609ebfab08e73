package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;

import dev.runoff.records.avro.MetricKind;
import dev.runoff.records.avro.StoppingRule;
import org.junit.jupiter.api.Test;

class ExperimentListRowTest {

    /** Every metric kind and stopping rule fits its column: the arms start under the ARMS heading. */
    @Test
    void everyMetricKindAndStoppingRuleKeepsTheArmsColumnAligned() {
        String header = String.format(ExperimentCommand.ListAll.row(), "EXPERIMENT", "VERSION", "METRIC", "STOPPING",
                "ARMS");
        int arms = header.indexOf("ARMS");
        for (MetricKind kind : MetricKind.values()) {
            for (StoppingRule rule : StoppingRule.values()) {
                String row = String.format(ExperimentCommand.ListAll.row(), "ferry-layout", "3", kind, rule,
                        "classic,wide");
                assertEquals(arms, row.indexOf("classic,wide"), row);
                assertEquals(header.indexOf("STOPPING"), row.indexOf(rule.name(), header.indexOf("METRIC")), row);
            }
        }
    }
}
