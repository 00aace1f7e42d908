package dev.onefold.benchmarks.cli;

import dev.onefold.avro.JsonLines;
import java.io.BufferedWriter;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Collections;
import java.util.Comparator;
import java.util.List;
import java.util.Random;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import org.apache.avro.Schema;
import org.apache.avro.generic.GenericData;
import org.apache.avro.generic.GenericRecord;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Measurement;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.TearDown;
import org.openjdk.jmh.annotations.Warmup;

/**
 * Question 7: the command-line tool end to end. One call starts {@code java -jar <jar> dedupe} as a separate
 * process on a JSON lines file of {@code lines} lines and waits for it to finish, so the score includes JVM
 * start, parsing, deduplication, ordering and writing the output and the report, as a user sees it.
 *
 * <p>Set-up, not timed: the input is generated once per trial with a fixed seed (about 100-byte lines; 80% of
 * the lines are the first version of a key, the rest newer versions or repeated deliveries, shuffled), written
 * through {@link JsonLines} so it is the tool's own input format. Every call checks that the tool exited 0 and
 * wrote a report. Records per second is {@code lines / time of one call}.
 *
 * <p>Run: {@code java -jar benchmarks/target/benchmarks.jar CommandLineDedupeBenchmark -p jar=examples/target/onefold.jar}
 * (the jar is built by {@code mvn -B -q -DskipTests package}). Not thread-safe; one call at a time.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.SingleShotTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Fork(1)
@Warmup(iterations = 1)
@Measurement(iterations = 3)
public class CommandLineDedupeBenchmark {
    static final String SCHEMA_TEXT = """
            {"type": "record", "name": "Reading", "namespace": "bench.cli", "fields": [
              {"name": "id", "type": "string"},
              {"name": "ver", "type": "long"},
              {"name": "at", "type": {"type": "long", "logicalType": "timestamp-millis"}},
              {"name": "value", "type": "double"},
              {"name": "note", "type": ["null", "string"], "default": null}]}""";
    static final String SPEC_TEXT = """
            {"key": ["id"], "order": ["at"], "partition": {"field": "at", "unit": "day"},
             "merge": {"policy": "last-writer", "version": "ver"}}""";
    static final Schema SCHEMA = new Schema.Parser().parse(SCHEMA_TEXT);
    /** 2024-02-29T00:00Z in epoch millis. */
    static final long DAY0 = 1_709_164_800_000L;
    static final long SEED = 20_241_202L;

    /** Lines in the input file. */
    @Param({"1000000"})
    public int lines;

    /** The tool's executable jar, relative to the directory the benchmark runs in. */
    @Param({"examples/target/onefold.jar"})
    public String jar;

    Path dir;
    Path input;
    int distinctKeys;

    @Setup(Level.Trial)
    public void setUp() throws IOException {
        if (!Files.isRegularFile(Path.of(jar))) {
            throw new IllegalStateException(jar + " does not exist: build it first (mvn -B -q -DskipTests package)");
        }
        dir = Files.createTempDirectory("onefold-cli-bench-");
        Files.writeString(dir.resolve("spec.json"), SPEC_TEXT, StandardCharsets.UTF_8);
        Files.writeString(dir.resolve("schema.avsc"), SCHEMA_TEXT, StandardCharsets.UTF_8);
        input = dir.resolve("input.jsonl");
        long started = System.nanoTime();
        distinctKeys = writeInput(input, lines, SEED);
        System.out.printf("%nsetup: wrote %,d lines (%,d keys, %,d bytes) in %.1f s%n", lines, distinctKeys,
                Files.size(input), (System.nanoTime() - started) / 1e9);
    }

    /**
     * Writes {@code lines} shuffled lines: 80% first versions of distinct keys, the rest newer versions of
     * earlier keys or repeated deliveries. Returns the number of distinct keys.
     */
    static int writeInput(Path file, int lines, long seed) throws IOException {
        Random random = new Random(seed);
        int keys = Math.max(1, lines * 4 / 5);
        List<GenericRecord> records = new ArrayList<>(lines);
        for (int k = 0; k < keys; k++) {
            records.add(reading(k, 1));
        }
        while (records.size() < lines) {
            GenericRecord earlier = records.get(random.nextInt(records.size()));
            boolean newer = random.nextBoolean();
            int key = Integer.parseInt(((CharSequence) earlier.get("id")).toString().substring(1));
            records.add(newer ? reading(key, (Long) earlier.get("ver") + 1) : earlier);
        }
        Collections.shuffle(records, random);
        JsonLines json = JsonLines.of(SCHEMA);
        try (BufferedWriter w = Files.newBufferedWriter(file, StandardCharsets.UTF_8)) {
            for (GenericRecord r : records) {
                w.write(json.write(r));
                w.write('\n');
            }
        }
        return keys;
    }

    /** Content is a function of (key, version): equal versions are equal records. */
    static GenericRecord reading(int key, long version) {
        GenericRecord r = new GenericData.Record(SCHEMA);
        r.put("id", "k" + key);
        r.put("ver", version);
        r.put("at", DAY0 + (key % 7) * 86_400_000L + key * 10L + version);
        r.put("value", key * 0.25 + version);
        r.put("note", key % 3 == 0 ? null : "reading " + key);
        return r;
    }

    /** One end-to-end run of {@code dedupe}; returns the output's size in bytes. */
    @Benchmark
    public long dedupe() throws IOException, InterruptedException {
        Path out = dir.resolve("out.jsonl");
        Path report = dir.resolve("report.json");
        Files.deleteIfExists(out);
        Files.deleteIfExists(report);
        Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(), "-jar", jar,
                "dedupe", "--spec", dir.resolve("spec.json").toString(), "--schema", dir.resolve("schema.avsc").toString(),
                "--in", input.toString(), "--out", out.toString(), "--report", report.toString())
                .redirectErrorStream(true).redirectOutput(dir.resolve("tool.log").toFile()).start();
        int exit = p.waitFor();
        if (exit != 0 || !Files.exists(report)) {
            throw new IllegalStateException("dedupe exited " + exit + ": " + Files.readString(dir.resolve("tool.log")));
        }
        return Files.size(out);
    }

    @TearDown(Level.Trial)
    public void delete() {
        try (Stream<Path> walk = Files.walk(dir)) {
            for (Path p : walk.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(p);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
