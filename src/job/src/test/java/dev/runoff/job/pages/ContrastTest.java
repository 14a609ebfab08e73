package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import org.junit.jupiter.api.Test;

/**
 * The pages' colours against their white background, by the contrast ratio of WCAG 2.1 ("contrast ratio" and
 * "relative luminance" in its definitions): text at least 4.5:1 (success criterion 1.4.3), chart lines at
 * least 3:1 (1.4.11, graphical objects).
 */
class ContrastTest {

    @Test
    void theRatioOfBlackOnWhiteIs21AndOfWhiteOnWhite1() {
        // the two ends of the scale, from the WCAG 2.1 definition of contrast ratio
        assertEquals(21.0, contrast("#000000", "#ffffff"), 1e-9);
        assertEquals(1.0, contrast("#ffffff", "#ffffff"), 1e-9);
    }

    @Test
    void textAndLinksReachFourAndAHalfToOne() {
        for (String colour : List.of(Html.TEXT, Html.LINK, Html.NOTE)) {
            assertTrue(contrast(colour, Html.BACKGROUND) >= 4.5, colour + ": " + contrast(colour, Html.BACKGROUND));
        }
    }

    @Test
    void everyChartLineReachesThreeToOne() {
        for (String colour : LineChart.COLOURS) {
            assertTrue(contrast(colour, Html.BACKGROUND) >= 3.0, colour + ": " + contrast(colour, Html.BACKGROUND));
        }
    }

    private static double contrast(String a, String b) {
        double la = luminance(a);
        double lb = luminance(b);
        return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05);
    }

    /** Relative luminance of an sRGB colour {@code #rrggbb} (WCAG 2.1, definitions). */
    private static double luminance(String hex) {
        double[] c = new double[3];
        for (int i = 0; i < 3; i++) {
            double v = Integer.parseInt(hex.substring(1 + 2 * i, 3 + 2 * i), 16) / 255.0;
            c[i] = v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4);
        }
        return 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];
    }
}
