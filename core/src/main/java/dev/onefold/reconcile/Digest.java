package dev.onefold.reconcile;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.bytes.ByteReader;
import dev.onefold.internal.bytes.ByteWriter;
import dev.onefold.internal.encoding.RowCodec;
import dev.onefold.internal.hash.XxHash64;
import dev.onefold.record.FieldPath;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Objects;

/**
 * A content digest of a set of visible records: the number of live keys, an order-independent content hash and
 * the aggregates the spec declares. The content hash is the sum modulo 2^64 of XXH64 over (key bytes, canonical
 * row bytes) for every visible record, so it does not depend on order, combines across partitions by addition
 * and is equal for equal content however it was produced, ordered or split.
 *
 * <p>Aggregates are exact: sums are computed in {@link BigDecimal} (so no floating-point order effects), min
 * and max compare numerically; each is null while no non-null value was seen.
 *
 * <p>Immutable and thread-safe; {@link Builder} is not thread-safe. Combining costs O(number of aggregates).
 */
public record Digest(long keys, long records, long contentHash, List<BigDecimal> aggregates) {

    public Digest {
        aggregates = Collections.unmodifiableList(new ArrayList<>(aggregates));
    }

    /** The digest of nothing, with one empty slot per declared check. */
    public static Digest empty(int checks) {
        return new Digest(0, 0, 0, Collections.nCopies(checks, null));
    }

    /** The hash one visible record contributes. */
    public static long recordHash(byte[] key, byte[] canonicalRow) {
        ByteWriter w = new ByteWriter(key.length + canonicalRow.length + 10);
        w.writeBlob(key);
        w.write(canonicalRow);
        return XxHash64.hash(w.array(), 0, w.length(), 0);
    }

    /**
     * The hash one key contributes: the sum modulo 2^64 of {@link #recordHash} over the key's visible records
     * (one, or one per sibling), so it does not depend on the order of siblings. A partition's
     * {@link #contentHash()} is the sum of its keys' hashes; reconciliation drill-down compares these per key.
     */
    public static long keyHash(byte[] key, List<Row> visibleRows) {
        long h = 0;
        for (Row r : visibleRows) {
            h += recordHash(key, RowCodec.encode(r));
        }
        return h;
    }

    /**
     * The digest of two disjoint sets of keys (for example two partitions).
     *
     * @throws IllegalArgumentException when the digests carry different numbers of aggregates
     */
    public Digest combine(Digest other, List<DatasetSpec.Check> checks) {
        if (other.aggregates.size() != aggregates.size() || checks.size() != aggregates.size()) {
            throw new IllegalArgumentException("digests of different check lists cannot be combined");
        }
        List<BigDecimal> agg = new ArrayList<>(aggregates.size());
        for (int i = 0; i < aggregates.size(); i++) {
            agg.add(combine(checks.get(i).aggregate(), aggregates.get(i), other.aggregates.get(i)));
        }
        return new Digest(keys + other.keys, records + other.records, contentHash + other.contentHash, agg);
    }

    private static BigDecimal combine(DatasetSpec.Aggregate a, BigDecimal x, BigDecimal y) {
        if (x == null) {
            return y;
        }
        if (y == null) {
            return x;
        }
        return switch (a) {
            case SUM -> x.add(y);
            case MIN -> x.compareTo(y) <= 0 ? x : y;
            case MAX -> x.compareTo(y) >= 0 ? x : y;
        };
    }

    /** Writes the digest (for manifests and wire exchange). */
    public void write(ByteWriter out) {
        out.writeVarLong(keys);
        out.writeVarLong(records);
        out.writeLong(contentHash);
        out.writeVarInt(aggregates.size());
        for (BigDecimal d : aggregates) {
            if (d == null) {
                out.write(0);
            } else {
                out.write(1);
                out.writeString(d.toString());
            }
        }
    }

    public static Digest read(ByteReader in) {
        long keys = in.readVarLong();
        long records = in.readVarLong();
        long hash = in.readLong();
        int n = in.readVarInt();
        List<BigDecimal> agg = new ArrayList<>(n);
        for (int i = 0; i < n; i++) {
            agg.add(in.read() == 0 ? null : new BigDecimal(in.readString()));
        }
        return new Digest(keys, records, hash, agg);
    }

    /** Accumulates a digest from visible records. Not thread-safe. */
    public static final class Builder {
        private final List<DatasetSpec.Check> checks;
        private final FieldPath[] paths;
        private final BigDecimal[] agg;
        private long keys;
        private long records;
        private long hash;
        private byte[] lastKey;

        /** A builder for records of one schema under the spec's checks. */
        public Builder(DatasetSpec spec, RowSchema schema) {
            this.checks = spec.checks();
            this.paths = new FieldPath[checks.size()];
            for (int i = 0; i < paths.length; i++) {
                paths[i] = schema.resolve(checks.get(i).field());
            }
            this.agg = new BigDecimal[checks.size()];
        }

        /**
         * Adds one visible record of a key. Records of one key must be added consecutively (siblings); a key is
         * counted once.
         */
        public Builder add(byte[] key, Row row) {
            Objects.requireNonNull(key, "key");
            if (lastKey == null || !java.util.Arrays.equals(lastKey, key)) {
                keys++;
                lastKey = key;
            }
            addRecord(key, row);
            return this;
        }

        /**
         * Adds all visible records of one key not added before (empty adds nothing: a deleted key is not live).
         *
         * @return the key's hash, {@link #keyHash}
         */
        public long addKey(byte[] key, List<Row> visibleRows) {
            Objects.requireNonNull(key, "key");
            if (visibleRows.isEmpty()) {
                return 0;
            }
            keys++;
            lastKey = key;
            long h = 0;
            for (Row r : visibleRows) {
                h += addRecord(key, r);
            }
            return h;
        }

        private long addRecord(byte[] key, Row row) {
            long h = recordHash(key, RowCodec.encode(row));
            records++;
            hash += h;
            for (int i = 0; i < paths.length; i++) {
                Object v = paths[i].read(row);
                if (v != null) {
                    agg[i] = combine(checks.get(i).aggregate(), agg[i], toDecimal(v));
                }
            }
            return h;
        }

        public Digest build() {
            List<BigDecimal> a = new ArrayList<>(agg.length);
            Collections.addAll(a, agg);
            return new Digest(keys, records, hash, a);
        }
    }

    static BigDecimal toDecimal(Object v) {
        if (v instanceof BigDecimal d) {
            return d.stripTrailingZeros();
        }
        if (v instanceof Double d) {
            return new BigDecimal(d).stripTrailingZeros();
        }
        if (v instanceof Float f) {
            return new BigDecimal(f.doubleValue()).stripTrailingZeros();
        }
        return BigDecimal.valueOf(((Number) v).longValue());
    }
}
