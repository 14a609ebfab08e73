package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.TestDefinitions;
import java.util.List;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

class PagesTest {

    private static final String HOSTILE_ARM = "<script>alert('x')</script>\"&";
    private static final String HOSTILE_ID = "exp\"><img src=x onerror=alert(1)>";

    private static List<DecisionRecord> chain(String id, String... arms) {
        return DecisionChains.run(TestDefinitions.bernoulli(id, arms), 8, d -> {
            ArmStats[] add = new ArmStats[arms.length];
            for (int i = 0; i < arms.length; i++) {
                add[i] = new BernoulliStats(40, 2 + 3L * i);
            }
            return add;
        });
    }

    private static Pages pages(List<List<DecisionRecord>> chains) {
        DecisionHistory history = new DecisionHistory();
        chains.forEach(c -> c.forEach(history::add));
        history.caughtUp();
        return new Pages(history, "runoff.decisions");
    }

    @Test
    void hostileArmNamesAndIdsAreEscapedInHtmlAndSvg() {
        List<DecisionRecord> chain = chain(HOSTILE_ID, "plain", HOSTILE_ARM);
        Pages pages = pages(List.of(chain));
        for (String html : List.of(pages.overview(null).html(), pages.experiment(HOSTILE_ID, null).html())) {
            assertFalse(html.contains("<script"), "a raw script tag reached the page");
            assertFalse(html.contains("<img"), "a raw img tag reached the page");
            assertFalse(html.contains("alert('x')"), "an unescaped quote reached the page");
            assertTrue(html.contains("&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;&quot;&amp;"), "escaped arm name");
        }
        String page = pages.experiment(HOSTILE_ID, null).html();
        String svgs = String.join("", matches(page, "<svg.*?</svg>"));
        assertTrue(svgs.contains("&lt;script&gt;"), "arm name escaped inside the SVG legend");
        assertTrue(pages.overview(null).html().contains("/experiments/exp%22%3E%3Cimg%20src%3Dx%20onerror%3Dalert%281%29%3E"),
                "the link percent-encodes the id");
    }

    @Test
    void experimentPageShowsTheLatestRecordsNumbersAndThreeSizedCharts() {
        List<DecisionRecord> chain = chain("fares", "grid", "list", "calendar");
        DecisionRecord last = chain.get(chain.size() - 1);
        String html = pages(List.of(chain)).experiment("fares", null).html();
        List<String> svgs = matches(html, "<svg [^>]*width=\"760\" height=\"300\"");
        assertEquals(4, svgs.size(), "weights, P(best), evidence against trials, statistic against threshold");
        for (ArmState arm : last.getArms()) {
            String row = matches(html, "<tr><th scope=\"row\">" + arm.getArm() + "( \\(leader\\))?</th>.*?</tr>").get(0);
            assertTrue(row.contains(String.format(java.util.Locale.ROOT, "%,d", arm.getTrials())), row);
            assertTrue(row.contains(String.format(java.util.Locale.ROOT, "%.4f", arm.getAlpha())), row);
            assertTrue(row.contains(String.format(java.util.Locale.ROOT, "%.3f", arm.getWeight())), row);
        }
        assertTrue(html.contains(String.format(java.util.Locale.ROOT, "Statistic <strong>%.2f</strong>",
                last.getStatistic())), "the stopping statistic");
        assertTrue(html.contains("Predicted remaining traffic"));
        assertTrue(html.contains("<th scope=\"col\">P(best)</th>"), "a real table header");
    }

    @Test
    void overviewNamesEachArmAGuardrailSuspendedAndTheGuardrail() {
        List<DecisionRecord> quiet = chain("quiet", "a", "b");
        List<DecisionRecord> held = chain("held", "grid", HOSTILE_ARM, "calendar");
        DecisionRecord last = held.get(held.size() - 1);
        last.getArms().get(1).setSuspendedBy("failed-payments");
        String html = pages(List.of(quiet, held)).overview(null).html();
        String heldRow = matches(html, "<tr><th scope=\"row\"><a href=\"/experiments/held\">.*?</tr>").get(0);
        assertTrue(heldRow.contains("<td>&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;&quot;&amp; (failed-payments)</td>"),
                heldRow);
        String quietRow = matches(html, "<tr><th scope=\"row\"><a href=\"/experiments/quiet\">.*?</tr>").get(0);
        assertTrue(quietRow.contains("<td>none</td>"), quietRow);
        assertTrue(html.contains("<th scope=\"col\">Suspended by a guardrail</th>"));
        String page = pages(List.of(quiet, held)).experiment("held", null).html();
        assertTrue(page.contains("&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt;&quot;&amp; (suspended by"
                + " failed-payments)</th>"), page);
    }

    @Test
    void overviewFiltersByStatusAndSortsByTraffic() {
        List<DecisionRecord> small = chain("alpha", "a", "b");
        List<DecisionRecord> big = DecisionChains.run(TestDefinitions.bernoulli("beta", "a", "b"), 3,
                d -> new ArmStats[] {new BernoulliStats(500, 5), new BernoulliStats(500, 100)});
        assertEquals("STOP", big.get(big.size() - 1).getDecision().name(), "the lopsided chain stops");
        Pages pages = pages(List.of(small, big));
        String byTraffic = pages.overview("sort=traffic").html();
        assertTrue(byTraffic.indexOf(">beta</a>") < byTraffic.indexOf(">alpha</a>"), "most traffic first");
        String running = pages.overview("status=running").html();
        assertTrue(running.contains(">alpha</a>"));
        assertFalse(running.contains(">beta</a>"), "a stopped experiment is filtered out");
        String stopped = pages.overview("status=stopped").html();
        assertTrue(stopped.contains(">beta</a>") && stopped.contains("STOPPED (winner b)"), stopped);
        assertFalse(stopped.contains(">alpha</a>"));
    }

    @Test
    void badQueriesGetA400NamingTheParameter() {
        Pages pages = pages(List.of(chain("alpha", "a", "b")));
        Pages.Page status = pages.overview("status=paused");
        assertEquals(400, status.status());
        assertTrue(status.html().contains("status must be all, running or stopped; got &#39;paused&#39;"));
        assertEquals(400, pages.overview("colour=<b>").status());
        assertTrue(pages.overview("colour=<b>").html().contains("unknown query parameter &#39;colour&#39;"));
        assertEquals(400, pages.experiment("alpha", "refresh=1").status());
        assertEquals(400, pages.overview("sort=a&sort=b").status());
        assertTrue(pages.overview("refresh=5").html().contains("<meta http-equiv=\"refresh\" content=\"5\">"));
    }

    @Test
    void theListSaysItMayBeIncompleteUntilTheTopicWasReadToItsEnd() {
        DecisionHistory history = new DecisionHistory();
        chain("alpha", "a", "b").forEach(history::add);
        Pages pages = new Pages(history, "runoff.decisions");
        assertTrue(pages.overview(null).html().contains("still reading the topic, so the list may be incomplete"));
        history.caughtUp();
        assertFalse(pages.overview(null).html().contains("may be incomplete"));
    }

    @Test
    void unknownExperimentIs404() {
        Pages.Page page = pages(List.of()).experiment("nobody<>", null);
        assertEquals(404, page.status());
        assertTrue(page.html().contains("nobody&lt;&gt;"));
    }

    @Test
    void historyKeepsABoundedSeriesOverTheWholeRun() {
        ExperimentHistory history = new ExperimentHistory();
        List<DecisionRecord> chain = chain("long", "a", "b");
        DecisionRecord template = chain.get(0);
        int total = 1_000;
        for (int s = 1; s <= total; s++) {
            history.add(DecisionRecord.newBuilder(template).setSequence(s).setStreamTime(s * 1_000L).build());
        }
        List<DecisionPoint> points = history.points();
        assertTrue(points.size() <= ExperimentHistory.MAX_POINTS, "bounded: " + points.size());
        assertTrue(points.size() >= ExperimentHistory.MAX_POINTS / 2, "not thinned too far: " + points.size());
        assertEquals(1, points.get(0).sequence(), "the first point stays");
        assertEquals(total, points.get(points.size() - 1).sequence(), "the newest point is last");
        assertFalse(history.add(DecisionRecord.newBuilder(template).setSequence(5).build()), "an old record is ignored");
        assertEquals(total, history.latest().getSequence());
    }

    private static List<String> matches(String text, String regex) {
        Matcher m = Pattern.compile(regex, Pattern.DOTALL).matcher(text);
        List<String> out = new java.util.ArrayList<>();
        while (m.find()) {
            out.add(m.group());
        }
        return out;
    }
}
