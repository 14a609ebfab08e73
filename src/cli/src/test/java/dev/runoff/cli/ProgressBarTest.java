package dev.runoff.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.PrintWriter;
import java.io.StringWriter;
import org.junit.jupiter.api.Test;

class ProgressBarTest {

    @Test
    void redrawsOncePerPercentAndEndsTheLineWhenDone() {
        StringWriter text = new StringWriter();
        ProgressBar bar = new ProgressBar(new PrintWriter(text));
        for (int done = 1; done <= 400; done++) {
            bar.finished(done, 400);
        }
        String out = text.toString();
        assertEquals(101, out.chars().filter(c -> c == '\r').count(), "0% to 100%, once each");
        String last = out.substring(out.lastIndexOf('\r') + 1);
        assertEquals("simulating [" + "#".repeat(ProgressBar.WIDTH) + "] 100% (400/400 runs)" + System.lineSeparator(),
                last);
        assertTrue(out.contains("\rsimulating [" + "#".repeat(15) + ".".repeat(15) + "]  50% (200/400 runs)"), out);
    }
}
