package dev.onefold.benchmarks.report;

import dev.onefold.internal.json.Json;
import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * One JMH result read back from JMH's JSON output ({@code -rf json}): which benchmark method, its parameters,
 * the primary score with its error and unit, secondary metrics (for example {@code peak.heap}) and the JVM it ran
 * on. Immutable.
 *
 * @param benchmarkClass simple name of the benchmark class, for example {@code BatchDedupeBenchmark}
 * @param method benchmark method, for example {@code onefold}
 * @param error half-width of JMH's 99.9% confidence interval, NaN when there were too few samples
 * @param secondary secondary metric label to its score (same unit as JMH printed it)
 */
public record Measurement(String benchmarkClass, String method, Map<String, String> params, double score, double error,
        String unit, int iterations, Map<String, Double> secondary, String jvm) {

    public String param(String name) {
        String v = params.get(name);
        if (v == null) {
            throw new IllegalArgumentException(benchmarkClass + "." + method + " has no parameter '" + name + "'");
        }
        return v;
    }

    /**
     * Reads every result of one JMH JSON file.
     *
     * @throws IllegalArgumentException naming the file when it is not JMH's JSON layout
     */
    public static List<Measurement> readJmhJson(String json, String file) {
        Object root = Json.parse(json, file);
        if (!(root instanceof List<?> list)) {
            throw new IllegalArgumentException(file + ": expected a JSON array of JMH results");
        }
        List<Measurement> out = new ArrayList<>();
        for (Object o : list) {
            Map<?, ?> m = (Map<?, ?>) o;
            String benchmark = (String) require(m, "benchmark", file);
            int dot = benchmark.lastIndexOf('.');
            String cls = benchmark.substring(0, dot);
            cls = cls.substring(cls.lastIndexOf('.') + 1);
            Map<String, String> params = new LinkedHashMap<>();
            if (m.get("params") instanceof Map<?, ?> p) {
                p.forEach((k, v) -> params.put((String) k, String.valueOf(v)));
            }
            Map<?, ?> primary = (Map<?, ?>) require(m, "primaryMetric", file);
            Map<String, Double> secondary = new LinkedHashMap<>();
            if (m.get("secondaryMetrics") instanceof Map<?, ?> s) {
                s.forEach((k, v) -> secondary.put((String) k, number(((Map<?, ?>) v).get("score"))));
            }
            String jvm = m.get("vmName") + " " + m.get("vmVersion") + " (JDK " + m.get("jdkVersion") + ")";
            out.add(new Measurement(cls, benchmark.substring(dot + 1), Map.copyOf(params),
                    number(primary.get("score")), number(primary.get("scoreError")), (String) primary.get("scoreUnit"),
                    (int) number(m.get("measurementIterations")), Map.copyOf(secondary), jvm));
        }
        return out;
    }

    private static Object require(Map<?, ?> m, String key, String file) {
        Object v = m.get(key);
        if (v == null) {
            throw new IllegalArgumentException(file + ": a result has no \"" + key + "\"");
        }
        return v;
    }

    /** JMH writes numbers, or the string "NaN" where an error cannot be computed. */
    private static double number(Object v) {
        if (v instanceof Long l) {
            return l;
        }
        if (v instanceof BigDecimal d) {
            return d.doubleValue();
        }
        if ("NaN".equals(v)) {
            return Double.NaN;
        }
        throw new IllegalArgumentException("not a JMH number: " + v);
    }

    /** Milliseconds per call turned into millions of records per second for a batch of {@code records}. */
    public double millionRecordsPerSecond(long records) {
        requireMillis();
        return records / (score * 1_000.0);
    }

    /** The error of {@link #millionRecordsPerSecond}, propagated to first order from the time's error. */
    public double millionRecordsPerSecondError(long records) {
        return millionRecordsPerSecond(records) * error / score;
    }

    private void requireMillis() {
        if (!"ms/op".equals(unit)) {
            throw new IllegalStateException(benchmarkClass + "." + method + " reports " + unit + ", expected ms/op");
        }
    }
}
