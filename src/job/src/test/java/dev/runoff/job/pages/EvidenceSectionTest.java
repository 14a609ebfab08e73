package dev.runoff.job.pages;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.runoff.decision.Evidence;
import dev.runoff.engine.stats.ArmStats;
import dev.runoff.engine.stats.BernoulliStats;
import dev.runoff.records.avro.ArmState;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.testkit.TestDefinitions;
import java.util.ArrayList;
import java.util.List;
import java.util.Locale;
import java.util.Random;
import java.util.regex.Matcher;
import java.util.regex.Pattern;
import org.junit.jupiter.api.Test;

class EvidenceSectionTest {

    private static final String HOSTILE_ARM = "<i>tall</i> & \"wide\"";
    private static final String HOSTILE_ESCAPED = "&lt;i&gt;tall&lt;/i&gt; &amp; &quot;wide&quot;";

    private static String page(List<DecisionRecord> records) {
        ExperimentHistory history = new ExperimentHistory();
        records.forEach(history::add);
        return ExperimentPage.render(history, 0);
    }

    /** The evidence section of a rendered page, from its heading to the next section's heading. */
    private static String section(String html) {
        int from = html.indexOf("<h2>Evidence against the losing arms</h2>");
        assertTrue(from >= 0, "the page has the evidence section");
        return html.substring(from, html.indexOf("<h2>", from + 4));
    }

    /** The cells (evidence, source, growth) of {@code escapedArm}'s row in the section's table. */
    private static String[] cells(String section, String escapedArm) {
        Matcher m = Pattern.compile("<tr><th scope=\"row\">" + Pattern.quote(escapedArm) + "</th><td class=\"n\">(.*?)"
                + "</td><td>(.*?)</td><td class=\"n\">(.*?)</td></tr>").matcher(section);
        assertTrue(m.find(), "a row for " + escapedArm + " in " + section);
        return new String[] {m.group(1), m.group(2), m.group(3)};
    }

    private static Evidence.Snapshot snapshot(DecisionRecord r) {
        List<ArmState> arms = r.getArms();
        return new Evidence.Snapshot(arms.stream().map(ArmState::getArm).toList(),
                arms.stream().mapToLong(ArmState::getTrials).toArray(),
                arms.stream().mapToDouble(ArmState::getAlpha).toArray(),
                arms.stream().mapToDouble(ArmState::getAlphaStandardError).toArray(), r.getDraws(), null);
    }

    @Test
    void tableShowsMinusLnOfTheRecordsPBestItsGrowthAndTheBalanceLineWithArmNamesEscaped() {
        String[] arms = {"grid", HOSTILE_ARM, "list"};
        List<DecisionRecord> chain = DecisionChains.run(TestDefinitions.bernoulli("shelves", arms), 30,
                d -> new ArmStats[] {new BernoulliStats(60, 9), new BernoulliStats(60, 8), new BernoulliStats(60, 6)});
        DecisionRecord last = chain.get(chain.size() - 1);
        assertEquals(30, chain.size(), "the chain ran without stopping");
        String section = section(page(chain));
        List<Evidence.Row> rows = Evidence.of(chain.stream().map(EvidenceSectionTest::snapshot).toList());
        Evidence.Row row = rows.get(rows.size() - 1);
        assertEquals(2, row.points().size(), "two losing arms");
        for (ArmState arm : last.getArms()) {
            if (arm.getArm().equals(row.leader())) {
                assertFalse(section.contains("<tr><th scope=\"row\">" + arm.getArm() + "</th>"), "no row for the leader");
                continue;
            }
            String[] cells = cells(section, Html.escape(arm.getArm()));
            // evidence against an arm is -ln P(arm is best) (Russo 2020); a zero P(best) is shown as a bound
            String expected = arm.getAlpha() > 0 ? String.format(Locale.ROOT, "%.3g", -Math.log(arm.getAlpha()))
                    : "&ge; " + Evidence.number(row.points().get(arm.getArm()).evidence());
            assertEquals(expected, cells[0], "evidence against " + arm.getArm());
            double rate = row.points().get(arm.getArm()).ratePerThousand();
            assertFalse(Double.isNaN(rate), "30 decisions leave enough points in the window for a slope");
            assertEquals(Evidence.number(rate), cells[2], "growth per 1,000 trials of " + arm.getArm());
        }
        assertTrue(section.contains(Html.escape(Evidence.balanceLine(Evidence.balance(row), row))), section);
        assertTrue(section.contains("Evidence against each losing arm, -ln P(best); leader now: "
                + Html.escape(row.leader()) + "</title>"), "the chart's title names the leader");
        assertFalse(section.contains("(leader now)"), "legend entries carry the arm's name only");
        assertTrue(section.contains("(tolerance)"), "the verdict states its tolerance");
        assertTrue(section.contains(HOSTILE_ESCAPED), "the hostile arm name escaped");
        assertFalse(section.contains("<i>"), "the hostile arm name became markup");
        assertEquals(1, Pattern.compile("<svg [^>]*width=\"760\" height=\"300\"").matcher(section).results().count(),
                "one chart of evidence against trials");
    }

    @Test
    void aZeroPBestIsShownAsABoundNotAsInfiniteEvidence() {
        List<DecisionRecord> chain = DecisionChains.run(TestDefinitions.bernoulli("drawers", "deep", "shallow"), 3,
                d -> new ArmStats[] {new BernoulliStats(400, 200), new BernoulliStats(400, 20)});
        DecisionRecord last = chain.get(chain.size() - 1);
        ArmState loser = last.getArms().get(1);
        DecisionRecord zero = DecisionRecord.newBuilder(last).setSequence(last.getSequence() + 1).setArms(List.of(
                last.getArms().get(0), ArmState.newBuilder(loser).setAlpha(0.0).setAlphaStandardError(0.0).build()))
                .build();
        List<DecisionRecord> records = new ArrayList<>(chain);
        records.add(zero);
        String[] cells = cells(section(page(records)), "shallow");
        assertTrue(cells[0].startsWith("&ge; "), "a bound: " + cells[0]);
        assertFalse(cells[0].contains("Infinity") || cells[0].contains("\u221e"), cells[0]);
        assertEquals("a zero probability: lower bound", cells[1]);
    }

    @Test
    void growthOnTheThinnedHistoryMatchesTheWholeRunAndTheTrueSlope() {
        DecisionRecord template = DecisionChains.run(TestDefinitions.bernoulli("racks", "oak", "pine", "elm"), 1,
                d -> new ArmStats[] {new BernoulliStats(100, 12), new BernoulliStats(100, 10),
                    new BernoulliStats(100, 8)}).get(0);
        Random noise = new Random(19);
        double[] slopes = {0.2, 0.5};
        List<DecisionRecord> records = new ArrayList<>();
        for (int s = 1; s <= 400; s++) {
            long perArm = 100L * s;
            double pine = Math.exp(-(2 + slopes[0] * 3 * perArm / 1000.0 + 0.3 * noise.nextGaussian()));
            double elm = Math.exp(-(2 + slopes[1] * 3 * perArm / 1000.0 + 0.3 * noise.nextGaussian()));
            double[] alpha = {1 - pine - elm, pine, elm};
            List<ArmState> arms = new ArrayList<>();
            for (int i = 0; i < 3; i++) {
                arms.add(ArmState.newBuilder(template.getArms().get(i)).setTrials(perArm).setAlpha(alpha[i])
                        .setAlphaStandardError(0.001).build());
            }
            records.add(DecisionRecord.newBuilder(template).setSequence(s).setArms(arms).build());
        }
        ExperimentHistory history = new ExperimentHistory();
        records.forEach(history::add);
        assertTrue(history.points().size() < records.size() / 2, "the history was thinned");
        String section = section(ExperimentPage.render(history, 0));
        List<Evidence.Row> whole = Evidence.of(records.stream().map(EvidenceSectionTest::snapshot).toList());
        Evidence.Row last = whole.get(whole.size() - 1);
        String[] names = {"pine", "elm"};
        for (int i = 0; i < names.length; i++) {
            double shown = Double.parseDouble(cells(section, names[i])[2]);
            double all = last.points().get(names[i]).ratePerThousand();
            assertEquals(all, shown, 0.05 * all, names[i] + ": thinned against every record");
            assertEquals(slopes[i], shown, 0.1 * slopes[i], names[i] + ": against the slope the data were drawn with");
        }
    }
}
