package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;

import java.math.BigDecimal;
import java.util.SplittableRandom;
import org.junit.jupiter.api.Test;

/**
 * The sign of {@code a 2^b - n 10^p} against {@link BigDecimal} (JDK), which holds both sides exactly: a
 * computation independent of both the 128-bit path and the {@link java.math.BigInteger} one.
 */
class BinaryDecimalSignTest {

    @Test
    void signMatchesExactDecimalArithmeticOnRandomOperands() {
        SplittableRandom random = new SplittableRandom(20261202L);
        for (int i = 0; i < 50_000; i++) {
            long a = random.nextLong(Long.MAX_VALUE) >>> random.nextInt(63);
            long n = random.nextLong(Long.MAX_VALUE) >>> random.nextInt(63);
            int b = i % 2 == 0 ? random.nextInt(-200, 200) : random.nextInt(-700, 700);
            int p = i % 2 == 0 ? random.nextInt(-60, 60) : random.nextInt(-400, 401);
            assertSign(a, b, n, p);
        }
    }

    @Test
    void signMatchesExactDecimalArithmeticWhereBothSidesAreClose() {
        SplittableRandom random = new SplittableRandom(53L);
        for (int i = 0; i < 30_000; i++) {
            double x = i % 2 == 0 ? random.nextDouble(1e-9, 1e9)
                    : Math.scalb(random.nextDouble(1, 2), random.nextInt(-1000, 1000));
            long bits = Double.doubleToRawLongBits(x);
            long m = (bits & ((1L << 52) - 1)) | (1L << 52);
            int e = (int) (bits >>> 52) - 1075;
            BigDecimal digits = new BigDecimal(Double.toString(x)).stripTrailingZeros();
            long n = digits.unscaledValue().longValueExact();
            int p = -digits.scale();
            assertSign(m, e, n, p);
            assertSign(2 * m + 1, e - 1, n, p);
            assertSign(2 * m - 1, e - 1, n, p);
            assertSign(m, e, 10 * n + 5, p - 1);
            assertSign(m, e, 10 * n - 5, p - 1);
        }
    }

    @Test
    void equalSidesGiveZeroAndZeroOperandsAreOrdered() {
        assertEquals(0, BinaryDecimalSign.of(5, -1, 25, -1));
        assertEquals(0, BinaryDecimalSign.of(1, 10, 1024, 0));
        assertEquals(0, BinaryDecimalSign.of(125, 3, 1, 3));
        assertEquals(0, BinaryDecimalSign.of(0, 100, 0, -300));
        assertEquals(1, BinaryDecimalSign.of(1, -1000, 0, 300));
        assertEquals(-1, BinaryDecimalSign.of(0, 0, 1, -400));
    }

    @Test
    void shiftsAtTheEdgeOf128BitsAgreeWithExactArithmetic() {
        long[] values = {1, 3, Long.MAX_VALUE, Long.MAX_VALUE >>> 1, 1L << 62, 5_000_000_000_000_000_000L / 10};
        for (long a : values) {
            for (long n : values) {
                for (int shift = -130; shift <= 130; shift++) {
                    for (int p = -28; p <= 28; p += 4) {
                        assertSign(a, shift + p, n, p);
                    }
                }
            }
        }
    }

    @Test
    void negativeOperandsOrHugeExponentsAreRejected() {
        assertThrows(IllegalArgumentException.class, () -> BinaryDecimalSign.of(-1, 0, 1, 0));
        assertThrows(IllegalArgumentException.class, () -> BinaryDecimalSign.of(1, 0, -1, 0));
        assertThrows(IllegalArgumentException.class, () -> BinaryDecimalSign.of(1, 0, 1, 401));
    }

    private static void assertSign(long a, int b, long n, int p) {
        BigDecimal power = new BigDecimal(2).pow(Math.abs(b));
        BigDecimal left = b >= 0 ? new BigDecimal(a).multiply(power) : new BigDecimal(a).divide(power);
        BigDecimal right = new BigDecimal(n).scaleByPowerOfTen(p);
        int expected = left.compareTo(right);
        assertEquals(expected, BinaryDecimalSign.of(a, b, n, p), "a = " + a + ", b = " + b + ", n = " + n
                + ", p = " + p);
        assertEquals(expected, BinaryDecimalSign.big(a, b, n, p));
    }
}
