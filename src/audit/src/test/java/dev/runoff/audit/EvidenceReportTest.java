package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.decision.Evidence;
import dev.runoff.records.avro.DecisionRecord;
import dev.runoff.records.avro.EstimationMethod;
import java.util.List;
import java.util.regex.Pattern;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;

class EvidenceReportTest {

    private static final List<String> ARMS = List.of("control", "green & bold", "blue");
    private static List<DecisionRecord> chain;
    private static Timeline timeline;
    private static EvidenceView evidence;

    @BeforeAll
    static void runJob() {
        // long minimum duration: 60 decisions without a STOP, so the trailing windows fill
        chain = SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 60 * SimulatedJob.PERIOD_MS),
                new double[] {0.04, 0.05, 0.09}, 60, 600, 11);
        timeline = Timeline.of("checkout", chain);
        evidence = EvidenceView.of(chain);
    }

    @Test
    void monteCarloRecordsAreReadThroughTheExactRecomputation() {
        DecisionRecord last = chain.get(chain.size() - 1);
        assertEquals(EstimationMethod.MONTE_CARLO, last.getMethod());
        double[] exact = CrossCheck.exact(last.getArms()).alpha();
        Evidence.Row row = evidence.last();
        assertEquals("blue", row.leader());
        for (int i = 0; i < 2; i++) {
            Evidence.Point p = row.points().get(ARMS.get(i));
            assertEquals(Evidence.Source.RECOMPUTED, p.source());
            assertEquals(-Math.log(exact[i]), p.evidence(), 1e-12);
            assertTrue(p.ratePerThousand() > 0, "evidence grows: " + p);
        }
    }

    @Test
    void textEndsWithTheBalanceLineAndItsTolerance() {
        String text = TimelineWriter.text(timeline, evidence);
        String[] lines = text.split("\n");
        String verdict = lines[lines.length - 1];
        assertTrue(verdict.startsWith("Rates balanced: ") || verdict.startsWith("Rates not balanced: "), verdict);
        assertTrue(verdict.contains("2.00 (tolerance)"), verdict);
        assertTrue(verdict.contains(evidence.balance().slowest()), verdict);
        assertTrue(text.contains("over the decisions in the last 50% of the trials"), text);
        assertTrue(lines[lines.length - 2].startsWith("Predicted rates per 1,000 trials at the estimated rates ("),
                lines[lines.length - 2]);
    }

    @Test
    void csvHasThreeEvidenceColumnsPerArmAndLeavesTheLeaderEmpty() {
        String[] lines = TimelineWriter.csv(timeline, evidence).split("\r\n");
        List<String> header = List.of(lines[0].split(","));
        int evidenceBlue = header.indexOf("evidence_blue");
        int sourceControl = header.indexOf("evidenceSource_control");
        int rateControl = header.indexOf("evidenceRate_control");
        assertTrue(evidenceBlue > header.indexOf("weight_blue") && rateControl < header.indexOf("decision"), lines[0]);
        String[] last = lines[lines.length - 1].split(",", -1);
        assertEquals("", last[evidenceBlue], "the leader has no evidence against it");
        assertEquals("recomputed", last[sourceControl]);
        assertEquals(evidence.last().points().get("control").ratePerThousand(), Double.parseDouble(last[rateControl]),
                0.0);
    }

    @Test
    void jsonCarriesEveryDecisionsEvidenceAndTheSummary() throws Exception {
        String text = TimelineWriter.json(timeline, evidence);
        assertFalse(text.contains("NaN") || text.contains("Infinity"), "JSON has no non-finite numbers");
        JsonNode json = new ObjectMapper().readTree(text);
        JsonNode lastEvidence = json.get("decisions").get(chain.size() - 1).get("evidence");
        assertEquals("blue", lastEvidence.get("leader").asText());
        JsonNode control = lastEvidence.get("losingArms").get("control");
        assertEquals(evidence.last().points().get("control").evidence(), control.get("minusLnPBest").asDouble(), 0.0);
        assertFalse(control.get("lowerBound").asBoolean());
        JsonNode summary = json.get("evidenceSummary");
        assertEquals(evidence.balance().verdict().name(), summary.get("verdict").asText());
        assertEquals(0.5, summary.get("windowShareOfTrials").asDouble(), 0.0);
        assertEquals(evidence.reference().betaOptimal(),
                summary.get("predicted").get("betaOptimalRatePer1000Trials").asDouble(), 0.0);
        assertEquals(0.5, summary.get("predicted").get("beta").asDouble(), 0.0);
    }

    @Test
    void chartDrawsEachLosingArmOnALogAxisWithBothReferenceSlopes() throws Exception {
        String svgText = EvidenceChart.of(timeline, evidence);
        Document svg = ReportTest.parse(svgText);
        NodeList groups = svg.getElementsByTagNameNS("*", "g");
        int series = 0;
        int references = 0;
        for (int i = 0; i < groups.getLength(); i++) {
            Element g = (Element) groups.item(i);
            if (g.getAttribute("class").equals("series")) {
                series++;
                assertTrue(ARMS.contains(g.getAttribute("data-arm")), g.getAttribute("data-arm"));
            }
            if (g.getAttribute("class").equals("reference")) {
                references++;
                double rate = Double.parseDouble(g.getAttribute("data-per-1000-trials"));
                double expected = g.getAttribute("data-rate").equals("uniform") ? evidence.reference().uniform()
                        : evidence.reference().betaOptimal();
                assertEquals(expected, rate, 1e-5 * expected);
            }
        }
        assertTrue(series >= 2, "a series per arm that lost at some decision: " + series);
        assertEquals(2, references);
        assertTrue(Pattern.compile(">1e-[0-9]+<").matcher(svgText).find(),
                "log-probability tick labels");
        assertTrue(svgText.contains("P(best) of the arm (log scale)"));
        assertTrue(svgText.contains(SvgCanvas.escape(Evidence.balanceLine(evidence.balance(), evidence.last()))),
                "the balance line as subtitle");
    }
}
