package dev.onefold.benchmarks.report;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.io.ByteArrayInputStream;
import java.nio.charset.StandardCharsets;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import javax.xml.parsers.DocumentBuilderFactory;
import org.junit.jupiter.api.Test;
import org.w3c.dom.Document;

/** The report turns JMH's JSON into tables, ratios and well-formed SVG, and says which questions were not run. */
class ResultsReportTest {

    /** A JMH JSON result in the layout JMH 1.37 writes with {@code -rf json} (fields we do not read left out). */
    static String jmhResult(String method, Map<String, String> params, String score, String error, String secondary) {
        StringBuilder p = new StringBuilder();
        params.forEach((k, v) -> p.append(p.length() == 0 ? "" : ",").append('"').append(k).append("\":\"").append(v).append('"'));
        return "{\"jmhVersion\":\"1.37\",\"benchmark\":\"dev.onefold.benchmarks.batch." + method + "\",\"mode\":\"ss\","
                + "\"threads\":1,\"forks\":1,\"jdkVersion\":\"17.0.15\",\"vmName\":\"OpenJDK 64-Bit Server VM\","
                + "\"vmVersion\":\"17.0.15+6\",\"warmupIterations\":1,\"measurementIterations\":2,"
                + "\"params\":{" + p + "},\"primaryMetric\":{\"score\":" + score + ",\"scoreError\":" + error
                + ",\"scoreUnit\":\"ms/op\"},\"secondaryMetrics\":{" + secondary + "}}";
    }

    static List<Measurement> q1(String policy, String onefoldMs, String handMs) {
        Map<String, String> params = Map.of("policy", policy, "records", "1000000");
        String json = "[" + jmhResult("BatchDedupeBenchmark.onefold", params, onefoldMs, "20.0", "") + ","
                + jmhResult("BatchDedupeBenchmark.handWritten", params, handMs, "\"NaN\"", "") + ","
                + jmhResult("BatchDedupeBenchmark.duckdbQuery", params, "500", "50", "") + "]";
        return Measurement.readJmhJson(json, "test.json");
    }

    @Test
    void readJmhJson_readsScoresParamsAndNaNErrors() {
        List<Measurement> ms = q1("last-writer", "200", "1000");
        assertEquals(3, ms.size());
        Measurement one = ms.get(0);
        assertEquals("BatchDedupeBenchmark", one.benchmarkClass());
        assertEquals("onefold", one.method());
        assertEquals("1000000", one.param("records"));
        assertEquals(5.0, one.millionRecordsPerSecond(1_000_000), 1e-9, "1M records in 200 ms");
        assertEquals(0.5, one.millionRecordsPerSecondError(1_000_000), 1e-9, "10% of the time is 10% of the rate");
        assertTrue(Double.isNaN(ms.get(1).error()));
    }

    @Test
    void markdown_showsPeersSideBySideWithRatiosAndPending() {
        List<Measurement> ms = new ArrayList<>(q1("last-writer", "200", "1000"));
        Map<String, String> spill = Map.of("records", "1000000", "budgetMiB", "48");
        ms.addAll(Measurement.readJmhJson("[" + jmhResult("SpillBenchmark.inMemory", spill, "1000", "1", "\"peak.heap\":{\"score\":900.0},\"spilledRuns\":{\"score\":0}")
                + "," + jmhResult("SpillBenchmark.spilled", spill, "2000", "1", "\"peak.heap\":{\"score\":200.0},\"spilledRuns\":{\"score\":44}")
                + "]", "spill.json"));
        String md = new ResultsReport(ms, "test machine, 2 cores", "preliminary", "").markdown();
        assertTrue(md.contains("| 1,000,000 | 5.00 ± 0.50 | 1.00 ± n/a | 2.00 ± 0.20 | not run | 5.00x | 2.00x |"), md);
        assertTrue(md.contains("**Note:** preliminary"), md);
        assertTrue(md.contains("test machine, 2 cores"), md);
        assertTrue(md.contains("| spilled | 1,000,000 | 48 MiB | 0.50 ± 0.000 | 200 | 22 | 0.50x |"), md);
        assertEquals(5, md.split("Not run in this pass", -1).length - 1, "questions 2 to 5 and 7 were not run");
        assertFalse(md.contains("## Question 6: spill at 10x the memory budget\n\nNot run"), "question 6 was run");
    }

    static String result(String benchmark, Map<String, String> params, String score, String error, String unit) {
        return jmhResult(benchmark, params, score, error, "").replace("\"ms/op\"", "\"" + unit + "\"");
    }

    @Test
    void markdown_questionsTwoToSevenShowPeersRatiosAndPrintedFigures() throws Exception {
        StringBuilder json = new StringBuilder("[");
        for (String[] r : new String[][] {{"500000", "100", "2000"}, {"2000000", "120", "8000"}}) {
            Map<String, String> p = Map.of("archiveRecords", r[0], "stablePartitions", "true");
            json.append(result("IncrementalApplyBenchmark.onefoldApply", p, r[1], "10", "ms/op")).append(',')
                    .append(result("IncrementalApplyBenchmark.handWrittenFullRecompute", p, r[2], "100", "ms/op")).append(',');
        }
        json.append(result("AvroRewriteBenchmark.archiveRewrite", Map.of(), "300", "3", "ns/op")).append(',')
                .append(result("AvroRewriteBenchmark.rawAvroDecodeEncode", Map.of(), "200", "2", "ns/op")).append(',')
                .append(result("StreamGateBenchmark.offer", Map.of("windowKeys", "1000000"), "2500000", "50000", "ops/s"))
                .append(',')
                .append(result("ReconcileArchivesBenchmark.compareAgreeing", Map.of("records", "500000", "hours", "720"),
                        "12", "1", "ms/op")).append(',')
                .append(result("CommandLineDedupeBenchmark.dedupe", Map.of("lines", "1000000", "jar", "x.jar"),
                        "4000", "\"NaN\"", "ms/op")).append(']');
        List<Measurement> ms = Measurement.readJmhJson(json.toString(), "all.json");
        String printed = "retained-bytes-per-key windowKeys=1000000: 57.3 (used heap 1 -> 2 bytes)\n"
                + "setup: built two archives of 500,000 records each (+10 differences) in 9.0 s, 111,111 records/s\n";
        ResultsReport report = new ResultsReport(ms, "m", "", printed);
        String md = report.markdown();
        assertTrue(md.contains("| 500,000 | 100.0 ± 10.0 | 2000.0 ± 100.0 | 20.00x | 1.00x |"), md);
        assertTrue(md.contains("| 2,000,000 | 120.0 ± 10.0 | 8000.0 ± 100.0 | 66.67x | 1.20x |"), md);
        assertTrue(md.contains("| 300.0 ± 3.00 | 3.33 | 1.50x |"), md);
        assertTrue(md.contains("| 1,000,000 | 2.50 ± 0.050 | 57.3 |"), md);
        assertTrue(md.contains("| 500,000 | 12.0 ± 1.00 | not run |"), md);
        assertTrue(md.contains("Set-up (not timed): built two archives of 500,000 records each"), md);
        assertTrue(md.contains("| 1,000,000 | 4.00 ± n/a | 250.0 ± n/a |"), md);
        assertTrue(md.contains("| 5. reconcile two 500k archives | agree: 12.0 ± 1.00 ms; locate 10: not run |"), md);
        assertTrue(md.contains("| 4. streaming gate, 1M keys | 2.50 ± 0.050 M decisions/s, 57.3 bytes/key |"), md);
        String svg = report.plots().get(ResultsReport.APPLY_PLOT);
        Document doc = DocumentBuilderFactory.newInstance().newDocumentBuilder()
                .parse(new ByteArrayInputStream(svg.getBytes(StandardCharsets.UTF_8)));
        assertEquals(2, doc.getElementsByTagName("polyline").getLength(), "onefold and the full recompute");
    }

    @Test
    void plots_areWellFormedSvgWithOneLinePerPeer() throws Exception {
        List<Measurement> ms = new ArrayList<>(q1("vector-clock", "400", "1000"));
        Map<String, String> plots = new ResultsReport(ms, "m", "", "").plots();
        assertEquals(List.of("q1-vector-clock.svg"), List.copyOf(plots.keySet()));
        Document svg = DocumentBuilderFactory.newInstance().newDocumentBuilder()
                .parse(new ByteArrayInputStream(plots.get("q1-vector-clock.svg").getBytes(StandardCharsets.UTF_8)));
        assertEquals("svg", svg.getDocumentElement().getTagName());
        assertEquals(3, svg.getElementsByTagName("polyline").getLength());
    }

    @Test
    void niceCeiling_roundsUpToOneTwoOrFive() {
        assertEquals(5.0, SvgChart.niceCeiling(3.2));
        assertEquals(10.0, SvgChart.niceCeiling(7));
        assertEquals(0.2, SvgChart.niceCeiling(0.15), 1e-12);
        assertEquals("100k", SvgChart.sizeLabel(100_000));
        assertEquals("5M", SvgChart.sizeLabel(5_000_000));
    }
}
