package dev.runoff.client;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/** The inlined logarithm against the JDK's StrictMath.log, which the Java SE specification ties to fdlibm. */
class StrictLogTest {

    @Test
    void sameBitsAsStrictMathOnTheRacesInputs() {
        // the race's inputs: (m + 1) * 2^-53 for 53-bit m, so every u in (0, 1] it can produce is one of these
        SplittableRandom random = new SplittableRandom(17);
        for (int i = 0; i < 2_000_000; i++) {
            double u = ((random.nextLong() >>> 11) + 1) * 0x1.0p-53;
            assertBits(u);
        }
        for (long m = 1; m < 5_000; m++) {
            assertBits(m * 0x1.0p-53);
            assertBits(1.0 - m * 0x1.0p-53);
        }
        assertBits(1.0);
        assertBits(0.5);
    }

    @Test
    void sameBitsAsStrictMathAcrossTheRangeAndAtSpecialValues() {
        SplittableRandom random = new SplittableRandom(23);
        for (int i = 0; i < 1_000_000; i++) {
            assertBits(Double.longBitsToDouble(random.nextLong() & Long.MAX_VALUE));
        }
        double[] special = {0.0, -0.0, -1.0, Double.MIN_VALUE, Double.MIN_NORMAL, Double.MAX_VALUE,
            Double.POSITIVE_INFINITY, Double.NaN, Math.sqrt(0.5), Math.sqrt(2), 2.0, Math.E};
        for (double x : special) {
            assertBits(x);
        }
    }

    private static void assertBits(double x) {
        // StrictMath.log is specified to return fdlibm's e_log.c result (java.lang.StrictMath javadoc)
        assertEquals(Double.doubleToRawLongBits(StrictMath.log(x)), Double.doubleToRawLongBits(StrictLog.log(x)),
                () -> "log(" + x + ")");
    }
}
