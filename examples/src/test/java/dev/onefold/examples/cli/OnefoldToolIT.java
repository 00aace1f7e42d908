package dev.onefold.examples.cli;

import static dev.onefold.examples.cli.Deliveries.readLines;
import static dev.onefold.examples.cli.Deliveries.writeText;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.avro.ContainerFiles;
import dev.onefold.internal.json.Json;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Map;
import java.util.stream.Stream;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The command line as users run it: each test starts {@code java -jar examples/target/onefold.jar} as a process
 * and checks its exit status, its stdout and stderr, and the files it writes. Expected records come from the
 * model in {@link Deliveries} (collect, keep the highest version, sort: common practice for last-writer). The
 * reports are parsed with core's JSON reader (a test may use internals; the tool itself does not).
 */
class OnefoldToolIT {
    @TempDir
    Path dir;
    Path schema;

    @BeforeEach
    void writeSchema() {
        schema = writeText(dir.resolve("event.avsc"), Deliveries.SCHEMA_TEXT);
    }

    private ToolProcess.Result onefold(String... args) {
        return ToolProcess.run(dir, args);
    }

    private static void assertFailsWithOneLine(ToolProcess.Result r, String... mustContain) {
        assertEquals(2, r.status(), () -> "exit status; stderr: " + r.err());
        assertEquals(1, r.errLines().size(), () -> "one line on stderr, got: " + r.err());
        for (String s : mustContain) {
            assertTrue(r.err().contains(s), () -> "stderr should name '" + s + "': " + r.err());
        }
    }

    @SuppressWarnings("unchecked")
    private static Map<String, Object> json(Path file) {
        return (Map<String, Object>) Json.parse(String.join("\n", readLines(file)), file.toString());
    }

    // ---- help and usage

    @Test
    void help_listsEveryCommandAndEachCommandHasItsOwnHelp() {
        ToolProcess.Result help = onefold("help");
        assertEquals(0, help.status());
        for (String c : List.of("dedupe", "apply", "export", "verify", "reconcile", "demo")) {
            assertTrue(help.out().contains(c), c);
        }
        ToolProcess.Result dedupe = onefold("dedupe", "--help");
        assertEquals(0, dedupe.status());
        assertTrue(dedupe.out().startsWith("usage: onefold dedupe --spec S.json --schema A.avsc --in FILE... --out FILE"));
        assertEquals("", dedupe.err());
    }

    @Test
    void usageErrors_exitTwoWithOneLineNamingTheProblem() {
        ToolProcess.Result none = onefold();
        assertEquals(2, none.status());
        assertTrue(none.err().contains("usage: java -jar onefold.jar COMMAND"));
        assertFailsWithOneLine(onefold("compact"), "unknown command 'compact'");
        assertFailsWithOneLine(onefold("dedupe", "--schema", "event.avsc", "--in", "a.jsonl", "--out", "o.jsonl", "--bogus", "1"),
                "unknown option --bogus");
        assertFailsWithOneLine(onefold("dedupe", "--schema", "event.avsc", "--in", "a.jsonl"), "missing --out");
        assertFailsWithOneLine(onefold("verify", "--archive"), "option --archive needs a value");
        assertFailsWithOneLine(onefold("export", "--archive", "a", "--out", "o.jsonl", "--version", "latest"),
                "--version must be a whole number");
    }

    // ---- dedupe

    @Test
    void dedupe_jsonLinesMatchesTheModelAndRejectsBadLinesWithFileLineAndReason() {
        List<GenericRecord> first = Deliveries.generate(1, 0, 300);
        List<GenericRecord> second = Deliveries.generate(2, 200, 500);
        Path a = Deliveries.writeJsonLines(dir.resolve("a.jsonl"), first, List.of(
                "{\"id\": \"k1\", \"n\": 1, \"ver\": ",
                "{\"id\": \"k1\", \"n\": 1, \"ver\": \"seven\", \"at\": 0, \"value\": 1.0}"));
        Path b = Deliveries.writeJsonLines(dir.resolve("b.jsonl"), second, List.of(
                "{\"id\": \"k1\", \"n\": 1, \"ver\": 1, \"at\": 0, \"value\": 1.0, \"colour\": \"red\"}",
                "{\"n\": 1, \"ver\": 1, \"at\": 0, \"value\": 1.0}"));

        ToolProcess.Result r = onefold("dedupe", "--schema", "event.avsc", "--in", "a.jsonl", "b.jsonl", "--out", "out.jsonl",
                "--rejects", "rejects.jsonl", "--report", "report.json");

        assertEquals(0, r.status(), r::err);
        assertEquals("", r.err(), "no progress or noise on stderr when it is not a terminal");
        List<GenericRecord> all = new ArrayList<>(first);
        all.addAll(second);
        assertEquals(Deliveries.lines(Deliveries.expected(all)), readLines(dir.resolve("out.jsonl")));

        List<String> rejects = readLines(dir.resolve("rejects.jsonl"));
        assertEquals(4, rejects.size());
        // the bad lines were inserted at 0-based positions 3 and 8 of each file, so they are lines 4 and 9
        Object[][] expected = {{a, 4L, "invalid JSON"}, {a, 9L, "ver"}, {b, 4L, "colour"}, {b, 9L, "id"}};
        for (int i = 0; i < 4; i++) {
            @SuppressWarnings("unchecked")
            Map<String, Object> line = (Map<String, Object>) Json.parse(rejects.get(i), "rejects line " + (i + 1));
            assertEquals(dir.relativize((Path) expected[i][0]).toString(), line.get("file"));
            assertEquals(expected[i][1], line.get("line"));
            String reason = (String) line.get("reason");
            assertTrue(reason.contains("line " + expected[i][1]) && reason.contains((String) expected[i][2]), reason);
            assertTrue(line.get("record") instanceof String, "the raw line is kept");
        }

        Map<String, Object> report = json(dir.resolve("report.json"));
        for (String key : List.of("in", "accepted", "duplicates", "superseded", "conflicts", "tombstones", "rejected", "out")) {
            assertTrue(report.containsKey(key), key);
        }
        assertEquals((long) all.size() + 4, report.get("in"));
        assertEquals((long) all.size(), report.get("accepted"));
        assertEquals(4L, report.get("rejected"));
        assertEquals((long) Deliveries.expected(all).size(), report.get("out"));
    }

    @Test
    void dedupe_avroInAndOutWithEachCompression_givesTheSameRecords() {
        List<GenericRecord> in = Deliveries.generate(3, 0, 400);
        Deliveries.writeAvro(dir.resolve("in.avro"), in, ContainerFiles.Compression.DEFLATE);
        Deliveries.writeText(dir.resolve("spec.json"), Deliveries.SPEC_TEXT);
        List<GenericRecord> expected = Deliveries.expected(in);

        ToolProcess.Result zstd = onefold("dedupe", "--spec", "spec.json", "--schema", "event.avsc", "--in", "in.avro", "--out",
                "out-zstd.avro", "--compression", "zstd");
        assertEquals(0, zstd.status(), zstd::err);
        assertEquals(Deliveries.lines(expected), Deliveries.lines(Deliveries.readAvro(dir.resolve("out-zstd.avro"))));
        // "zstandard" is the codec name the Avro specification gives Zstandard blocks (from memory)
        try (ContainerFiles.Reader r = ContainerFiles.open(dir.resolve("out-zstd.avro"), Deliveries.SCHEMA)) {
            assertEquals("zstandard", r.codecName());
        }

        ToolProcess.Result snappy = onefold("dedupe", "--schema", "event.avsc", "--in", "in.avro", "--out", "out-snappy.avro",
                "--compression", "snappy");
        assertEquals(0, snappy.status(), snappy::err);
        assertEquals(Deliveries.lines(expected), Deliveries.lines(Deliveries.readAvro(dir.resolve("out-snappy.avro"))));
    }

    // ---- errors that stop a run: status 2, one line naming the file (and line and field where it applies)

    @Test
    void dedupe_missingOrUnknownInput_exitsTwoAndWritesNoOutput() {
        assertFailsWithOneLine(onefold("dedupe", "--schema", "event.avsc", "--in", "nowhere.jsonl", "--out", "out.jsonl"),
                "nowhere.jsonl", "no such file");
        writeText(dir.resolve("in.csv"), "id,n\n");
        assertFailsWithOneLine(onefold("dedupe", "--schema", "event.avsc", "--in", "in.csv", "--out", "out.jsonl"), "in.csv",
                ".jsonl");
        assertFalse(Files.exists(dir.resolve("out.jsonl")));
    }

    @Test
    void dedupe_invalidSpecOrSchema_exitsTwoNamingFileLineAndField() {
        Deliveries.writeJsonLines(dir.resolve("in.jsonl"), Deliveries.generate(4, 0, 10), List.of());
        writeText(dir.resolve("broken.json"), "{\"key\": [\"id\"],\n \"merge\": {\"policy\": \"last-writer\",, }}");
        assertFailsWithOneLine(onefold("dedupe", "--spec", "broken.json", "--schema", "event.avsc", "--in", "in.jsonl", "--out",
                "o.jsonl"), "broken.json", "line 2");
        writeText(dir.resolve("wrong-field.json"), "{\"key\": [\"id\", \"n\"], \"merge\": {\"policy\": \"last-writer\", "
                + "\"version\": \"revision\"}}");
        assertFailsWithOneLine(onefold("dedupe", "--spec", "wrong-field.json", "--schema", "event.avsc", "--in", "in.jsonl",
                "--out", "o.jsonl"), "wrong-field.json", "revision");
        writeText(dir.resolve("broken.avsc"), "{\"type\": \"record\", \"name\": \"E\", \"fields\": [{\"name\": \"id\"}]}");
        assertFailsWithOneLine(onefold("dedupe", "--schema", "broken.avsc", "--in", "in.jsonl", "--out", "o.jsonl"),
                "broken.avsc");
        assertFalse(Files.exists(dir.resolve("o.jsonl")));
    }

    @Test
    void dedupe_unreadableInputFile_exitsTwoNamingFileAndLine() throws IOException {
        byte[] notUtf8 = {'{', '"', 'i', 'd', '"', ':', '"', (byte) 0xC3, (byte) 0x28, '"', '}', '\n'};
        Files.write(dir.resolve("latin.jsonl"), notUtf8);
        assertFailsWithOneLine(onefold("dedupe", "--schema", "event.avsc", "--in", "latin.jsonl", "--out", "o.jsonl"),
                "latin.jsonl line 1", "UTF-8");
        Files.write(dir.resolve("junk.avro"), "Obj\u0001 not really".getBytes(StandardCharsets.UTF_8));
        assertFailsWithOneLine(onefold("dedupe", "--schema", "event.avsc", "--in", "junk.avro", "--out", "o.jsonl"),
                "junk.avro");
        assertFalse(Files.exists(dir.resolve("o.jsonl")));
    }

    // ---- apply, export, verify, reconcile

    @Test
    void apply_batchByBatchThenExport_equalsDedupeOfEverythingAndReportsTheArchiveSide() {
        List<GenericRecord> first = Deliveries.generate(5, 0, 600);
        List<GenericRecord> second = Deliveries.generate(6, 500, 700);
        Deliveries.writeJsonLines(dir.resolve("b1.jsonl"), first, List.of("not json"));
        Deliveries.writeAvro(dir.resolve("b2.avro"), second, ContainerFiles.Compression.SNAPPY);

        ToolProcess.Result one = onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "b1.jsonl", "--report",
                "r1.json", "--rejects", "x1.jsonl");
        assertEquals(0, one.status(), one::err);
        Map<String, Object> r1 = json(dir.resolve("r1.json"));
        assertEquals(1L, r1.get("rejected"));
        assertEquals(3L, r1.get("partitions_touched"), "the first batch spans three days");
        assertTrue((long) r1.get("chunks_written") >= 3);
        assertEquals(1, readLines(dir.resolve("x1.jsonl")).size());

        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "b2.avro", "--report",
                "r2.json").status());
        ToolProcess.Result again = onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "b2.avro", "--report",
                "r3.json");
        assertEquals(0, again.status(), again::err);
        Map<String, Object> r3 = json(dir.resolve("r3.json"));
        assertEquals(0L, r3.get("partitions_touched"), "applying a batch again changes nothing");
        assertEquals(0L, r3.get("chunks_written"));
        assertEquals(json(dir.resolve("r2.json")).get("version"), r3.get("version"));

        // promise 1 (DESIGN.md): B1 then B2 gives what B1 and B2 together give
        assertEquals(0, onefold("dedupe", "--schema", "event.avsc", "--in", "b1.jsonl", "b2.avro", "--out", "both.jsonl").status());
        assertEquals(0, onefold("export", "--archive", "arch", "--out", "export.jsonl").status());
        List<GenericRecord> all = new ArrayList<>(first);
        all.addAll(second);
        assertEquals(Deliveries.lines(Deliveries.expected(all)), readLines(dir.resolve("export.jsonl")));
        assertEquals(readLines(dir.resolve("both.jsonl")), readLines(dir.resolve("export.jsonl")));

        assertEquals(0, onefold("export", "--archive", "arch", "--version", "1", "--out", "v1.jsonl").status());
        assertEquals(Deliveries.lines(Deliveries.expected(first)), readLines(dir.resolve("v1.jsonl")));
        String day1 = java.time.Instant.ofEpochMilli(Deliveries.DAY0 + 86_400_000L).toString().substring(0, 10);
        assertEquals(0, onefold("export", "--archive", "arch", "--partition", day1, "--out", "day1.avro").status());
        assertEquals(Deliveries.lines(Deliveries.expected(all).stream()
                .filter(r -> (long) r.get("at") / 86_400_000L == Deliveries.DAY0 / 86_400_000L + 1).toList()),
                Deliveries.lines(Deliveries.readAvro(dir.resolve("day1.avro"))));

        ToolProcess.Result verify = onefold("verify", "--archive", "arch");
        assertEquals(0, verify.status(), verify::out);
        assertTrue(verify.out().startsWith("verify: ok"), verify.out());
    }

    @Test
    void reconcile_agreesWithAnExportAndNamesTheKeyOfATamperedCopy() {
        List<GenericRecord> in = Deliveries.generate(7, 0, 300);
        Deliveries.writeJsonLines(dir.resolve("in.jsonl"), in, List.of());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "in.jsonl").status());
        List<GenericRecord> expected = Deliveries.expected(in);
        Deliveries.writeJsonLines(dir.resolve("copy.jsonl"), expected, List.of());

        ToolProcess.Result agree = onefold("reconcile", "--schema", "event.avsc", "--left", "arch", "--right", "copy.jsonl",
                "--report", "agree.json");
        assertEquals(0, agree.status(), agree::out);
        assertEquals("agree", json(dir.resolve("agree.json")).get("status"));

        ToolProcess.Result raw = onefold("reconcile", "--schema", "event.avsc", "--left", "arch", "--right", "in.jsonl",
                "--deliveries", "right");
        assertEquals(0, raw.status(), () -> "raw deliveries fold to the archive's content: " + raw.out());

        GenericRecord changed = expected.get(17);
        changed.put("value", (double) changed.get("value") + 0.25);
        Deliveries.writeJsonLines(dir.resolve("tampered.jsonl"), expected, List.of());
        ToolProcess.Result differ = onefold("reconcile", "--schema", "event.avsc", "--left", "arch", "--right", "tampered.jsonl",
                "--report", "differ.json");
        assertEquals(1, differ.status(), differ::out);
        assertEquals("disagree", json(dir.resolve("differ.json")).get("status"));
        assertTrue(differ.out().contains("\"id\":\"" + changed.get("id") + "\",\"n\":" + changed.get("n")), differ.out());
    }

    @Test
    void reconcile_archiveAgainstArchiveAndAgainstFile_agreeOnEqualContentAndNameTheOneDifferingKey() throws IOException {
        List<GenericRecord> in = Deliveries.generate(11, 0, 400);
        Deliveries.writeJsonLines(dir.resolve("all.jsonl"), in, List.of());
        List<GenericRecord> reversed = new ArrayList<>(in);
        Collections.reverse(reversed);
        int half = reversed.size() / 2;
        Deliveries.writeAvro(dir.resolve("b1.avro"), reversed.subList(0, half), ContainerFiles.Compression.SNAPPY);
        Deliveries.writeJsonLines(dir.resolve("b2.jsonl"), reversed.subList(half, reversed.size()), List.of());
        // the same deliveries reach archive a in one batch and archive b reversed, in two batches of two formats
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "a", "--in", "all.jsonl").status());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "b", "--in", "b1.avro").status());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "b", "--in", "b2.jsonl").status());
        List<GenericRecord> expected = Deliveries.expected(in);
        Deliveries.writeJsonLines(dir.resolve("copy.jsonl"), expected, List.of());

        // archive sides are digested from their manifests: with a's chunk files moved away it still agrees with b
        Path chunks = dir.resolve("a").resolve("chunks");
        Files.move(chunks, dir.resolve("a-chunks"));
        ToolProcess.Result archives = onefold("reconcile", "--left", "a", "--right", "b", "--report", "aa.json");
        Files.move(dir.resolve("a-chunks"), chunks);
        assertEquals(0, archives.status(), () -> archives.out() + archives.err());
        ToolProcess.Result withFile = onefold("reconcile", "--schema", "event.avsc", "--left", "b", "--right", "copy.jsonl",
                "--report", "bf.json");
        assertEquals(0, withFile.status(), withFile::out);
        Map<String, Object> aa = json(dir.resolve("aa.json"));
        Map<String, Object> bf = json(dir.resolve("bf.json"));
        assertEquals("agree", aa.get("status"));
        assertEquals("agree", bf.get("status"));
        assertEquals(side(aa, "right").get("digest"), side(bf, "left").get("digest"), "archive b digested the same both times");
        assertEquals(side(aa, "left").get("digest"), side(bf, "right").get("digest"),
                "archive a's manifest digests equal the digests of a file holding the model's records");

        // one key gets a newer version in archive b and in a copy of the file; archive a keeps the old one
        GenericRecord old = expected.get(23);
        GenericRecord newer = new GenericData.Record(Deliveries.SCHEMA);
        old.getSchema().getFields().forEach(f -> newer.put(f.name(), old.get(f.name())));
        newer.put("ver", (long) old.get("ver") + 1);
        newer.put("value", (double) old.get("value") + 0.25);
        Deliveries.writeJsonLines(dir.resolve("newer.jsonl"), List.of(newer), List.of());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "b", "--in", "newer.jsonl").status());
        List<GenericRecord> tampered = new ArrayList<>(expected);
        tampered.set(23, newer);
        Deliveries.writeJsonLines(dir.resolve("tampered.jsonl"), tampered, List.of());
        Map<String, Object> changedKey = Map.of("id", old.get("id").toString(), "n", (long) (int) old.get("n"));

        ToolProcess.Result differ = onefold("reconcile", "--left", "a", "--right", "b", "--report", "ab.json");
        assertEquals(1, differ.status(), differ::out);
        assertTrue(differ.out().contains("\"id\":\"" + old.get("id") + "\",\"n\":" + old.get("n")), differ.out());
        assertEquals(Map.of("content_differs", List.of(changedKey)), differingKeys(json(dir.resolve("ab.json"))));
        ToolProcess.Result differFile = onefold("reconcile", "--schema", "event.avsc", "--left", "a", "--right",
                "tampered.jsonl", "--report", "af.json");
        assertEquals(1, differFile.status(), differFile::out);
        assertEquals(Map.of("content_differs", List.of(changedKey)), differingKeys(json(dir.resolve("af.json"))));
        ToolProcess.Result sameChange = onefold("reconcile", "--schema", "event.avsc", "--left", "b", "--right",
                "tampered.jsonl");
        assertEquals(0, sameChange.status(), () -> "archive b and the tampered file hold the same change: " + sameChange.out());
    }

    @SuppressWarnings("unchecked")
    private static Map<String, Object> side(Map<String, Object> report, String side) {
        return (Map<String, Object>) report.get(side);
    }

    /** The keys a report's drill-downs name, by kind (missing_left, missing_right, content_differs); empty kinds left out. */
    @SuppressWarnings("unchecked")
    private static Map<String, List<Object>> differingKeys(Map<String, Object> report) {
        Map<String, List<Object>> out = new java.util.TreeMap<>();
        for (Object p : (List<Object>) report.get("partitions")) {
            Map<String, Object> drillDown = (Map<String, Object>) ((Map<String, Object>) p).get("drill_down");
            if (drillDown == null) {
                continue;
            }
            for (String kind : List.of("missing_left", "missing_right", "content_differs")) {
                for (Object k : (List<Object>) ((Map<String, Object>) drillDown.get(kind)).get("keys")) {
                    out.computeIfAbsent(kind, x -> new ArrayList<>()).add(((Map<String, Object>) k).get("key"));
                }
            }
        }
        return out;
    }

    @Test
    void verify_damagedChunk_exitsOneNamingTheFile() throws IOException {
        Deliveries.writeJsonLines(dir.resolve("in.jsonl"), Deliveries.generate(8, 0, 200), List.of());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "in.jsonl").status());
        Path chunk;
        try (Stream<Path> files = Files.walk(dir.resolve("arch").resolve("chunks"))) {
            chunk = files.filter(Files::isRegularFile).sorted().findFirst().orElseThrow();
        }
        byte[] bytes = Files.readAllBytes(chunk);
        bytes[bytes.length / 2] ^= 0x5A;
        Files.write(chunk, bytes);

        ToolProcess.Result r = onefold("verify", "--archive", "arch");
        assertEquals(1, r.status(), r::out);
        assertTrue(r.out().contains("problem: ") && r.out().contains(chunk.getFileName().toString()), r.out());
    }

    @Test
    void export_errors_exitTwoNamingWhatIsMissing() throws IOException {
        Files.createDirectories(dir.resolve("empty"));
        assertFailsWithOneLine(onefold("export", "--archive", "empty", "--out", "o.jsonl"), "empty", "not an archive");
        Deliveries.writeJsonLines(dir.resolve("in.jsonl"), Deliveries.generate(9, 0, 30), List.of());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "in.jsonl").status());
        assertFailsWithOneLine(onefold("export", "--archive", "arch", "--partition", "1999-01-01", "--out", "o.jsonl"),
                "no partition '1999-01-01'");
        assertFailsWithOneLine(onefold("export", "--archive", "arch", "--version", "99", "--out", "o.jsonl"), "99");
    }

    // ---- schema versions

    @Test
    void apply_newerCompatibleSchemaIsRegistered_incompatibleOneOrAnotherSpecIsRefused() {
        Deliveries.writeJsonLines(dir.resolve("v1.jsonl"), Deliveries.generate(10, 0, 50), List.of());
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "v1.jsonl").status());

        String v2 = Deliveries.SCHEMA_TEXT.replace("{\"name\": \"deleted\"",
                "{\"name\": \"note\", \"type\": [\"null\", \"string\"], \"default\": null},\n  {\"name\": \"deleted\"");
        writeText(dir.resolve("event-v2.avsc"), v2);
        writeText(dir.resolve("v2.jsonl"), "{\"id\": \"z\", \"n\": 0, \"ver\": 1, \"at\": \"2030-03-17T08:00:00Z\", "
                + "\"value\": 1.5, \"note\": \"added in v2\"}\n");
        ToolProcess.Result two = onefold("apply", "--schema", "event-v2.avsc", "--archive", "arch", "--in", "v2.jsonl");
        assertEquals(0, two.status(), two::err);
        // records written under v1 are still accepted, resolved to v2 (the note takes its default)
        assertEquals(0, onefold("apply", "--schema", "event.avsc", "--archive", "arch", "--in", "v1.jsonl").status());
        assertEquals(0, onefold("export", "--archive", "arch", "--out", "all.jsonl").status());
        List<String> exported = readLines(dir.resolve("all.jsonl"));
        assertTrue(exported.stream().anyMatch(l -> l.contains("\"note\":\"added in v2\"")));
        assertTrue(exported.stream().anyMatch(l -> l.contains("\"note\":null")));

        writeText(dir.resolve("event-bad.avsc"), Deliveries.SCHEMA_TEXT.replace("{\"name\": \"value\", \"type\": \"double\"}",
                "{\"name\": \"value\", \"type\": \"string\"}"));
        // Avro's compatibility checker names the field by its position: value is field 4
        assertFailsWithOneLine(onefold("apply", "--schema", "event-bad.avsc", "--archive", "arch", "--in", "v1.jsonl"),
                "event-bad.avsc", "/fields/4", "cannot read version 1");

        String withoutSpec = Deliveries.SCHEMA_TEXT.substring(0, Deliveries.SCHEMA_TEXT.indexOf("\"onefold\"")).strip();
        writeText(dir.resolve("plain.avsc"), withoutSpec.substring(0, withoutSpec.length() - 1) + "}");
        writeText(dir.resolve("other-spec.json"), Deliveries.SPEC_TEXT.replace("\"order\": [\"at\"], ", ""));
        assertFailsWithOneLine(onefold("apply", "--spec", "other-spec.json", "--schema", "plain.avsc", "--archive", "arch",
                "--in", "v1.jsonl"), "other-spec.json", "differs from the given spec");
    }
}
