package dev.onefold.testkit;

import java.util.List;
import java.util.Map;
import java.util.Objects;
import java.util.SortedMap;
import java.util.TreeMap;

/**
 * One step of a delivery {@link Schedule}: either a {@link Delivery} handed to the sink, or a {@link Restart}
 * after a simulated crash. Steps are immutable when their records are.
 */
public sealed interface Step<R> permits Step.Delivery, Step.Restart {

    /**
     * A batch of log entries handed to {@link Sink#apply} in one call, in delivery order; it may mix partitions
     * and hold entries the sink has seen before.
     */
    record Delivery<R>(List<LogEntry<R>> entries) implements Step<R> {
        public Delivery {
            entries = List.copyOf(entries);
            if (entries.isEmpty()) {
                throw new IllegalArgumentException("a delivery holds at least one entry");
            }
        }

        /** The records of the entries, in delivery order. */
        public List<R> records() {
            return entries.stream().map(LogEntry::record).toList();
        }

        @Override
        public String toString() {
            return "deliver " + entries;
        }
    }

    /**
     * The consumer crashed after the previous delivery returned; the sink is restarted ({@link Sink#restart})
     * and each partition is read again from its offset in {@code rewoundTo}, which the report shows.
     */
    record Restart<R>(SortedMap<Integer, Long> rewoundTo) implements Step<R> {
        public Restart {
            rewoundTo = java.util.Collections.unmodifiableSortedMap(new TreeMap<>(Objects.requireNonNull(rewoundTo)));
        }

        @Override
        public String toString() {
            StringBuilder sb = new StringBuilder("restart, replay from");
            for (Map.Entry<Integer, Long> e : rewoundTo.entrySet()) {
                sb.append(" p").append(e.getKey()).append('@').append(e.getValue());
            }
            return sb.toString();
        }
    }
}
