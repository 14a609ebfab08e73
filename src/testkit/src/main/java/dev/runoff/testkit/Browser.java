package dev.runoff.testkit;

import java.awt.image.BufferedImage;
import java.io.File;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

/** Headless-browser support for tests: where chromium is, and what a screenshot shows. */
public final class Browser {

    private Browser() {
    }

    /** The chromium executable on the PATH ({@code chromium} or {@code chromium-browser}), or null. */
    public static String chromium() {
        for (String name : List.of("chromium", "chromium-browser")) {
            for (String dir : System.getenv().getOrDefault("PATH", "").split(File.pathSeparator)) {
                if (!dir.isEmpty() && Files.isExecutable(Path.of(dir, name))) {
                    return Path.of(dir, name).toString();
                }
            }
        }
        return null;
    }

    /** Pixels of {@code image} within a summed channel distance of 40 from colour {@code rgb}. */
    public static int pixelsNear(BufferedImage image, int rgb) {
        int count = 0;
        for (int y = 0; y < image.getHeight(); y++) {
            for (int x = 0; x < image.getWidth(); x++) {
                int p = image.getRGB(x, y);
                int d = Math.abs(((p >> 16) & 0xFF) - ((rgb >> 16) & 0xFF)) + Math.abs(((p >> 8) & 0xFF)
                        - ((rgb >> 8) & 0xFF)) + Math.abs((p & 0xFF) - (rgb & 0xFF));
                count += d < 40 ? 1 : 0;
            }
        }
        return count;
    }
}
