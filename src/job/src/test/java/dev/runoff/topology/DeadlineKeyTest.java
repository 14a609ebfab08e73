package dev.runoff.topology;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.Locale;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/** Deadline keys keep the layout the stores already hold: kind, time as 19 zero-padded digits, unit key. */
class DeadlineKeyTest {

    @Test
    void keysMatchTheZeroPaddedLayoutForEveryMagnitude() {
        // the reference is the earlier construction of the key, String.format of the time clamped at 0
        SplittableRandom random = new SplittableRandom(15);
        for (int i = 0; i < 2_000; i++) {
            long at = random.nextLong() >>> random.nextInt(64);
            assertEquals('C' + String.format(Locale.ROOT, "%019d", Math.max(0L, at)) + "e\u0000u",
                    Attribution.deadline(at, 'C', "e\u0000u"), "time " + at);
        }
        assertEquals("E9223372036854775807x", Attribution.deadline(Long.MAX_VALUE, 'E', "x"));
        assertEquals("C0000000000000000000x", Attribution.deadline(-5, 'C', "x"), "negative times sort first");
        assertEquals("C0000000000000000042", Attribution.deadline(42, 'C', ""));
    }
}
