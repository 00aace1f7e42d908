package dev.onefold.examples.demo;

import java.util.ArrayList;
import java.util.Collection;
import java.util.Comparator;
import java.util.HashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.TreeMap;
import java.util.TreeSet;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * What each demo archive must hold, worked out the plain way and independently of onefold: every delivery of
 * every batch is collected (duplicates and order do not matter to a map), then each dataset's rule is applied
 * directly, the way a person would state it:
 * <ul>
 *   <li>readings: per (container, reading number) the delivery with the highest {@code seq}; gone when that
 *       one is retracted;</li>
 *   <li>statuses: per container every distinct edit that no other edit has seen (no other clock is at least as
 *       large in every office and larger in one);</li>
 *   <li>summaries: per (container, day) the highest maximum, the lowest minimum, every alarm code reported, the
 *       latest non-empty inspector note and the latest revision's gateway.</li>
 * </ul>
 * The scenario never gives two different deliveries the same version where the choice between them would
 * matter, so these rules need no tie-breaking. Stateless; each method is linear in the deliveries (the status
 * rule is quadratic per container, over a handful of edits).
 */
final class ExpectedState {
    private ExpectedState() {}

    static List<GenericRecord> readings(Collection<ReeferFleet.Batch> batches) {
        Map<List<Object>, GenericRecord> best = new HashMap<>();
        for (ReeferFleet.Batch b : batches) {
            for (GenericRecord r : b.deliveries()) {
                best.merge(List.of(r.get("container_id"), r.get("reading_no")), r,
                        (x, y) -> (long) x.get("seq") >= (long) y.get("seq") ? x : y);
            }
        }
        List<GenericRecord> out = new ArrayList<>();
        for (GenericRecord r : best.values()) {
            if (!(boolean) r.get("retracted")) {
                out.add(r);
            }
        }
        out.sort(Comparator.comparingLong((GenericRecord r) -> (long) r.get("recorded_at"))
                .thenComparing(r -> r.get("container_id").toString()).thenComparingInt(r -> (int) r.get("reading_no")));
        return out;
    }

    static List<GenericRecord> statuses(Collection<ReeferFleet.Batch> batches) {
        Map<String, Set<GenericRecord>> edits = new TreeMap<>();
        for (ReeferFleet.Batch b : batches) {
            for (GenericRecord r : b.deliveries()) {
                edits.computeIfAbsent(r.get("container_id").toString(), k -> new LinkedHashSet<>()).add(r);
            }
        }
        List<GenericRecord> out = new ArrayList<>();
        for (Set<GenericRecord> versions : edits.values()) {
            for (GenericRecord v : versions) {
                boolean seenByAnother = versions.stream().anyMatch(o -> o != v && dominates(clock(o), clock(v)));
                if (!seenByAnother) {
                    out.add(v);
                }
            }
        }
        return out;
    }

    @SuppressWarnings("unchecked")
    private static Map<String, Long> clock(GenericRecord r) {
        Map<String, Long> out = new HashMap<>();
        ((Map<Object, Long>) r.get("clock")).forEach((k, v) -> out.put(k.toString(), v));
        return out;
    }

    /** Whether clock a has seen everything b has and more. */
    static boolean dominates(Map<String, Long> a, Map<String, Long> b) {
        Set<String> offices = new TreeSet<>(a.keySet());
        offices.addAll(b.keySet());
        boolean larger = false;
        for (String o : offices) {
            long x = a.getOrDefault(o, 0L);
            long y = b.getOrDefault(o, 0L);
            if (x < y) {
                return false;
            }
            larger |= x > y;
        }
        return larger;
    }

    static List<GenericRecord> summaries(Collection<ReeferFleet.Batch> batches) {
        Map<List<String>, List<GenericRecord>> parts = new TreeMap<>(Comparator.comparing((List<String> k) -> k.get(1))
                .thenComparing(k -> k.get(0)));
        for (ReeferFleet.Batch b : batches) {
            for (GenericRecord r : b.deliveries()) {
                parts.computeIfAbsent(List.of(r.get("container_id").toString(), r.get("day").toString()),
                        k -> new ArrayList<>()).add(r);
            }
        }
        List<GenericRecord> out = new ArrayList<>();
        for (List<GenericRecord> ps : parts.values()) {
            GenericRecord latest = ps.stream().max(Comparator.comparingLong(r -> (long) r.get("revision"))).orElseThrow();
            GenericRecord merged = new GenericData.Record(ReeferFleet.SUMMARY);
            merged.put("container_id", latest.get("container_id"));
            merged.put("day", latest.get("day"));
            merged.put("revision", latest.get("revision"));
            merged.put("max_celsius", ps.stream().mapToDouble(r -> (double) r.get("max_celsius")).max().orElseThrow());
            merged.put("min_celsius", ps.stream().mapToDouble(r -> (double) r.get("min_celsius")).min().orElseThrow());
            Set<String> alarms = new TreeSet<>();
            Map<Long, Object> notes = new TreeMap<>();
            for (GenericRecord r : ps) {
                ((List<?>) r.get("alarms")).forEach(a -> alarms.add(a.toString()));
                if (r.get("inspector_note") != null) {
                    notes.put((long) r.get("revision"), r.get("inspector_note"));
                }
            }
            merged.put("alarms", new ArrayList<>(alarms));
            merged.put("inspector_note", notes.isEmpty() ? null : ((TreeMap<Long, Object>) notes).lastEntry().getValue());
            merged.put("reported_by", latest.get("reported_by"));
            out.add(merged);
        }
        return out;
    }
}
