package dev.onefold.benchmarks.apply;

import dev.onefold.record.Row;
import java.io.BufferedInputStream;
import java.io.BufferedOutputStream;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.OutputStream;
import java.io.UncheckedIOException;
import java.nio.channels.Channels;
import java.nio.channels.FileChannel;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;
import java.util.stream.Stream;

/**
 * The peer of question 2: what a team writes without an incremental archive. The archive is a directory with
 * one file per UTC hour ({@code <hour>.bin}: a count, then id, seq, ts, payload per record, in order); applying a
 * batch reads every file into a HashMap keeping the highest version per key, merges the batch, sorts everything
 * by (ts, id) and rewrites every file into a new directory, each file fsynced (the same durability as the archive
 * it is compared with). Not thread-safe.
 */
public final class FullRecompute {
    private FullRecompute() {}

    /** One stored record. */
    record Event(long id, long seq, long ts, String payload) {
        static Event of(Row r) {
            return new Event((Long) r.get("id"), (Long) r.get("seq"), (Long) r.get("ts"), (String) r.get("payload"));
        }
    }

    static final Comparator<Event> ORDER = Comparator.comparingLong(Event::ts).thenComparingLong(Event::id);

    /** Writes records (already in order, hour by hour) as a directory of hour files. */
    public static void write(Iterator<Row> ordered, Path dir) {
        writeAll(new Iterator<>() {
            @Override
            public boolean hasNext() {
                return ordered.hasNext();
            }

            @Override
            public Event next() {
                return Event.of(ordered.next());
            }
        }, dir);
    }

    /**
     * Recomputes the whole archive in {@code from} with {@code batch} into the new directory {@code to}.
     *
     * @return the number of records written
     */
    public static long apply(Path from, List<Row> batch, Path to) {
        Map<Long, Event> latest = new HashMap<>();
        read(from, e -> keep(latest, e));
        for (Row r : batch) {
            keep(latest, Event.of(r));
        }
        List<Event> all = new ArrayList<>(latest.values());
        all.sort(ORDER);
        writeAll(all.iterator(), to);
        return all.size();
    }

    /** Highest version wins; on a tie the greater payload, so the result never depends on arrival order. */
    private static void keep(Map<Long, Event> latest, Event e) {
        latest.merge(e.id(), e, (a, b) -> a.seq() != b.seq() ? (a.seq() > b.seq() ? a : b)
                : a.payload().compareTo(b.payload()) >= 0 ? a : b);
    }

    private static void writeAll(Iterator<Event> ordered, Path dir) {
        try {
            Files.createDirectories(dir);
            List<Event> hour = new ArrayList<>();
            while (ordered.hasNext()) {
                Event e = ordered.next();
                if (!hour.isEmpty() && hourOf(e) != hourOf(hour.get(0))) {
                    writeHour(dir, hour);
                    hour.clear();
                }
                hour.add(e);
            }
            if (!hour.isEmpty()) {
                writeHour(dir, hour);
            }
            try (FileChannel d = FileChannel.open(dir, StandardOpenOption.READ)) {
                d.force(true);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }

    private static long hourOf(Event e) {
        return Math.floorDiv(e.ts(), ApplyWorkload.HOUR);
    }

    private static void writeHour(Path dir, List<Event> events) throws IOException {
        Path file = dir.resolve(String.format("%012d.bin", hourOf(events.get(0))));
        try (FileChannel ch = FileChannel.open(file, StandardOpenOption.CREATE_NEW, StandardOpenOption.WRITE)) {
            OutputStream raw = Channels.newOutputStream(ch);
            DataOutputStream out = new DataOutputStream(new BufferedOutputStream(raw, 1 << 16));
            out.writeInt(events.size());
            for (Event e : events) {
                out.writeLong(e.id());
                out.writeLong(e.seq());
                out.writeLong(e.ts());
                out.writeUTF(e.payload());
            }
            out.flush();
            ch.force(true);
        }
    }

    /** Sends the records of a directory written by {@link #write} or {@link #apply} to {@code sink}, in order. */
    static void read(Path dir, Consumer<Event> sink) {
        try (Stream<Path> files = Files.list(dir)) {
            for (Path f : files.sorted().toList()) {
                try (DataInputStream in = new DataInputStream(new BufferedInputStream(Files.newInputStream(f), 1 << 16))) {
                    int n = in.readInt();
                    for (int i = 0; i < n; i++) {
                        sink.accept(new Event(in.readLong(), in.readLong(), in.readLong(), in.readUTF()));
                    }
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
