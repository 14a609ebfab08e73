package dev.runoff.audit;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.runoff.records.avro.DecisionRecord;
import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import javax.xml.parsers.DocumentBuilderFactory;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;

class ReportTest {

    private static final List<String> ARMS = List.of("control", "green & bold", "blue");
    private static List<DecisionRecord> chain;
    private static Timeline timeline;
    private static EvidenceView evidence;

    @BeforeAll
    static void runJob() {
        chain = SimulatedJob.run(SimulatedJob.definition("checkout", ARMS, 0), new double[] {0.04, 0.05, 0.09}, 40,
                600, 11);
        timeline = Timeline.of("checkout", chain);
        evidence = EvidenceView.of(chain);
    }

    @Test
    void svgIsWellFormedWithOneSeriesPerArmInEachPanel() throws Exception {
        Document svg = parse(SvgChart.of(timeline));
        assertEquals("svg", svg.getDocumentElement().getLocalName());
        assertEquals("http://www.w3.org/2000/svg", svg.getDocumentElement().getNamespaceURI());
        NodeList groups = svg.getElementsByTagNameNS("*", "g");
        for (String panel : List.of("weights", "p-best")) {
            Set<String> arms = new HashSet<>();
            int series = 0;
            for (int i = 0; i < groups.getLength(); i++) {
                Element g = (Element) groups.item(i);
                if (g.getAttribute("class").equals("series") && g.getAttribute("data-panel").equals(panel)) {
                    series++;
                    arms.add(g.getAttribute("data-arm"));
                    Element line = (Element) g.getElementsByTagNameNS("*", "polyline").item(0);
                    assertTrue(line.getAttribute("points").split(" ").length >= chain.size(), panel);
                }
            }
            assertEquals(ARMS.size(), series, panel);
            assertEquals(Set.copyOf(ARMS), arms, "arm names survive XML escaping");
        }
    }

    @Test
    void svgMarksTheStopAndLabelsAxesWithUnits() throws Exception {
        String text = SvgChart.of(timeline);
        Document svg = parse(text);
        NodeList groups = svg.getElementsByTagNameNS("*", "g");
        int stops = 0;
        for (int i = 0; i < groups.getLength(); i++) {
            stops += ((Element) groups.item(i)).getAttribute("class").equals("stop") ? 1 : 0;
        }
        assertEquals(2, stops, "one STOP line per panel");
        assertTrue(text.contains("STOP at decision " + chain.size() + ": winner blue"), "stop label");
        assertTrue(text.contains("Time since first decision (minutes)"), "x axis title with unit");
        assertTrue(text.contains("Weight (share of traffic)") && text.contains("P(best) (probability)"));
    }

    @Test
    void csvHasOneRowPerDecisionWithFullPrecision() {
        String[] lines = TimelineWriter.csv(timeline, evidence).split("\r\n");
        assertEquals(chain.size() + 1, lines.length);
        assertTrue(lines[0].startsWith("sequence,time_utc,stream_time_ms,definition_version,trials_control,"
                + "trials_green & bold,trials_blue"), lines[0]);
        DecisionRecord last = chain.get(chain.size() - 1);
        String[] cells = lines[lines.length - 1].split(",");
        assertEquals(Long.toString(last.getSequence()), cells[0]);
        assertEquals("2023-11-14T22:13:20Z", lines[1].split(",")[1]);
        assertEquals(last.getArms().get(2).getAlpha(), Double.parseDouble(cells[4 + 3 * 2 + 2]), 0.0,
                "P(best) of blue reads back exactly");
        assertTrue(lines[lines.length - 1].endsWith(",STOP,blue,threshold-reached"), lines[lines.length - 1]);
    }

    @Test
    void jsonAndTextCarryTheSameDecisions() throws Exception {
        JsonNode json = new ObjectMapper().readTree(TimelineWriter.json(timeline, evidence));
        assertEquals(chain.size(), json.get("decisions").size());
        JsonNode first = json.get("decisions").get(0);
        assertEquals(1, first.get("sequence").asInt());
        assertNotNull(first.get("arms").get("blue").get("pBest"));
        String text = TimelineWriter.text(timeline, evidence);
        String table = text.substring(0, text.indexOf("\n\nEvidence against"));
        assertEquals(chain.size() + 2, table.split("\n").length);
        assertTrue(table.contains("STOP blue (threshold-reached)"), text);
    }

    static Document parse(String xml) throws Exception {
        DocumentBuilderFactory factory = DocumentBuilderFactory.newInstance();
        factory.setNamespaceAware(true);
        return factory.newDocumentBuilder().parse(new ByteArrayInputStream(xml.getBytes(StandardCharsets.UTF_8)));
    }
}
