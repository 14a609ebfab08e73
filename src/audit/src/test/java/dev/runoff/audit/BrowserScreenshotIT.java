package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assumptions.assumeTrue;

import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.Browser;
import java.awt.image.BufferedImage;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
import javax.imageio.ImageIO;
import org.junit.jupiter.api.Test;

/**
 * Opens the SVG charts in a real headless browser (Debian's chromium, found by {@link Browser}) and keeps the
 * screenshots as {@code target/audit-report.png} and {@code target/audit-evidence.png} for review. Skipped, and
 * reported as skipped, where chromium is not installed ({@code .ci/run} installs it).
 */
class BrowserScreenshotIT {

    private static final Path TARGET = Path.of("target");
    private static final int WIDTH = 1000;
    private static final int HEIGHT = 700;

    @Test
    void chartRendersInAHeadlessBrowserWithEveryArmVisible() throws Exception {
        String chromium = Browser.chromium();
        assumeTrue(chromium != null, "chromium is not installed (apt-get install -y chromium): browser test skipped");
        List<DecisionRecord> chain = SimulatedJob.run(SimulatedJob.definition("checkout", List.of("control", "green",
                "blue"), 0), new double[] {0.04, 0.05, 0.09}, 40, 600, 11);
        Path svg = TARGET.resolve("audit-report.svg").toAbsolutePath();
        Files.writeString(svg, SvgChart.of(Timeline.of("checkout", chain)), StandardCharsets.UTF_8);
        Path png = TARGET.resolve("audit-report.png").toAbsolutePath();
        Files.deleteIfExists(png);
        screenshot(chromium, svg, png);
        BufferedImage image = ImageIO.read(png.toFile());
        assertEquals(WIDTH, image.getWidth());
        assertEquals(HEIGHT, image.getHeight());
        // The first three series colours of SvgChart (Okabe-Ito blue, vermillion, bluish green) must be drawn.
        for (int rgb : new int[] {0x0072B2, 0xD55E00, 0x009E73}) {
            assertTrue(Browser.pixelsNear(image, rgb) > 100, String.format("colour %06x drawn", rgb));
        }
    }

    @Test
    void evidenceChartRendersInAHeadlessBrowserWithItsSeriesAndReferenceSlopes() throws Exception {
        String chromium = Browser.chromium();
        assumeTrue(chromium != null, "chromium is not installed (apt-get install -y chromium): browser test skipped");
        List<DecisionRecord> chain = SimulatedJob.run(SimulatedJob.definition("checkout", List.of("control", "green",
                "blue"), 60 * SimulatedJob.PERIOD_MS), new double[] {0.04, 0.05, 0.09}, 60, 600, 11);
        Path svg = TARGET.resolve("audit-evidence.svg").toAbsolutePath();
        Files.writeString(svg, EvidenceChart.of(Timeline.of("checkout", chain), EvidenceView.of(chain)),
                StandardCharsets.UTF_8);
        Path png = TARGET.resolve("audit-evidence.png").toAbsolutePath();
        Files.deleteIfExists(png);
        screenshot(chromium, svg, png);
        BufferedImage image = ImageIO.read(png.toFile());
        // the two losing arms keep SvgChart's colours (Okabe-Ito blue, vermillion); the Gamma*_beta slope is
        // black and the uniform one grey #777777
        for (int rgb : new int[] {0x0072B2, 0xD55E00, 0x777777}) {
            assertTrue(Browser.pixelsNear(image, rgb) > 100, String.format("colour %06x drawn", rgb));
        }
    }

    /** Runs chromium headless on {@code page} and waits (at most 90 s) for the screenshot {@code png}. */
    static void screenshot(String chromium, Path page, Path png) throws IOException, InterruptedException {
        Path profile = Files.createTempDirectory(TARGET.toAbsolutePath(), "chromium-profile");
        List<String> command = new ArrayList<>(List.of(chromium, "--headless", "--no-sandbox", "--disable-gpu",
                "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run",
                "--user-data-dir=" + profile, "--screenshot=" + png, "--window-size=" + WIDTH + "," + HEIGHT,
                page.toUri().toString()));
        Process process = new ProcessBuilder(command).redirectErrorStream(true)
                .redirectOutput(TARGET.resolve("chromium.log").toFile()).start();
        if (!process.waitFor(90, TimeUnit.SECONDS)) {
            process.destroyForcibly();
            throw new AssertionError("chromium did not finish within 90 s; see target/chromium.log");
        }
        assertTrue(Files.size(png) > 0, "screenshot written; see target/chromium.log");
    }
}
