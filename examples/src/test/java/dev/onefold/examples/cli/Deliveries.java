package dev.onefold.examples.cli;

import dev.onefold.avro.ContainerFiles;
import dev.onefold.avro.JsonLines;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collection;
import java.util.Collections;
import java.util.Comparator;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * Generated deliveries for the tool's tests: keys with several versions each, every version delivered one to
 * three times, some keys deleted by a newest tombstone version, shuffled. Content is a function of (key, version),
 * so equal versions are equal records and the model needs no tie-breaking. The model is the trivially correct
 * one (STYLE item 13): collect everything, keep the highest version per key, drop deleted keys, sort by time.
 */
public final class Deliveries {
    public static final String SCHEMA_TEXT = """
            {"type": "record", "name": "Event", "namespace": "test.cli", "fields": [
              {"name": "id", "type": "string"},
              {"name": "n", "type": "int"},
              {"name": "ver", "type": "long"},
              {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
              {"name": "value", "type": "double"},
              {"name": "deleted", "type": "boolean", "default": false}],
             "onefold": {"key": ["id", "n"], "order": ["at"], "partition": {"field": "at", "unit": "day"},
                         "merge": {"policy": "last-writer", "version": "ver"}, "tombstone": "deleted"}}""";
    public static final String SPEC_TEXT = """
            {"key": ["id", "n"], "order": ["at"], "partition": {"field": "at", "unit": "day"},
             "merge": {"policy": "last-writer", "version": "ver"}, "tombstone": "deleted"}""";
    public static final Schema SCHEMA = new Schema.Parser().parse(SCHEMA_TEXT);
    public static final long DAY0 = 1_900_000_000_000L - 1_900_000_000_000L % 86_400_000L;

    private Deliveries() {}

    public static GenericRecord event(int key, long ver) {
        GenericRecord r = new GenericData.Record(SCHEMA);
        r.put("id", String.format("k%05d", key / 4));
        r.put("n", key % 4);
        r.put("ver", ver);
        r.put("at", DAY0 + (key % 3) * 86_400_000L + key * 1_000L);
        r.put("value", key * 0.5 + ver);
        r.put("deleted", false);
        return r;
    }

    /** Deliveries of keys [from, to): versions 1..3 per key, each one to three times; every 10th key deleted. */
    public static List<GenericRecord> generate(long seed, int from, int to) {
        Random random = new Random(seed);
        List<GenericRecord> out = new ArrayList<>();
        for (int key = from; key < to; key++) {
            int versions = 1 + random.nextInt(3);
            for (long v = 1; v <= versions; v++) {
                GenericRecord e = event(key, v);
                if (key % 10 == 0 && v == versions) {
                    e.put("deleted", true);
                }
                for (int copies = 1 + random.nextInt(3); copies > 0; copies--) {
                    out.add(e);
                }
            }
        }
        Collections.shuffle(out, random);
        return out;
    }

    /** The model: per key the highest version, deleted keys dropped, sorted by time then key. */
    public static List<GenericRecord> expected(Collection<GenericRecord> deliveries) {
        Map<List<Object>, GenericRecord> best = new HashMap<>();
        for (GenericRecord r : deliveries) {
            best.merge(List.of(r.get("id"), r.get("n")), r, (a, b) -> (long) a.get("ver") >= (long) b.get("ver") ? a : b);
        }
        List<GenericRecord> out = new ArrayList<>();
        best.values().stream().filter(r -> !(boolean) r.get("deleted")).forEach(out::add);
        out.sort(Comparator.comparingLong((GenericRecord r) -> (long) r.get("at")));
        return out;
    }

    public static List<String> lines(List<GenericRecord> records) {
        JsonLines json = JsonLines.of(SCHEMA);
        return records.stream().map(json::write).toList();
    }

    public static Path writeJsonLines(Path file, List<GenericRecord> records, List<String> extraLines) {
        List<String> text = new ArrayList<>(lines(records));
        for (int i = 0; i < extraLines.size(); i++) {
            text.add(Math.min(text.size(), 3 + i * 5), extraLines.get(i));
        }
        try {
            Files.write(file, text, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return file;
    }

    public static Path writeAvro(Path file, List<GenericRecord> records, ContainerFiles.Compression compression) {
        try (ContainerFiles.Writer w = ContainerFiles.create(file, SCHEMA, compression)) {
            records.forEach(w);
        }
        return file;
    }

    public static List<GenericRecord> readAvro(Path file) {
        List<GenericRecord> out = new ArrayList<>();
        try (ContainerFiles.Reader r = ContainerFiles.open(file, SCHEMA)) {
            r.forEachRemaining(out::add);
        }
        return out;
    }

    public static Path writeText(Path file, String text) {
        try {
            Files.writeString(file, text, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return file;
    }

    public static List<String> readLines(Path file) {
        try {
            return Files.readAllLines(file, StandardCharsets.UTF_8);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
