package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Set;
import org.junit.jupiter.api.Test;

class PromQlTest {

    @Test
    void findsMetricNamesAndNotFunctionsLabelsOrKeywords() {
        assertEquals(Set.of("a_total", "b_seconds_count"), PromQl.metricNames(
                "sum by (instance, reason) (rate(a_total{reason=\"x{y}\", instance=~\"$instance\"}[$__rate_interval]))"
                        + " / on (instance) group_left sum without (job) (increase(b_seconds_count[5m])) > 0.05"));
        assertEquals(Set.of("up"), PromQl.metricNames("min(up) == 0 and bool 1e3"));
    }
}
