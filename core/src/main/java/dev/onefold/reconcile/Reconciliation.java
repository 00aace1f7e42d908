package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.internal.reconcile.DifferenceFinder;
import dev.onefold.internal.reconcile.RowJson;
import dev.onefold.reconcile.ReconciliationReport.DrillDown;
import dev.onefold.reconcile.ReconciliationReport.KeyDifference;
import dev.onefold.reconcile.ReconciliationReport.PartitionResult;
import dev.onefold.reconcile.ReconciliationReport.Verdict;
import dev.onefold.record.Row;
import java.math.BigDecimal;
import java.nio.ByteBuffer;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashSet;
import java.util.HexFormat;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;
import java.util.Set;
import java.util.SortedMap;
import java.util.TreeSet;

/**
 * Proves that two stores hold the same data, partition by partition, and where they do not, names the keys that
 * differ. {@link #compare} first compares digests only (cheap: an archive's come from its manifest), then drills
 * into each partition that does not agree: keys missing on either side and keys whose content differs, with both
 * versions.
 *
 * <p>Let L and R be sources under specs with the same key and checks. Then a partition's verdict is AGREE exactly
 * when its digests are equal (both absent or empty counts as equal), so equal content always agrees; otherwise
 * the drill-down lists every differing key up to the {@link Builder#listLimit limit} and counts all of them. A
 * difference with equal digests on both sides would need a 64-bit hash collision on the sum of key hashes.
 *
 * <p>Drill-down uses an invertible Bloom lookup table (see {@code internal.reconcile.DifferenceSketch} for the
 * sources and sizing) so that d differences cost O(d) exchanged bytes, and falls back to a full sorted comparison
 * when the sketch cannot be decoded; the report says which method ran and what it cost.
 *
 * <p>Immutable and thread-safe; each comparison is independent. Cost: O(partitions) for agreeing stores, plus
 * one or two passes over the entries of each differing partition and one {@link DigestSource#versions} call per
 * side and partition for the listed keys.
 */
public final class Reconciliation {
    private final int listLimit;
    private final long sketchMaxDifferences;
    private final long budget;
    private final Path spillDir;

    private Reconciliation(Builder b) {
        this.listLimit = b.listLimit;
        this.sketchMaxDifferences = b.sketchMaxDifferences;
        this.budget = b.budget;
        this.spillDir = b.spillDir;
    }

    public static Builder builder() {
        return new Builder();
    }

    /** A reconciliation with default settings. */
    public static Reconciliation defaults() {
        return builder().build();
    }

    /**
     * Compares two sources.
     *
     * @throws OnefoldException (USAGE) when the sources' specs have different keys or checks, so their digests
     *     cannot be compared
     */
    public ReconciliationReport compare(DigestSource left, DigestSource right) {
        DatasetSpec ls = left.spec();
        DatasetSpec rs = right.spec();
        if (!ls.key().equals(rs.key()) || !ls.checks().equals(rs.checks())) {
            throw OnefoldException.usage("cannot compare '" + left.name() + "' (key " + ls.key() + ", checks " + ls.checks()
                    + ") with '" + right.name() + "' (key " + rs.key() + ", checks " + rs.checks()
                    + "): key and checks must be the same");
        }
        List<DatasetSpec.Check> checks = ls.checks();
        SortedMap<PartitionId, Digest> ld = left.digests();
        SortedMap<PartitionId, Digest> rd = right.digests();
        TreeSet<PartitionId> all = new TreeSet<>(ld.keySet());
        all.addAll(rd.keySet());
        DifferenceFinder finder = new DifferenceFinder(listLimit, sketchMaxDifferences, budget, spillDir);
        Digest leftTotal = Digest.empty(checks.size());
        Digest rightTotal = Digest.empty(checks.size());
        List<PartitionResult> results = new ArrayList<>(all.size());
        for (PartitionId p : all) {
            Digest l = ld.get(p);
            Digest r = rd.get(p);
            if (l != null) {
                leftTotal = leftTotal.combine(l, checks);
            }
            if (r != null) {
                rightTotal = rightTotal.combine(r, checks);
            }
            Verdict v = verdict(l, r);
            DrillDown d = v == Verdict.AGREE ? null : drillDown(left, right, p, l, r, finder);
            results.add(new PartitionResult(p, v, l, r, d));
        }
        return new ReconciliationReport(left.name(), right.name(), checks, leftTotal, rightTotal,
                left.rejections().size(), right.rejections().size(), results);
    }

    static Verdict verdict(Digest l, Digest r) {
        boolean leftEmpty = l == null || l.keys() == 0;
        boolean rightEmpty = r == null || r.keys() == 0;
        if (leftEmpty || rightEmpty) {
            return leftEmpty == rightEmpty ? Verdict.AGREE : leftEmpty ? Verdict.MISSING_LEFT : Verdict.MISSING_RIGHT;
        }
        if (l.keys() != r.keys() || l.records() != r.records()) {
            return Verdict.COUNT_DIFFERS;
        }
        if (l.contentHash() != r.contentHash()) {
            return Verdict.CONTENT_DIFFERS;
        }
        for (int i = 0; i < l.aggregates().size(); i++) {
            if (!sameNumber(l.aggregates().get(i), r.aggregates().get(i))) {
                return Verdict.AGGREGATE_DIFFERS;
            }
        }
        return Verdict.AGREE;
    }

    private static boolean sameNumber(BigDecimal a, BigDecimal b) {
        return a == null ? b == null : b != null && a.compareTo(b) == 0;
    }

    private DrillDown drillDown(DigestSource left, DigestSource right, PartitionId p, Digest l, Digest r,
            DifferenceFinder finder) {
        DifferenceFinder.Found f = finder.find(left, right, p, l, r);
        Set<ByteBuffer> wantLeft = new HashSet<>();
        Set<ByteBuffer> wantRight = new HashSet<>();
        f.missingRight().forEach(k -> wantLeft.add(ByteBuffer.wrap(k)));
        f.missingLeft().forEach(k -> wantRight.add(ByteBuffer.wrap(k)));
        f.contentDiffers().forEach(k -> {
            wantLeft.add(ByteBuffer.wrap(k));
            wantRight.add(ByteBuffer.wrap(k));
        });
        Map<ByteBuffer, List<Row>> lv = wantLeft.isEmpty() ? Map.of() : left.versions(p, wantLeft);
        Map<ByteBuffer, List<Row>> rv = wantRight.isEmpty() ? Map.of() : right.versions(p, wantRight);
        List<String> keyFields = left.spec().key();
        return new DrillDown(f.method().name().toLowerCase(Locale.ROOT), f.sketchFailed(), f.sketchAttempts(),
                f.sketchCells(), f.exchangedBytes(), f.missingLeftCount(), f.missingRightCount(), f.contentDiffersCount(),
                differences(f.missingLeft(), lv, rv, keyFields), differences(f.missingRight(), lv, rv, keyFields),
                differences(f.contentDiffers(), lv, rv, keyFields));
    }

    private static List<KeyDifference> differences(List<byte[]> keys, Map<ByteBuffer, List<Row>> lv,
            Map<ByteBuffer, List<Row>> rv, List<String> keyFields) {
        List<KeyDifference> out = new ArrayList<>(keys.size());
        for (byte[] k : keys) {
            ByteBuffer b = ByteBuffer.wrap(k);
            List<Row> l = lv.getOrDefault(b, List.of());
            List<Row> r = rv.getOrDefault(b, List.of());
            Row any = !l.isEmpty() ? l.get(0) : !r.isEmpty() ? r.get(0) : null;
            out.add(new KeyDifference(HexFormat.of().formatHex(k), keyValues(any, keyFields), l, r));
        }
        return out;
    }

    private static Map<String, Object> keyValues(Row row, List<String> keyFields) {
        Map<String, Object> out = new LinkedHashMap<>();
        if (row != null) {
            for (String f : keyFields) {
                out.put(f, RowJson.value(row.schema().resolve(f).read(row)));
            }
        }
        return out;
    }

    /** Settings for a reconciliation. Not thread-safe. */
    public static final class Builder {
        private int listLimit = 100;
        private long sketchMaxDifferences = 100_000;
        private long budget = Math.min(64L << 20, Runtime.getRuntime().maxMemory() / 8);
        private Path spillDir = Path.of(System.getProperty("java.io.tmpdir"));

        private Builder() {}

        /** How many keys of each kind (missing left, missing right, different) to list per partition; default 100. */
        public Builder listLimit(int keys) {
            if (keys < 0) {
                throw OnefoldException.usage("list limit must be at least 0, got " + keys);
            }
            this.listLimit = keys;
            return this;
        }

        /**
         * The largest number of differing entries a sketch is sized for (default 100 000, about 6 MiB of sketch per
         * side); partitions that may differ more, or whose sketch does not decode, use the full comparison.
         */
        public Builder sketchMaxDifferences(long differences) {
            if (differences < 1) {
                throw OnefoldException.usage("sketch max differences must be at least 1, got " + differences);
            }
            this.sketchMaxDifferences = differences;
            return this;
        }

        /** Memory the full comparison's sort may hold before spilling (default: an eighth of the heap, at most 64 MiB). */
        public Builder memoryBudgetBytes(long bytes) {
            if (bytes < 1024) {
                throw OnefoldException.usage("memory budget must be at least 1024 bytes, got " + bytes);
            }
            this.budget = bytes;
            return this;
        }

        /** Where the full comparison's sorted runs spill (default: java.io.tmpdir). */
        public Builder spillDirectory(Path dir) {
            this.spillDir = Objects.requireNonNull(dir, "dir");
            return this;
        }

        public Reconciliation build() {
            return new Reconciliation(this);
        }
    }
}
