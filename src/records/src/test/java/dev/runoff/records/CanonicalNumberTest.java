package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.core.io.schubfach.DoubleToDecimal;
import java.math.BigDecimal;
import java.math.BigInteger;
import java.util.SplittableRandom;
import java.util.function.DoubleConsumer;
import org.junit.jupiter.api.Test;

/**
 * {@link CanonicalNumber} against the implementation it replaced ({@link ProvenNumber}: Java 17's digits
 * proven shortest by exact arithmetic, or an exact {@code BigDecimal} search), against an independent
 * Schubfach implementation (jackson-core's {@code DoubleToDecimal}, which follows Java 19's rule of at least
 * two digits), and its floor-logarithm helpers against exact integer arithmetic. ECMAScript and RFC 8785
 * examples are in {@code CanonicalJsonTest}.
 */
class CanonicalNumberTest {

    /** Doubles per family in {@link #sameTextAsTheProvenImplementation()}; a larger run is quoted in performance.md. */
    private static final int PER_FAMILY = 400_000;

    @Test
    void floorLogarithmsAreExactOverTheRangeUsed() {
        // floor(e log10 2) is the largest k with 10^k <= 2^e; floor(log10(3/4 2^e)) the largest k with
        // 4 10^k <= 3 2^e; floor(e log2 10) the largest j with 2^j <= 10^e (definitions of floor and log).
        for (int e = -1100; e <= 1100; e++) {
            assertEquals(largestPowerOfTenAtMost(BigInteger.ONE, e), CanonicalNumber.flog10pow2(e), "e = " + e);
            assertEquals(largestPowerOfTenAtMost(BigInteger.valueOf(3), e - 2),
                    CanonicalNumber.flog10ThreeQuartersPow2(e), "e = " + e);
        }
        for (int e = -400; e <= 400; e++) {
            BigDecimal power = BigDecimal.ONE.scaleByPowerOfTen(e);
            int j = CanonicalNumber.flog2pow10(e);
            assertTrue(twoToThe(j).compareTo(power) <= 0 && twoToThe(j + 1).compareTo(power) > 0, "e = " + e);
        }
    }

    @Test
    void sameTextAsTheProvenImplementation() {
        SplittableRandom random = new SplittableRandom(20261203L);
        char[] out = new char[CanonicalNumber.MAX_LENGTH];
        int[] checked = {0};
        DoubleConsumer check = x -> {
            String expected = ProvenNumber.number(x);
            assertEquals(expected, new String(out, 0, CanonicalNumber.write(x, out)), () -> "bits "
                    + Long.toHexString(Double.doubleToRawLongBits(x)));
            checked[0]++;
        };
        for (int i = 0; i < PER_FAMILY; i++) {
            check.accept(finite(random));
            check.accept(random.nextDouble());
            check.accept(random.nextInt(1, 1_000_000) / Math.pow(10, random.nextInt(0, 15)));
            check.accept(Math.exp(-random.nextDouble(0, 700)));
            check.accept(Double.longBitsToDouble(random.nextLong(1, 1L << 52)));
            check.accept(-random.nextDouble() * Math.pow(10, random.nextInt(-30, 30)));
        }
        edges(check);
        assertTrue(checked[0] > 6 * PER_FAMILY, "checked " + checked[0]);
    }

    @Test
    void sameDigitsAsAnIndependentSchubfach() {
        // jackson-core's DoubleToDecimal renders Java 19's Double.toString: the shortest decimal that reads
        // back, closest on a tie of length, except that a one-digit shortest may give way to a closer
        // two-digit decimal (Java 19 Double.toString javadoc). Where ours has two or more digits they agree.
        SplittableRandom random = new SplittableRandom(19L);
        char[] out = new char[CanonicalNumber.MAX_LENGTH];
        for (int i = 0; i < 200_000; i++) {
            double x = Math.abs(i % 2 == 0 ? finite(random) : random.nextDouble());
            if (x == 0) {
                continue;
            }
            BigDecimal ours = new BigDecimal(new String(out, 0, CanonicalNumber.write(x, out))).stripTrailingZeros();
            BigDecimal theirs = new BigDecimal(DoubleToDecimal.toString(x)).stripTrailingZeros();
            String bits = Long.toHexString(Double.doubleToRawLongBits(x));
            if (ours.precision() >= 2) {
                assertEquals(theirs, ours, bits);
            } else {
                assertTrue(theirs.precision() <= 2 && theirs.doubleValue() == x, bits);
            }
        }
    }

    @Test
    void theSmallestSubnormalsKeepOneDigit() {
        // ECMAScript: Number.MIN_VALUE is 5e-324 (ECMA-262, Number.MIN_VALUE, "approximately 5 x 10^-324");
        // twice it 1e-323 and three times 1.5e-323 (Node.js, from memory), where Java 19 writes 4.9E-324,
        // 9.9E-324 and 1.5E-323.
        assertEquals("5e-324", CanonicalJson.number(Double.MIN_VALUE));
        assertEquals("1e-323", CanonicalJson.number(2 * Double.MIN_VALUE));
        assertEquals("1.5e-323", CanonicalJson.number(3 * Double.MIN_VALUE));
    }

    /** Powers of two and ten with their neighbours, the smallest subnormals, layout boundaries, big integers. */
    private static void edges(DoubleConsumer check) {
        for (int e = -1074; e <= 1023; e++) {
            double p = Math.scalb(1.0, e);
            check.accept(p);
            check.accept(Math.nextUp(p));
            check.accept(Math.nextDown(p));
        }
        for (int e = -323; e <= 308; e++) {
            double p = Double.parseDouble("1e" + e);
            for (int d = -3; d <= 3; d++) {
                long bits = Double.doubleToRawLongBits(p) + d;
                if (bits > 0) {
                    check.accept(Double.longBitsToDouble(bits));
                }
            }
        }
        for (long t = 1; t <= 100_000; t++) {
            check.accept(Double.longBitsToDouble(t));
            check.accept(Double.longBitsToDouble((1L << 52) - t));
        }
        for (long n = (1L << 53) - 1000; n <= (1L << 53) + 1000; n++) {
            check.accept(n);
        }
        check.accept(Double.MAX_VALUE);
        check.accept(Double.MIN_NORMAL);
        check.accept(-0.0);
    }

    private static double finite(SplittableRandom random) {
        while (true) {
            double x = Double.longBitsToDouble(random.nextLong());
            if (Double.isFinite(x)) {
                return x;
            }
        }
    }

    /** The largest k with {@code 10^k <= m 2^e}. */
    private static int largestPowerOfTenAtMost(BigInteger m, int e) {
        BigDecimal value = new BigDecimal(m).multiply(e >= 0 ? new BigDecimal(BigInteger.TWO.pow(e))
                : BigDecimal.ONE.divide(new BigDecimal(BigInteger.TWO.pow(-e))));
        int k = value.precision() - value.scale() - 1;
        return BigDecimal.ONE.scaleByPowerOfTen(k).compareTo(value) <= 0 ? k : k - 1;
    }

    private static BigDecimal twoToThe(int j) {
        return j >= 0 ? new BigDecimal(BigInteger.TWO.pow(j)) : BigDecimal.ONE.divide(new BigDecimal(BigInteger.TWO.pow(-j)));
    }
}
