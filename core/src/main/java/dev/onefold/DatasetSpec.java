package dev.onefold;

import dev.onefold.internal.json.Json;
import dev.onefold.spi.MergePolicy;
import java.math.BigDecimal;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.Objects;
import java.util.Set;

/**
 * What a dataset is: its unique key, how versions of one key merge, how survivors are ordered, how the archive
 * partitions them, which field marks a delete, and which aggregates reconciliation checks. Declared with
 * {@link #builder()} or read from the JSON spec format with {@link #fromJson(String, String)}; both have the
 * same meaning and {@link #toJson()} writes the JSON form back.
 *
 * <p>The JSON form is a public contract:
 * <pre>{@code
 * {
 *   "key":       ["container_id", "reading_no"],
 *   "order":     ["recorded_at", "-priority"],
 *   "partition": {"field": "recorded_at", "unit": "hour"},
 *   "merge":     {"policy": "last-writer", "version": "seq"},
 *   "tombstone": "deleted"
 * }
 * }</pre>
 * {@code order} fields with a leading {@code -} sort descending; the key is always appended as the final
 * tie-breaker, so the order is total. Field names are dotted paths into nested records.
 *
 * <p>A spec is checked for its own consistency when built; whether its fields exist with fitting types is
 * checked when it is bound to a schema (see {@link BatchEngine}). Immutable and thread-safe.
 */
public final class DatasetSpec {

    /** One order field, ascending unless {@code descending}. */
    public record OrderField(String path, boolean descending) {
        public OrderField {
            requireField(path, "order");
        }

        String json() {
            return descending ? "-" + path : path;
        }
    }

    /** Time unit of a time-bucket partition, always in UTC. */
    public enum TimeUnit {
        HOUR, DAY, MONTH;

        String json() {
            return name().toLowerCase(Locale.ROOT);
        }
    }

    /** How the archive splits a dataset into partitions. */
    public sealed interface PartitionRule permits TimeBucket, ByValues {
        /** Whether each key keeps its partition value for life (the fast path; see the archive docs). */
        boolean stable();
    }

    /** Partition by the UTC hour, day or month of a timestamp field. */
    public record TimeBucket(String field, TimeUnit unit, boolean stable) implements PartitionRule {
        public TimeBucket {
            requireField(field, "partition");
            Objects.requireNonNull(unit, "unit");
        }
    }

    /** Partition by the values of one or more fields. */
    public record ByValues(List<String> fields, boolean stable) implements PartitionRule {
        public ByValues {
            fields = List.copyOf(fields);
            if (fields.isEmpty()) {
                throw OnefoldException.spec("partition: \"fields\" must name at least one field");
            }
            fields.forEach(f -> requireField(f, "partition"));
        }
    }

    /** How versions of one key merge. */
    public sealed interface MergeRule permits LastWriter, VectorClock, FieldWise, Custom {}

    /** The greatest logical version wins. */
    public record LastWriter(String version) implements MergeRule {
        public LastWriter {
            requireField(version, "merge.version");
        }
    }

    /** What a vector-clock dataset outputs when versions are concurrent. */
    public enum Concurrent {
        /** One record, chosen by a pure, deterministic function of the sibling set. */
        PICK,
        /** Every maximal version. */
        KEEP_ALL;

        String json() {
            return this == PICK ? "pick" : "keep-all";
        }
    }

    /** A version that dominates another supersedes it; concurrent versions are kept as siblings. */
    public record VectorClock(String clock, Concurrent concurrent) implements MergeRule {
        public VectorClock {
            requireField(clock, "merge.clock");
            Objects.requireNonNull(concurrent, "concurrent");
        }
    }

    /** Per-field rules, each with its own version stamps. */
    public enum FieldRule {
        LATEST, LATEST_NON_NULL, FIRST, MAX, MIN, UNION, SUM;

        public String json() {
            return name().toLowerCase(Locale.ROOT).replace('_', '-');
        }

        static FieldRule fromJson(String s, String where) {
            for (FieldRule r : values()) {
                if (r.json().equals(s)) {
                    return r;
                }
            }
            throw OnefoldException.spec(where + ": unknown rule \"" + s + "\" (known: latest, latest-non-null, first, max, "
                    + "min, union, sum)");
        }
    }

    /** Field-wise merge; fields not listed follow {@link FieldRule#LATEST}. */
    public record FieldWise(String version, Map<String, FieldRule> fields) implements MergeRule {
        public FieldWise {
            requireField(version, "merge.version");
            fields = java.util.Collections.unmodifiableMap(new LinkedHashMap<>(fields));
            fields.keySet().forEach(f -> requireField(f, "merge.fields"));
        }
    }

    /** A user policy supplied in Java; its name is what the JSON form records. */
    public record Custom(MergePolicy policy) implements MergeRule {
        public Custom {
            Objects.requireNonNull(policy, "policy");
        }
    }

    /** An aggregate that reconciliation digests carry besides count and content hash. */
    public enum Aggregate {
        SUM, MIN, MAX;

        String json() {
            return name().toLowerCase(Locale.ROOT);
        }
    }

    /** One declared aggregate over a numeric field. */
    public record Check(Aggregate aggregate, String field) {
        public Check {
            Objects.requireNonNull(aggregate, "aggregate");
            requireField(field, "checks");
        }
    }

    private final List<String> key;
    private final List<OrderField> order;
    private final PartitionRule partition;
    private final MergeRule merge;
    private final String tombstone;
    private final List<Check> checks;
    private final boolean allowNullKey;

    private DatasetSpec(Builder b) {
        if (b.key.isEmpty()) {
            throw OnefoldException.spec("key: must name at least one field");
        }
        if (b.merge == null) {
            throw OnefoldException.spec("merge: a merge policy is required");
        }
        this.key = List.copyOf(b.key);
        this.order = List.copyOf(b.order);
        this.partition = b.partition;
        this.merge = b.merge;
        this.tombstone = b.tombstone;
        this.checks = List.copyOf(b.checks);
        this.allowNullKey = b.allowNullKey;
        if (Set.copyOf(key).size() != key.size()) {
            throw OnefoldException.spec("key: a field is listed twice in " + key);
        }
    }

    public static Builder builder() {
        return new Builder();
    }

    public List<String> key() { return key; }

    /** The declared order fields, without the key that is appended as the final tie-breaker. */
    public List<OrderField> order() { return order; }

    /** The partition rule, or null when the dataset is not partitioned (one partition). */
    public PartitionRule partition() { return partition; }

    public MergeRule merge() { return merge; }

    /** The boolean field marking a delete, or null. */
    public String tombstone() { return tombstone; }

    public List<Check> checks() { return checks; }

    /** Whether key fields may be null (null sorts before every value). */
    public boolean allowNullKey() { return allowNullKey; }

    /**
     * Reads the JSON spec format.
     *
     * @param source names the text in error messages, for example the file name
     * @throws OnefoldException (INVALID_SPEC) naming the source, the entry and the reason
     */
    public static DatasetSpec fromJson(String json, String source) {
        Object parsed;
        try {
            parsed = Json.parse(json, source);
        } catch (OnefoldException e) {
            throw OnefoldException.spec(e.getMessage());
        }
        if (!(parsed instanceof Map<?, ?> root)) {
            throw OnefoldException.spec(source + ": a spec must be a JSON object");
        }
        return fromMap(root, source);
    }

    /** Reads the spec from an already parsed JSON object (for example one embedded in a schema). */
    public static DatasetSpec fromMap(Map<?, ?> root, String source) {
        try {
            return readSpec(root);
        } catch (OnefoldException e) {
            throw OnefoldException.spec(source + ": " + e.getMessage());
        }
    }

    private static final Set<String> TOP_KEYS = Set.of("key", "order", "partition", "merge", "tombstone", "checks",
            "allow_null_key");

    private static DatasetSpec readSpec(Map<?, ?> root) {
        for (Object k : root.keySet()) {
            if (!TOP_KEYS.contains(k)) {
                throw OnefoldException.spec("unknown entry \"" + k + "\" (known: " + new java.util.TreeSet<>(TOP_KEYS) + ")");
            }
        }
        Builder b = builder();
        Object key = root.get("key");
        if (key instanceof String s) {
            b.key(s);
        } else {
            b.key(stringList(key, "key").toArray(String[]::new));
        }
        if (root.containsKey("order")) {
            Object order = root.get("order");
            List<String> items = order instanceof String s ? List.of(s) : stringList(order, "order");
            for (String o : items) {
                b.orderBy(o);
            }
        }
        if (root.containsKey("partition")) {
            b.partition(readPartition(root.get("partition")));
        }
        if (!root.containsKey("merge")) {
            throw OnefoldException.spec("merge: a merge policy is required, for example "
                    + "{\"policy\": \"last-writer\", \"version\": \"seq\"}");
        }
        b.merge(readMerge(root.get("merge")));
        if (root.containsKey("tombstone")) {
            b.tombstone(string(root.get("tombstone"), "tombstone"));
        }
        if (root.containsKey("checks")) {
            Object checks = root.get("checks");
            if (!(checks instanceof List<?> list)) {
                throw OnefoldException.spec("checks: must be an array of {\"aggregate\": ..., \"field\": ...}");
            }
            for (Object c : list) {
                if (!(c instanceof Map<?, ?> m)) {
                    throw OnefoldException.spec("checks: each entry must be an object, got " + c);
                }
                onlyKeys(m, "checks entry", "aggregate", "field");
                String agg = string(m.get("aggregate"), "checks.aggregate");
                Aggregate a;
                try {
                    a = Aggregate.valueOf(agg.toUpperCase(Locale.ROOT));
                } catch (IllegalArgumentException e) {
                    throw OnefoldException.spec("checks.aggregate: unknown aggregate \"" + agg + "\" (known: sum, min, max)");
                }
                b.check(a, string(m.get("field"), "checks.field"));
            }
        }
        if (root.containsKey("allow_null_key")) {
            Object v = root.get("allow_null_key");
            if (!(v instanceof Boolean flag)) {
                throw OnefoldException.spec("allow_null_key: must be true or false");
            }
            b.allowNullKey(flag);
        }
        return b.build();
    }

    private static PartitionRule readPartition(Object value) {
        if (!(value instanceof Map<?, ?> m)) {
            throw OnefoldException.spec("partition: must be an object like {\"field\": F, \"unit\": \"hour\"} or "
                    + "{\"fields\": [F, ...]}");
        }
        boolean stable = false;
        if (m.containsKey("stable")) {
            if (!(m.get("stable") instanceof Boolean s)) {
                throw OnefoldException.spec("partition.stable: must be true or false");
            }
            stable = s;
        }
        if (m.containsKey("fields")) {
            onlyKeys(m, "partition", "fields", "stable");
            return new ByValues(stringList(m.get("fields"), "partition.fields"), stable);
        }
        onlyKeys(m, "partition", "field", "unit", "stable");
        String field = string(m.get("field"), "partition.field");
        String unit = string(m.get("unit"), "partition.unit");
        TimeUnit u = switch (unit) {
            case "hour" -> TimeUnit.HOUR;
            case "day" -> TimeUnit.DAY;
            case "month" -> TimeUnit.MONTH;
            default -> throw OnefoldException.spec("partition.unit: unknown unit \"" + unit + "\" (known: hour, day, month)");
        };
        return new TimeBucket(field, u, stable);
    }

    private static MergeRule readMerge(Object value) {
        if (!(value instanceof Map<?, ?> m)) {
            throw OnefoldException.spec("merge: must be an object with a \"policy\"");
        }
        String policy = string(m.get("policy"), "merge.policy");
        switch (policy) {
            case "last-writer":
                onlyKeys(m, "merge", "policy", "version");
                return new LastWriter(string(m.get("version"), "merge.version"));
            case "vector-clock": {
                onlyKeys(m, "merge", "policy", "clock", "concurrent");
                Concurrent c = Concurrent.PICK;
                if (m.containsKey("concurrent")) {
                    String s = string(m.get("concurrent"), "merge.concurrent");
                    c = switch (s) {
                        case "pick" -> Concurrent.PICK;
                        case "keep-all" -> Concurrent.KEEP_ALL;
                        default -> throw OnefoldException.spec("merge.concurrent: unknown value \"" + s
                                + "\" (known: pick, keep-all)");
                    };
                }
                return new VectorClock(string(m.get("clock"), "merge.clock"), c);
            }
            case "field-wise": {
                onlyKeys(m, "merge", "policy", "version", "fields");
                Map<String, FieldRule> rules = new LinkedHashMap<>();
                Object fields = m.get("fields");
                if (fields != null) {
                    if (!(fields instanceof Map<?, ?> fm)) {
                        throw OnefoldException.spec("merge.fields: must be an object {field: rule}");
                    }
                    for (Map.Entry<?, ?> e : fm.entrySet()) {
                        String f = (String) e.getKey();
                        rules.put(f, FieldRule.fromJson(string(e.getValue(), "merge.fields." + f), "merge.fields." + f));
                    }
                }
                return new FieldWise(string(m.get("version"), "merge.version"), rules);
            }
            default:
                throw OnefoldException.spec("merge.policy: unknown policy \"" + policy
                        + "\" (known: last-writer, vector-clock, field-wise; user policies are set in Java)");
        }
    }

    private static void onlyKeys(Map<?, ?> m, String where, String... allowed) {
        Set<String> ok = Set.of(allowed);
        for (Object k : m.keySet()) {
            if (!ok.contains(k)) {
                throw OnefoldException.spec(where + ": unknown entry \"" + k + "\" (known: " + String.join(", ", allowed) + ")");
            }
        }
    }

    private static String string(Object v, String where) {
        if (v == null) {
            throw OnefoldException.spec(where + ": is required");
        }
        if (!(v instanceof String s)) {
            throw OnefoldException.spec(where + ": must be a string, got " + describe(v));
        }
        return s;
    }

    private static List<String> stringList(Object v, String where) {
        if (v == null) {
            throw OnefoldException.spec(where + ": is required");
        }
        if (!(v instanceof List<?> list)) {
            throw OnefoldException.spec(where + ": must be an array of field names, got " + describe(v));
        }
        List<String> out = new ArrayList<>();
        for (Object o : list) {
            out.add(string(o, where + " entry"));
        }
        return out;
    }

    private static String describe(Object v) {
        if (v instanceof Long || v instanceof BigDecimal) {
            return "the number " + v;
        }
        if (v instanceof Map) {
            return "an object";
        }
        if (v instanceof List) {
            return "an array";
        }
        return String.valueOf(v);
    }

    private static void requireField(String path, String where) {
        if (path == null || path.isEmpty()) {
            throw OnefoldException.spec(where + ": field name must not be empty");
        }
        for (String step : path.split("\\.", -1)) {
            if (step.isEmpty()) {
                throw OnefoldException.spec(where + ": field path '" + path + "' has an empty step");
            }
        }
    }

    /** The JSON form, with entries in a fixed order, so equal specs give equal text. */
    public String toJson() {
        Map<String, Object> root = new LinkedHashMap<>();
        root.put("key", key);
        if (!order.isEmpty()) {
            root.put("order", order.stream().map(OrderField::json).toList());
        }
        if (partition instanceof TimeBucket t) {
            Map<String, Object> p = new LinkedHashMap<>();
            p.put("field", t.field());
            p.put("unit", t.unit().json());
            if (t.stable()) {
                p.put("stable", true);
            }
            root.put("partition", p);
        } else if (partition instanceof ByValues v) {
            Map<String, Object> p = new LinkedHashMap<>();
            p.put("fields", v.fields());
            if (v.stable()) {
                p.put("stable", true);
            }
            root.put("partition", p);
        }
        Map<String, Object> m = new LinkedHashMap<>();
        if (merge instanceof LastWriter lw) {
            m.put("policy", "last-writer");
            m.put("version", lw.version());
        } else if (merge instanceof VectorClock vc) {
            m.put("policy", "vector-clock");
            m.put("clock", vc.clock());
            m.put("concurrent", vc.concurrent().json());
        } else if (merge instanceof FieldWise fw) {
            m.put("policy", "field-wise");
            m.put("version", fw.version());
            Map<String, Object> f = new LinkedHashMap<>();
            fw.fields().forEach((k, v) -> f.put(k, v.json()));
            m.put("fields", f);
        } else if (merge instanceof Custom c) {
            m.put("policy", c.policy().name());
        }
        root.put("merge", m);
        if (tombstone != null) {
            root.put("tombstone", tombstone);
        }
        if (!checks.isEmpty()) {
            List<Object> cs = new ArrayList<>();
            for (Check c : checks) {
                Map<String, Object> cm = new LinkedHashMap<>();
                cm.put("aggregate", c.aggregate().json());
                cm.put("field", c.field());
                cs.add(cm);
            }
            root.put("checks", cs);
        }
        if (allowNullKey) {
            root.put("allow_null_key", true);
        }
        return Json.write(root);
    }

    @Override
    public boolean equals(Object o) {
        return o instanceof DatasetSpec s && s.key.equals(key) && s.order.equals(order) && Objects.equals(s.partition, partition)
                && s.merge.equals(merge) && Objects.equals(s.tombstone, tombstone) && s.checks.equals(checks)
                && s.allowNullKey == allowNullKey;
    }

    @Override
    public int hashCode() {
        return Objects.hash(key, order, partition, merge, tombstone, checks, allowNullKey);
    }

    @Override
    public String toString() {
        return toJson();
    }

    /** Collects a spec; {@link #build()} checks it. Not thread-safe. */
    public static final class Builder {
        private final List<String> key = new ArrayList<>();
        private final List<OrderField> order = new ArrayList<>();
        private PartitionRule partition;
        private MergeRule merge;
        private String tombstone;
        private final List<Check> checks = new ArrayList<>();
        private boolean allowNullKey;

        private Builder() {}

        public Builder key(String... fields) {
            key.clear();
            for (String f : fields) {
                requireField(f, "key");
                key.add(f);
            }
            return this;
        }

        /** Adds an order field; a leading {@code -} means descending. */
        public Builder orderBy(String field) {
            Objects.requireNonNull(field, "field");
            boolean desc = field.startsWith("-");
            order.add(new OrderField(desc ? field.substring(1) : field, desc));
            return this;
        }

        public Builder partitionByTime(String field, TimeUnit unit) {
            return partition(new TimeBucket(field, unit, false));
        }

        public Builder partitionByValues(String... fields) {
            return partition(new ByValues(List.of(fields), false));
        }

        public Builder partition(PartitionRule rule) {
            this.partition = rule;
            return this;
        }

        public Builder lastWriter(String versionField) {
            return merge(new LastWriter(versionField));
        }

        public Builder vectorClock(String clockField, Concurrent concurrent) {
            return merge(new VectorClock(clockField, concurrent));
        }

        public Builder fieldWise(String versionField, Map<String, FieldRule> rules) {
            return merge(new FieldWise(versionField, rules));
        }

        public Builder custom(MergePolicy policy) {
            return merge(new Custom(policy));
        }

        public Builder merge(MergeRule rule) {
            this.merge = Objects.requireNonNull(rule, "merge");
            return this;
        }

        public Builder tombstone(String field) {
            requireField(field, "tombstone");
            this.tombstone = field;
            return this;
        }

        public Builder check(Aggregate aggregate, String field) {
            checks.add(new Check(aggregate, field));
            return this;
        }

        public Builder allowNullKey(boolean allow) {
            this.allowNullKey = allow;
            return this;
        }

        public DatasetSpec build() {
            return new DatasetSpec(this);
        }
    }
}
