package dev.onefold.examples.demo;

import java.time.Instant;
import java.time.LocalDate;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.Random;
import java.util.TreeMap;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;

/**
 * The demo's fictional scenario, generated from a fixed seed: the Kittiwake Line's refrigerated containers
 * ("reefers") report their temperature every 15 minutes through several gateways (on the quay, on board, on
 * the rail link), two offices edit each container's status, and gateways send daily summaries. Everything that
 * makes real deliveries hard is in it: the same reading relayed by two or three gateways, a gateway replaying
 * a whole day, a ship out of coverage whose readings arrive a day late, recalibrated readings (a higher sequence
 * number), retracted readings (tombstones), status edits made at both offices at once (concurrent vector
 * clocks), a summary re-sent with a recomputed maximum (same revision, different content), and a few broken
 * lines.
 *
 * <p>Three datasets, one per merge policy: readings under last-writer (key container and reading number,
 * version {@code seq}, partitioned by day), statuses under vector clocks keeping every concurrent version, and
 * daily summaries under a field-wise merge. Every batch is a list of deliveries in arrival order plus the broken
 * lines to insert; the same seed always gives the same batches. Not thread-safe; build once.
 */
final class ReeferFleet {
    static final long SEED = 20310504L;
    static final int CONTAINERS = 30;
    static final int DAYS = 3;
    static final int READINGS_PER_DAY = 96;
    static final LocalDate FIRST_DAY = LocalDate.of(2031, 5, 4);
    static final String[] GATEWAYS = {"gw-quay-7", "gw-ship-marlin", "gw-rail-fen"};
    static final String[] OFFICES = {"harbourside", "inland"};
    static final String[] ALARMS = {"D01", "P03", "T02", "T07"};

    static final Schema READING = new Schema.Parser().parse("""
            {"type": "record", "name": "Reading", "namespace": "demo.kittiwake",
             "doc": "One temperature reading of a refrigerated container, as relayed by a gateway.",
             "fields": [
               {"name": "container_id", "type": "string"},
               {"name": "reading_no", "type": "int", "doc": "numbered per container from the first day"},
               {"name": "seq", "type": "long", "doc": "1 for the reading, higher for a recalibrated or retracted one"},
               {"name": "recorded_at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
               {"name": "celsius", "type": "double"},
               {"name": "gateway", "type": "string", "doc": "the gateway that captured it first"},
               {"name": "retracted", "type": "boolean", "default": false}
             ],
             "onefold": {
               "key": ["container_id", "reading_no"],
               "order": ["recorded_at"],
               "partition": {"field": "recorded_at", "unit": "day"},
               "merge": {"policy": "last-writer", "version": "seq"},
               "tombstone": "retracted",
               "checks": [{"aggregate": "sum", "field": "celsius"}]
             }}""");

    static final Schema STATUS = new Schema.Parser().parse("""
            {"type": "record", "name": "ContainerStatus", "namespace": "demo.kittiwake",
             "doc": "A container's status as edited at the line's two offices.",
             "fields": [
               {"name": "container_id", "type": "string"},
               {"name": "clock", "type": {"type": "map", "values": "long"}, "doc": "edits seen, per office"},
               {"name": "state", "type": "string"},
               {"name": "setpoint_celsius", "type": "double"},
               {"name": "edited_by", "type": "string"},
               {"name": "note", "type": ["null", "string"], "default": null}
             ]}""");

    static final String STATUS_SPEC = """
            {"key": ["container_id"],
             "merge": {"policy": "vector-clock", "clock": "clock", "concurrent": "keep-all"}}
            """;

    static final Schema SUMMARY = new Schema.Parser().parse("""
            {"type": "record", "name": "DailySummary", "namespace": "demo.kittiwake",
             "doc": "A gateway's summary of one container's day; several gateways each see part of it.",
             "fields": [
               {"name": "container_id", "type": "string"},
               {"name": "day", "type": "string"},
               {"name": "revision", "type": "long"},
               {"name": "max_celsius", "type": "double"},
               {"name": "min_celsius", "type": "double"},
               {"name": "alarms", "type": {"type": "array", "items": "string"}},
               {"name": "inspector_note", "type": ["null", "string"], "default": null},
               {"name": "reported_by", "type": "string"}
             ],
             "onefold": {
               "key": ["container_id", "day"],
               "order": ["day"],
               "partition": {"fields": ["day"]},
               "merge": {"policy": "field-wise", "version": "revision",
                         "fields": {"max_celsius": "max", "min_celsius": "min", "alarms": "union",
                                    "inspector_note": "latest-non-null"}}
             }}""");

    /** One batch: its file's name, the deliveries in arrival order, and broken lines to insert (JSON lines only). */
    record Batch(String file, List<GenericRecord> deliveries, List<String> brokenLines, String story) {}

    private final Random random = new Random(SEED);
    final List<Batch> readings = new ArrayList<>();
    final List<Batch> statuses = new ArrayList<>();
    final List<Batch> summaries = new ArrayList<>();

    ReeferFleet() {
        generateReadings();
        generateStatuses();
        generateSummaries();
    }

    static String container(int i) {
        return String.format("KWLU%07d", 1_000_001 + i * 37);
    }

    static long recordedAt(int readingNo) {
        return FIRST_DAY.atStartOfDay(ZoneOffset.UTC).toInstant().toEpochMilli() + readingNo * 15L * 60_000L;
    }

    private static double setpoint(int c) {
        return c % 3 == 0 ? -18.0 : c % 3 == 1 ? 2.0 : 12.5;
    }

    private GenericRecord reading(int c, int no, long seq, double celsius, String gateway, boolean retracted) {
        GenericRecord r = new GenericData.Record(READING);
        r.put("container_id", container(c));
        r.put("reading_no", no);
        r.put("seq", seq);
        r.put("recorded_at", recordedAt(no));
        r.put("celsius", celsius);
        r.put("gateway", gateway);
        r.put("retracted", retracted);
        return r;
    }

    private double round(double v) {
        return Math.round(v * 10) / 10.0;
    }

    /** Adds one delivery per relaying gateway (one to three identical copies). */
    private void relay(List<GenericRecord> batch, GenericRecord r) {
        int copies = 1 + random.nextInt(3);
        for (int i = 0; i < copies; i++) {
            batch.add(r);
        }
    }

    private void generateReadings() {
        List<GenericRecord> day1 = new ArrayList<>();
        List<GenericRecord> day2 = new ArrayList<>();
        List<GenericRecord> late = new ArrayList<>();
        for (int c = 0; c < CONTAINERS; c++) {
            for (int no = 0; no < DAYS * READINGS_PER_DAY; no++) {
                int day = no / READINGS_PER_DAY;
                String gateway = GATEWAYS[(c + no / 24) % GATEWAYS.length];
                double celsius = round(setpoint(c) + random.nextGaussian() * 0.6);
                GenericRecord first = reading(c, no, 1, celsius, gateway, false);
                boolean shipOutOfCoverage = day == 0 && gateway.equals("gw-ship-marlin") && c % 4 == 0;
                List<GenericRecord> target = shipOutOfCoverage || day == 2 ? late : day == 0 ? day1 : day2;
                relay(target, first);
                double roll = random.nextDouble();
                if (roll < 0.03 && day < 2) {
                    // recalibrated after the fact: a higher sequence number, delivered with day 2's batch
                    relay(day2, reading(c, no, 2, round(celsius + 0.4), gateway, false));
                } else if (roll < 0.035 && day != 1) {
                    // retracted (a faulty probe): a tombstone that hides the reading
                    relay(late, reading(c, no, 3, celsius, gateway, true));
                }
            }
        }
        Collections.shuffle(day1, random);
        Collections.shuffle(day2, random);
        Collections.shuffle(late, random);
        readings.add(new Batch("readings-1-day1.jsonl", day1, List.of(
                "{\"container_id\": \"KWLU1000001\", \"reading_no\": 5, \"seq\": ",
                "{\"container_id\": \"KWLU1000038\", \"reading_no\": 7, \"seq\": \"two\", \"recorded_at\": "
                        + "\"2031-05-04T01:45:00Z\", \"celsius\": 2.1, \"gateway\": \"gw-quay-7\"}",
                "{\"container_id\": \"KWLU1000075\", \"reading_no\": 9, \"seq\": 1, \"recorded_at\": "
                        + "\"2031-05-04T02:15:00Z\", \"celsius\": 12.4, \"gateway\": \"gw-quay-7\", \"humidity\": 71}"),
                "day 1 as relayed by the gateways: most readings two or three times, in no particular order"));
        readings.add(new Batch("readings-2-day2.avro", day2, List.of(),
                "day 2, plus recalibrated day-1 readings (higher seq)"));
        readings.add(new Batch("readings-3-replay-day2.avro", day2, List.of(),
                "gateway gw-rail-fen restarts and replays its whole buffer: day 2 again"));
        readings.add(new Batch("readings-4-late.jsonl", late, List.of(
                "{\"reading_no\": 12, \"seq\": 1, \"recorded_at\": \"2031-05-06T03:00:00Z\", \"celsius\": -17.9, "
                        + "\"gateway\": \"gw-ship-marlin\"}"),
                "day 3, day-1 readings of the ship that was out of coverage, more recalibrations, retractions"));
    }

    private GenericRecord status(int c, Map<String, Long> clock, String state, double setpoint, String office, String note) {
        GenericRecord r = new GenericData.Record(STATUS);
        r.put("container_id", container(c));
        r.put("clock", new TreeMap<>(clock));
        r.put("state", state);
        r.put("setpoint_celsius", setpoint);
        r.put("edited_by", office);
        r.put("note", note);
        return r;
    }

    private void generateStatuses() {
        String[] states = {"booked", "loaded", "in-transit", "inspection", "released"};
        List<GenericRecord> first = new ArrayList<>();
        List<GenericRecord> second = new ArrayList<>();
        for (int c = 0; c < CONTAINERS; c++) {
            Map<String, Long> clock = new LinkedHashMap<>();
            List<GenericRecord> history = new ArrayList<>();
            int edits = 2 + random.nextInt(4);
            for (int e = 0; e < edits; e++) {
                String state = states[Math.min(e, states.length - 1)];
                if (random.nextDouble() < 0.3) {
                    // both offices edit from the same version without seeing each other's edit: concurrent
                    Map<String, Long> a = new LinkedHashMap<>(clock);
                    Map<String, Long> b = new LinkedHashMap<>(clock);
                    a.merge(OFFICES[0], 1L, Long::sum);
                    b.merge(OFFICES[1], 1L, Long::sum);
                    history.add(status(c, a, state, setpoint(c), OFFICES[0], "checked at the gate"));
                    history.add(status(c, b, state, setpoint(c) + 0.5, OFFICES[1], null));
                    if (e == edits - 1) {
                        break;
                    }
                    // a later edit that has seen both resolves them
                    Map<String, Long> seenBoth = new LinkedHashMap<>(a);
                    b.forEach((office, n) -> seenBoth.merge(office, n, Math::max));
                    clock = seenBoth;
                }
                String office = OFFICES[random.nextInt(OFFICES.length)];
                clock.merge(office, 1L, Long::sum);
                history.add(status(c, clock, state, setpoint(c), office, e == 0 ? "booked by " + office : null));
            }
            for (GenericRecord r : history) {
                // each edit is sent once or twice; early or late, in either batch
                relay(random.nextBoolean() ? first : second, r);
            }
        }
        Collections.shuffle(first, random);
        Collections.shuffle(second, random);
        statuses.add(new Batch("status-1.jsonl", first, List.of(
                "{\"container_id\": \"KWLU1000001\", \"clock\": \"inland:2\", \"state\": \"loaded\", "
                        + "\"setpoint_celsius\": -18.0, \"edited_by\": \"inland\"}"),
                "status edits from both offices, some concurrent, some sent twice"));
        statuses.add(new Batch("status-2.avro", second, List.of(), "the remaining edits, older ones among them"));
    }

    private void generateSummaries() {
        List<GenericRecord> first = new ArrayList<>();
        List<GenericRecord> second = new ArrayList<>();
        for (int c = 0; c < CONTAINERS; c++) {
            for (int day = 0; day < DAYS; day++) {
                long revision = 0;
                int parts = 1 + random.nextInt(3);
                for (int p = 0; p < parts; p++) {
                    revision++;
                    double max = round(setpoint(c) + 0.5 + random.nextDouble() * 2);
                    double min = round(setpoint(c) - 0.5 - random.nextDouble() * 2);
                    List<String> alarms = new ArrayList<>();
                    for (String a : ALARMS) {
                        if (random.nextDouble() < 0.15) {
                            alarms.add(a);
                        }
                    }
                    String note = random.nextDouble() < 0.3 ? "inspected, revision " + revision : null;
                    GenericRecord s = summary(c, day, revision, max, min, alarms, note, GATEWAYS[p]);
                    List<GenericRecord> target = random.nextBoolean() ? first : second;
                    relay(target, s);
                    if (random.nextDouble() < 0.05) {
                        // the gateway recomputes its maximum and re-sends under the same revision: a conflict
                        target.add(summary(c, day, revision, round(max + 1.1), min, alarms, note, GATEWAYS[p]));
                    }
                }
            }
        }
        Collections.shuffle(first, random);
        Collections.shuffle(second, random);
        summaries.add(new Batch("summaries-1.jsonl", first, List.of(), "partial daily summaries from each gateway"));
        summaries.add(new Batch("summaries-2.jsonl", second, List.of(), "the rest, some re-sent with a recomputed maximum"));
    }

    private GenericRecord summary(int c, int day, long revision, double max, double min, List<String> alarms, String note,
            String gateway) {
        GenericRecord r = new GenericData.Record(SUMMARY);
        r.put("container_id", container(c));
        r.put("day", FIRST_DAY.plusDays(day).toString());
        r.put("revision", revision);
        r.put("max_celsius", max);
        r.put("min_celsius", min);
        r.put("alarms", new ArrayList<>(alarms));
        r.put("inspector_note", note);
        r.put("reported_by", gateway);
        return r;
    }

    /** The day a reading belongs to, as the archive names its partition. */
    static String dayOf(long epochMillis) {
        return Instant.ofEpochMilli(epochMillis).atZone(ZoneOffset.UTC).toLocalDate().toString();
    }
}
