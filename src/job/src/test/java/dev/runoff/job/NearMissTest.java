package dev.runoff.job;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.List;
import java.util.Optional;
import org.junit.jupiter.api.Test;

class NearMissTest {

    @Test
    void distanceCountsInsertionsDeletionsSubstitutionsAndSwaps() {
        assertEquals(0, NearMiss.distance("runoff", "runoff"));
        assertEquals(1, NearMiss.distance("runof", "runoff"));
        assertEquals(1, NearMiss.distance("runofff", "runoff"));
        assertEquals(1, NearMiss.distance("ruxoff", "runoff"));
        assertEquals(1, NearMiss.distance("rnuoff", "runoff"));
        assertEquals(3, NearMiss.distance("kitten", "sitting"));
        assertEquals(5, NearMiss.distance("", "abcde"));
    }

    @Test
    void theClosestKnownNameIsSuggestedWhenItIsASlip() {
        List<String> known = List.of("runoff.http.port", "runoff.topic.outcomes", "bootstrap.servers");
        assertEquals(Optional.of("runoff.http.port"), NearMiss.closest("runof.http.port", known));
        assertEquals(Optional.of("bootstrap.servers"), NearMiss.closest("bootstrap.server", known));
    }

    @Test
    void nothingIsSuggestedForANameFarFromEveryKnownOne() {
        assertEquals(Optional.empty(), NearMiss.closest("completely.unrelated", List.of("runoff.http.port")));
        assertEquals(Optional.empty(), NearMiss.closest("ab", List.of("xy")));
    }
}
