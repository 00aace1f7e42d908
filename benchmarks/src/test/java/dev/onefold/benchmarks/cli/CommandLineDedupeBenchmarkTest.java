package dev.onefold.benchmarks.cli;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.avro.JsonLines;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import org.apache.avro.generic.GenericRecord;
import org.junit.jupiter.api.Assumptions;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Sanity of question 7 on tiny data: the generated input is the tool's format with the stated shape, and (when
 * the tool's jar has been built) one benchmark call runs the tool and gets one line per key back.
 */
class CommandLineDedupeBenchmarkTest {
    /** Tests run in the module directory; the tool's jar is built by the examples module. */
    static final String JAR = "../examples/target/onefold.jar";

    @Test
    void writeInput_isDeterministicJsonLinesWithOneFifthExtraDeliveries(@TempDir Path dir) throws IOException {
        Path a = dir.resolve("a.jsonl");
        Path b = dir.resolve("b.jsonl");
        int keys = CommandLineDedupeBenchmark.writeInput(a, 5_000, CommandLineDedupeBenchmark.SEED);
        CommandLineDedupeBenchmark.writeInput(b, 5_000, CommandLineDedupeBenchmark.SEED);
        assertEquals(Files.readString(a), Files.readString(b), "a fixed seed gives the same file");
        List<String> lines = Files.readAllLines(a, StandardCharsets.UTF_8);
        assertEquals(5_000, lines.size());
        assertEquals(4_000, keys);
        JsonLines json = JsonLines.of(CommandLineDedupeBenchmark.SCHEMA);
        Map<String, Long> highest = new HashMap<>();
        for (int i = 0; i < lines.size(); i++) {
            GenericRecord r = json.parse(lines.get(i), "line " + (i + 1));
            highest.merge(r.get("id").toString(), (Long) r.get("ver"), Math::max);
        }
        assertEquals(keys, highest.size(), "every key appears");
        assertTrue(highest.values().stream().anyMatch(v -> v > 1), "some keys have newer versions");
    }

    @Test
    void setUp_missingJarNamesItAndTheBuildCommand() {
        CommandLineDedupeBenchmark bench = new CommandLineDedupeBenchmark();
        bench.lines = 10;
        bench.jar = "no/such/onefold.jar";
        IllegalStateException e = assertThrows(IllegalStateException.class, bench::setUp);
        assertTrue(e.getMessage().contains("no/such/onefold.jar") && e.getMessage().contains("mvn"), e.getMessage());
    }

    @Test
    void dedupe_runsTheToolEndToEnd() throws Exception {
        Assumptions.assumeTrue(Files.isRegularFile(Path.of(JAR)),
                JAR + " is built by the examples module's package phase, which runs after this module");
        CommandLineDedupeBenchmark bench = new CommandLineDedupeBenchmark();
        bench.lines = 2_000;
        bench.jar = JAR;
        bench.setUp();
        try {
            assertTrue(bench.dedupe() > 0);
            List<String> out = Files.readAllLines(bench.dir.resolve("out.jsonl"), StandardCharsets.UTF_8);
            assertEquals(bench.distinctKeys, out.size(), "one line per key");
        } finally {
            bench.delete();
        }
        assertFalse(Files.exists(bench.dir));
    }
}
