package dev.onefold;

import dev.onefold.internal.json.Json;
import java.util.LinkedHashMap;
import java.util.Map;

/**
 * What happened to one batch. Counts add up: {@code in == accepted + rejected}. Of the accepted records,
 * {@code duplicates} were byte-identical to another delivery of the same key, {@code superseded} lost to a
 * newer version (or were folded into one by a field-wise or user merge), and {@code conflicts} had the same
 * version as another with different content (resolved by the documented total order). {@code keys} distinct
 * keys remain; of them {@code keysWithSiblings} hold concurrent versions and {@code tombstonedKeys} are
 * deleted; {@code out} records were output (keep-all emits one per sibling).
 *
 * <p>{@code lawsMissing} is true when a user merge policy does not declare all three semilattice laws, so
 * results may depend on batching. Immutable.
 */
public record BatchReport(long in, long accepted, long rejected, long duplicates, long superseded, long conflicts,
        long keys, long keysWithSiblings, long tombstonedKeys, long out, int spilledRuns, boolean lawsMissing) {

    /** The report as a JSON object with snake_case names. */
    public Map<String, Object> toMap() {
        Map<String, Object> m = new LinkedHashMap<>();
        m.put("in", in);
        m.put("accepted", accepted);
        m.put("rejected", rejected);
        m.put("duplicates", duplicates);
        m.put("superseded", superseded);
        m.put("conflicts", conflicts);
        m.put("keys", keys);
        m.put("keys_with_siblings", keysWithSiblings);
        m.put("tombstones", tombstonedKeys);
        m.put("out", out);
        m.put("spilled_runs", spilledRuns);
        if (lawsMissing) {
            m.put("laws_missing", true);
        }
        return m;
    }

    public String toJson() {
        return Json.write(toMap());
    }
}
