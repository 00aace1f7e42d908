package dev.onefold;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.Iterator;
import java.util.List;
import java.util.NoSuchElementException;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * DESIGN.md promise 5 (bounded memory): a batch far larger than the memory budget, and larger than the heap
 * itself, spills sorted runs and merges them; spill files are removed on success and on failure.
 */
class SpillTest {
    static final RowSchema SCHEMA = RowSchema.builder("reading")
            .field("id", FieldType.int64())
            .field("seq", FieldType.int64())
            .field("at", FieldType.timestampMillis())
            .field("payload", FieldType.string())
            .build();
    static final DatasetSpec SPEC = DatasetSpec.builder().key("id").orderBy("at").lastWriter("seq").build();

    /** Generates records lazily: n records over n/2 keys, two versions each, ~120 bytes of payload. */
    static Iterator<Row> generate(long n) {
        return new Iterator<>() {
            long i;
            final String pad = "x".repeat(100);

            @Override
            public boolean hasNext() {
                return i < n;
            }

            @Override
            public Row next() {
                if (i >= n) {
                    throw new NoSuchElementException();
                }
                long id = (i * 7919) % (n / 2);
                long seq = i / (n / 2);
                i++;
                return Row.of(SCHEMA, id, seq, 1_700_000_000_000L + (id * 31) % 100_000, pad + id);
            }
        };
    }

    /** Child-JVM entry point: dedupes {@code args[0]} records under a {@code args[1]}-byte budget into {@code args[2]}. */
    public static void main(String[] args) throws IOException {
        long n = Long.parseLong(args[0]);
        long budget = Long.parseLong(args[1]);
        Path spill = Path.of(args[2]);
        BatchEngine<Row> engine = BatchEngine.builder(SPEC, RecordAccess.rows(SCHEMA)).memoryBudgetBytes(budget)
                .spillDirectory(spill).build();
        BoundDataset ds = BoundDataset.bind(SPEC, SCHEMA);
        byte[][] last = {null};
        long[] out = {0};
        BatchReport r = engine.dedupe(generate(n), "generated", row -> {
            byte[] order = ds.order(row);
            if (last[0] != null && Arrays.compareUnsigned(last[0], order) >= 0) {
                throw new IllegalStateException("output not strictly ordered at record " + out[0]);
            }
            if ((Long) row.get("seq") != 1L) {
                throw new IllegalStateException("an old version survived: " + row.get("id"));
            }
            last[0] = order;
            out[0]++;
        }, rej -> {
            throw new IllegalStateException("unexpected rejection " + rej);
        });
        long heapMax = Runtime.getRuntime().maxMemory();
        System.out.println("out=" + out[0] + " report.out=" + r.out() + " superseded=" + r.superseded() + " runs="
                + r.spilledRuns() + " heapMax=" + heapMax);
    }

    @Test
    void dedupe_batchOfTenTimesBudgetInSmallHeapJvm(@TempDir Path spill) throws Exception {
        long n = 400_000; // about 100 MB of rows in memory: more than the child's whole heap
        long budget = 4L << 20;
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        Process p = new ProcessBuilder(java, "-Xmx64m", "-cp", System.getProperty("java.class.path"),
                SpillTest.class.getName(), Long.toString(n), Long.toString(budget), spill.toString())
                .redirectErrorStream(true).start();
        String output = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(5, TimeUnit.MINUTES), "child JVM finished");
        assertEquals(0, p.exitValue(), output);
        assertTrue(output.contains("out=200000 report.out=200000 superseded=200000"), output);
        int runs = Integer.parseInt(output.replaceAll("(?s).*runs=(\\d+).*", "$1"));
        assertTrue(runs >= 10, "at least 10 spilled runs for a batch of >= 10x the budget: " + output);
        try (Stream<Path> left = Files.list(spill)) {
            assertEquals(List.of(), left.toList(), "spill files removed");
        }
    }

    @Test
    void dedupe_spillFilesRemovedWhenTheCallerFails(@TempDir Path spill) throws IOException {
        BatchEngine<Row> engine = BatchEngine.builder(SPEC, RecordAccess.rows(SCHEMA)).memoryBudgetBytes(64 << 10)
                .spillDirectory(spill).build();
        long[] seen = {0};
        IllegalStateException e = assertThrows(IllegalStateException.class, () -> engine.dedupe(generate(20_000), "g", row -> {
            if (++seen[0] == 100) {
                throw new IllegalStateException("sink failed");
            }
        }, rej -> { }));
        assertEquals("sink failed", e.getMessage());
        try (Stream<Path> left = Files.list(spill)) {
            assertEquals(List.of(), left.toList(), "spill files removed after a failure");
        }
    }
}
