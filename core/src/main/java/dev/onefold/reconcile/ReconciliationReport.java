package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.json.Json;
import dev.onefold.internal.reconcile.RowJson;
import dev.onefold.record.Row;
import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.EnumMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * The outcome of {@link Reconciliation#compare}: a verdict per partition, totals, and for each partition that
 * does not agree the keys that differ with both sides' versions. {@link #status()} is {@code agree} exactly when
 * every partition agrees; {@link #toJson()} is the machine-readable form and {@link #summary()} the human one.
 *
 * <p>Immutable and thread-safe (rows are immutable). Rendering costs O(partitions + listed keys).
 *
 * @param left         the left source's name
 * @param right        the right source's name
 * @param checks       the aggregates both digests carry, in order
 * @param leftTotal    the left digest over all partitions
 * @param rightTotal   the right digest over all partitions
 * @param leftRejected records the left source could not read
 * @param rightRejected records the right source could not read
 * @param partitions   every partition present on either side, in partition order
 */
public record ReconciliationReport(String left, String right, List<DatasetSpec.Check> checks, Digest leftTotal,
        Digest rightTotal, long leftRejected, long rightRejected, List<PartitionResult> partitions) {

    public ReconciliationReport {
        checks = List.copyOf(checks);
        partitions = List.copyOf(partitions);
    }

    /** How one partition compares, checked in this order: presence, counts, content hash, aggregates. */
    public enum Verdict {
        AGREE, MISSING_LEFT, MISSING_RIGHT, COUNT_DIFFERS, CONTENT_DIFFERS, AGGREGATE_DIFFERS;

        /** The snake_case name used in JSON. */
        public String json() {
            return name().toLowerCase(Locale.ROOT);
        }

        String words() {
            return json().replace('_', ' ');
        }
    }

    /**
     * One partition's verdict.
     *
     * @param left      its digest on the left, null when the left does not have it
     * @param right     its digest on the right, null when the right does not have it
     * @param drillDown the differing keys, null when the partition agrees
     */
    public record PartitionResult(PartitionId partition, Verdict verdict, Digest left, Digest right, DrillDown drillDown) {}

    /**
     * The keys that differ in one partition, found by {@code method} ({@code sketch} or {@code full}).
     * Counts are exact; the lists hold the first keys of each kind in key-byte order, at most the configured
     * limit, so {@code truncated} says whether any list is shorter than its count.
     *
     * @param sketchFailed   whether a sketch was tried and could not be decoded (the full comparison took over)
     * @param sketchAttempts sketch sizes tried
     * @param sketchCells    cells of the last sketch tried, 0 when none
     * @param exchangedBytes bytes that would cross between the stores' hosts: sketches sent and the differing
     *                       entries, or one side's entries for a full comparison
     */
    public record DrillDown(String method, boolean sketchFailed, int sketchAttempts, int sketchCells, long exchangedBytes,
            long missingLeftCount, long missingRightCount, long contentDiffersCount, List<KeyDifference> missingLeft,
            List<KeyDifference> missingRight, List<KeyDifference> contentDiffers) {

        public DrillDown {
            missingLeft = List.copyOf(missingLeft);
            missingRight = List.copyOf(missingRight);
            contentDiffers = List.copyOf(contentDiffers);
        }

        public boolean truncated() {
            return missingLeft.size() < missingLeftCount || missingRight.size() < missingRightCount
                    || contentDiffers.size() < contentDiffersCount;
        }
    }

    /**
     * One differing key with its visible records on each side (empty where the side lacks the key).
     *
     * @param keyHex  the key bytes in hex, as the engine encodes them
     * @param key     the key field values by field path, read from a record of either side
     */
    public record KeyDifference(String keyHex, Map<String, Object> key, List<Row> left, List<Row> right) {
        public KeyDifference {
            key = java.util.Collections.unmodifiableMap(new LinkedHashMap<>(key));
            left = List.copyOf(left);
            right = List.copyOf(right);
        }
    }

    /** Whether every partition agrees. */
    public boolean agrees() {
        return partitions.stream().allMatch(p -> p.verdict == Verdict.AGREE);
    }

    /** {@code agree} or {@code disagree}, for scripts. */
    public String status() {
        return agrees() ? "agree" : "disagree";
    }

    /** How many partitions got each verdict (every verdict present, zero when none). */
    public Map<Verdict, Long> totals() {
        Map<Verdict, Long> out = new EnumMap<>(Verdict.class);
        for (Verdict v : Verdict.values()) {
            out.put(v, 0L);
        }
        for (PartitionResult p : partitions) {
            out.merge(p.verdict, 1L, Long::sum);
        }
        return out;
    }

    /** The report as JSON objects in a fixed order (see {@link #toJson()}). */
    public Map<String, Object> toMap() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("status", status());
        m.put("left", side(left, leftTotal, leftRejected));
        m.put("right", side(right, rightTotal, rightRejected));
        List<Object> cs = new ArrayList<>();
        for (DatasetSpec.Check c : checks) {
            Map<String, Object> cm = new LinkedHashMap<>();
            cm.put("aggregate", c.aggregate().name().toLowerCase(Locale.ROOT));
            cm.put("field", c.field());
            cs.add(cm);
        }
        m.put("checks", cs);
        Map<String, Object> t = new LinkedHashMap<>();
        t.put("partitions", (long) partitions.size());
        totals().forEach((v, n) -> t.put(v.json(), n));
        m.put("totals", t);
        List<Object> ps = new ArrayList<>();
        for (PartitionResult p : partitions) {
            Map<String, Object> pm = new LinkedHashMap<>();
            pm.put("partition", p.partition.values());
            pm.put("verdict", p.verdict.json());
            pm.put("left", p.left == null ? null : digest(p.left));
            pm.put("right", p.right == null ? null : digest(p.right));
            if (p.drillDown != null) {
                pm.put("drill_down", drillDown(p.drillDown));
            }
            ps.add(pm);
        }
        m.put("partitions", ps);
        return m;
    }

    /**
     * The report as compact JSON:
     * <pre>{@code
     * {"status": "agree" | "disagree",
     *  "left":  {"name": ..., "rejected": n, "digest": DIGEST},  "right": {...},
     *  "checks": [{"aggregate": "sum", "field": "amount"}],
     *  "totals": {"partitions": n, "agree": n, "missing_left": n, "missing_right": n, "count_differs": n,
     *             "content_differs": n, "aggregate_differs": n},
     *  "partitions": [{"partition": ["2024-02-29"], "verdict": "content_differs", "left": DIGEST, "right": DIGEST,
     *                  "drill_down": {"method": "sketch" | "full", "sketch_failed": false, "sketch_attempts": 1,
     *                                 "sketch_cells": 72, "exchanged_bytes": 1480, "truncated": false,
     *                                 "missing_left":    {"count": n, "keys": [KEY]},
     *                                 "missing_right":   {"count": n, "keys": [KEY]},
     *                                 "content_differs": {"count": n, "keys": [KEY]}}}]}
     * DIGEST = {"keys": n, "records": n, "content_hash": "16 hex digits", "aggregates": [number or null]}, or null
     * KEY    = {"key": {field: value}, "key_hex": "...", "left": [record], "right": [record]}
     * }</pre>
     * Records are objects in field order; bytes are hex, UUIDs text.
     */
    public String toJson() {
        return Json.write(toMap());
    }

    private static Map<String, Object> side(String name, Digest total, long rejected) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("name", name);
        m.put("rejected", rejected);
        m.put("digest", digest(total));
        return m;
    }

    private static Map<String, Object> digest(Digest d) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("keys", d.keys());
        m.put("records", d.records());
        m.put("content_hash", String.format("%016x", d.contentHash()));
        m.put("aggregates", new ArrayList<BigDecimal>(d.aggregates()));
        return m;
    }

    private static Map<String, Object> drillDown(DrillDown d) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("method", d.method);
        m.put("sketch_failed", d.sketchFailed);
        m.put("sketch_attempts", d.sketchAttempts);
        m.put("sketch_cells", d.sketchCells);
        m.put("exchanged_bytes", d.exchangedBytes);
        m.put("truncated", d.truncated());
        m.put("missing_left", keys(d.missingLeftCount, d.missingLeft));
        m.put("missing_right", keys(d.missingRightCount, d.missingRight));
        m.put("content_differs", keys(d.contentDiffersCount, d.contentDiffers));
        return m;
    }

    private static Map<String, Object> keys(long count, List<KeyDifference> keys) {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("count", count);
        List<Object> ks = new ArrayList<>();
        for (KeyDifference k : keys) {
            Map<String, Object> km = new LinkedHashMap<>();
            km.put("key", k.key);
            km.put("key_hex", k.keyHex);
            km.put("left", k.left.stream().map(RowJson::of).toList());
            km.put("right", k.right.stream().map(RowJson::of).toList());
            ks.add(km);
        }
        m.put("keys", ks);
        return m;
    }

    /**
     * A few lines for people: the status with the partition counts, each side's totals, then per differing
     * partition its verdict, how the keys were found, and each listed key with both versions.
     */
    public String summary() {
        StringBuilder sb = new StringBuilder();
        Map<Verdict, Long> totals = totals();
        long differing = partitions.size() - totals.get(Verdict.AGREE);
        sb.append(status()).append(": '").append(left).append("' and '").append(right).append("' ");
        sb.append(differing == 0 ? "agree in all " + partitions.size() + " partitions"
                : "differ in " + differing + " of " + partitions.size() + " partitions");
        List<String> parts = new ArrayList<>();
        totals.forEach((v, n) -> {
            if (n > 0) {
                parts.add(v.words() + " " + n);
            }
        });
        if (!parts.isEmpty()) {
            sb.append(" (").append(String.join(", ", parts)).append(')');
        }
        sb.append('\n');
        sideLine(sb, "left", left, leftTotal, leftRejected);
        sideLine(sb, "right", right, rightTotal, rightRejected);
        for (PartitionResult p : partitions) {
            if (p.verdict == Verdict.AGREE) {
                continue;
            }
            DrillDown d = p.drillDown;
            sb.append("  partition ").append(p.partition).append(": ").append(p.verdict.words()).append("; ")
                    .append(d.missingLeftCount).append(" missing on the left, ")
                    .append(d.missingRightCount).append(" missing on the right, ")
                    .append(d.contentDiffersCount).append(" with different content (")
                    .append(d.method).append(d.sketchFailed ? " after the sketch failed" : "");
            if (d.sketchCells > 0) {
                sb.append(", ").append(d.sketchCells).append(" sketch cells");
            }
            sb.append(", ").append(d.exchangedBytes).append(" bytes exchanged)\n");
            keyLines(sb, "missing on the left", d.missingLeft);
            keyLines(sb, "missing on the right", d.missingRight);
            keyLines(sb, "different", d.contentDiffers);
            if (d.truncated()) {
                sb.append("    (more keys not listed)\n");
            }
        }
        return sb.toString();
    }

    private static void sideLine(StringBuilder sb, String side, String name, Digest d, long rejected) {
        sb.append("  ").append(side).append(" '").append(name).append("': ").append(d.keys()).append(" keys, ")
                .append(d.records()).append(" records");
        if (rejected > 0) {
            sb.append(", ").append(rejected).append(" records rejected");
        }
        sb.append('\n');
    }

    private static void keyLines(StringBuilder sb, String what, List<KeyDifference> keys) {
        for (KeyDifference k : keys) {
            sb.append("    ").append(what).append(' ').append(Json.write(k.key)).append(": left ")
                    .append(Json.write(k.left.stream().map(RowJson::of).toList())).append(", right ")
                    .append(Json.write(k.right.stream().map(RowJson::of).toList())).append('\n');
        }
    }
}
