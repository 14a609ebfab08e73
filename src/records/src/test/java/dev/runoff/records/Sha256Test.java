package dev.runoff.records;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.nio.charset.StandardCharsets;
import java.util.HexFormat;
import java.util.List;
import java.util.concurrent.ExecutionException;
import java.util.concurrent.ExecutorService;
import java.util.concurrent.Executors;
import java.util.concurrent.Future;
import java.util.stream.IntStream;
import org.junit.jupiter.api.Test;

class Sha256Test {

    /** FIPS 180-2, Appendix B.1 (one-block message "abc"). */
    private static final String ABC = "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad";

    @Test
    void digestMatchesTheFipsExampleEachTimeItIsReused() {
        for (int i = 0; i < 3; i++) {
            assertEquals(ABC, HexFormat.of().formatHex(Sha256.digest("abc".getBytes(StandardCharsets.US_ASCII))));
        }
        // SHA-256 of the empty message, a widely published value (from memory).
        assertEquals("e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
                HexFormat.of().formatHex(Sha256.digest(new byte[0])));
    }

    @Test
    void threadsHashingAtOnceEachGetTheRightDigest() throws InterruptedException, ExecutionException {
        ExecutorService pool = Executors.newFixedThreadPool(4);
        try {
            List<Future<String>> results = IntStream.range(0, 64).mapToObj(i -> pool.submit(() -> {
                String last = "";
                for (int k = 0; k < 200; k++) {
                    last = HexFormat.of().formatHex(Sha256.digest("abc".getBytes(StandardCharsets.US_ASCII)));
                }
                return last;
            })).toList();
            for (Future<String> result : results) {
                assertEquals(ABC, result.get());
            }
        } finally {
            pool.shutdownNow();
        }
    }
}
