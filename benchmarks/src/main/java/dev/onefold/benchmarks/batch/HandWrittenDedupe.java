package dev.onefold.benchmarks.batch;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;

/**
 * The peer "what a team writes by hand" for question 1: a {@link HashMap} from key to what the policy keeps,
 * then a list sort with a comparator on {@code recorded_at}, then the key. Single-threaded, plain Java
 * collections, default capacities: the usual code, not a tuned kernel.
 *
 * <p>It knows the benchmark's data: versions of one key are distinct and concurrent vector-clock versions have
 * distinct counter sums, so it needs none of onefold's content tie-breaks. Stateless and thread-safe; O(n) map
 * work plus O(k log k) for the sort of k keys.
 */
public final class HandWrittenDedupe {
    private HandWrittenDedupe() {}

    /** Output order: recorded_at, then the key (device, reading_no). */
    static final Comparator<Reading> ORDER = Comparator.comparingLong(Reading::recordedAt)
            .thenComparing(Reading::device)
            .thenComparingInt(Reading::readingNo);

    public static List<Reading> dedupe(MergeCase policy, List<Reading> batch) {
        return switch (policy) {
            case LAST_WRITER -> lastWriter(batch);
            case VECTOR_CLOCK -> vectorClock(batch);
            case FIELD_WISE -> fieldWise(batch);
        };
    }

    /** Keeps the highest {@code seq} per key. */
    static List<Reading> lastWriter(List<Reading> batch) {
        Map<Reading.Key, Reading> latest = new HashMap<>();
        for (Reading r : batch) {
            latest.merge(r.key(), r, (a, b) -> b.seq() > a.seq() ? b : a);
        }
        return sorted(latest.values());
    }

    /** Keeps the maximal clocks per key, then shows the one with the greatest counter sum. */
    static List<Reading> vectorClock(List<Reading> batch) {
        Map<Reading.Key, List<Reading>> siblings = new HashMap<>();
        for (Reading r : batch) {
            List<Reading> kept = siblings.computeIfAbsent(r.key(), k -> new ArrayList<>(2));
            boolean covered = false;
            for (Reading s : kept) {
                if (covers(s.clock(), r.clock())) {
                    covered = true;
                    break;
                }
            }
            if (!covered) {
                kept.removeIf(s -> covers(r.clock(), s.clock()));
                kept.add(r);
            }
        }
        List<Reading> picked = new ArrayList<>(siblings.size());
        for (List<Reading> kept : siblings.values()) {
            Reading best = kept.get(0);
            for (Reading s : kept) {
                if (counterSum(s) > counterSum(best)) {
                    best = s;
                }
            }
            picked.add(best);
        }
        return sorted(picked);
    }

    private static boolean covers(Map<String, Long> a, Map<String, Long> b) {
        for (Map.Entry<String, Long> e : b.entrySet()) {
            if (a.getOrDefault(e.getKey(), 0L) < e.getValue()) {
                return false;
            }
        }
        return true;
    }

    private static long counterSum(Reading r) {
        long sum = 0;
        for (long c : r.clock().values()) {
            sum += c;
        }
        return sum;
    }

    /** Per key: the latest record, the maximum temp and the latest non-null status. */
    static List<Reading> fieldWise(List<Reading> batch) {
        final class Merged {
            Reading latest;
            double maxTemp = Double.NEGATIVE_INFINITY;
            String status;
            long statusSeq = Long.MIN_VALUE;
        }
        Map<Reading.Key, Merged> merged = new HashMap<>();
        for (Reading r : batch) {
            Merged m = merged.computeIfAbsent(r.key(), k -> new Merged());
            if (m.latest == null || r.seq() > m.latest.seq()) {
                m.latest = r;
            }
            m.maxTemp = Math.max(m.maxTemp, r.temp());
            if (r.status() != null && r.seq() > m.statusSeq) {
                m.status = r.status();
                m.statusSeq = r.seq();
            }
        }
        List<Reading> out = new ArrayList<>(merged.size());
        for (Merged m : merged.values()) {
            Reading l = m.latest;
            out.add(new Reading(l.device(), l.readingNo(), l.seq(), l.recordedAt(), m.maxTemp, m.status, l.clock()));
        }
        return sorted(out);
    }

    private static List<Reading> sorted(java.util.Collection<Reading> survivors) {
        List<Reading> out = new ArrayList<>(survivors);
        out.sort(ORDER);
        return out;
    }
}
