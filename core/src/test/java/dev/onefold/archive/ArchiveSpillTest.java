package dev.onefold.archive;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.internal.engine.BoundDataset;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
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
 * DESIGN.md promise 5 (bounded memory) for the archive: a batch of many times the memory budget, larger than the
 * whole heap of the JVM applying it, is folded, grouped by partition and applied in slices, and the archive it
 * leaves holds exactly the model's survivors.
 */
class ArchiveSpillTest {
    static final RowSchema SCHEMA = RowSchema.builder("reading")
            .field("id", FieldType.int64())
            .field("seq", FieldType.int64())
            .field("at", FieldType.timestampMillis())
            .field("payload", FieldType.string())
            .build();
    /** 2024-02-29T00:00Z in epoch millis (java.time, REFERENCES.md section 7 table). */
    static final long DAY0 = 1_709_164_800_000L;
    static final int HOURS = 200;

    static DatasetSpec spec(boolean stable) {
        return DatasetSpec.builder().key("id").orderBy("at").lastWriter("seq")
                .partition(new DatasetSpec.TimeBucket("at", DatasetSpec.TimeUnit.HOUR, stable)).build();
    }

    /**
     * Records {@code [from, to)} of n records over n/2 keys, two versions each (the second half holds the second
     * versions), ~120 bytes of payload, keys spread over {@link #HOURS} hours in an order unrelated to their hour.
     * Without stable partitions the second version sits in the next hour, so every key moves.
     */
    static Iterator<Row> generate(long from, long to, long n, boolean stable) {
        return new Iterator<>() {
            long i = from;
            final String pad = "x".repeat(100);

            @Override
            public boolean hasNext() {
                return i < to;
            }

            @Override
            public Row next() {
                if (i >= to) {
                    throw new NoSuchElementException();
                }
                long id = (i * 7919) % (n / 2);
                long seq = i / (n / 2);
                i++;
                long hour = (id * 31) % HOURS + (stable ? 0 : seq);
                return Row.of(SCHEMA, id, seq, DAY0 + hour * 3_600_000L + id % 3_600_000L, pad + id);
            }
        };
    }

    /**
     * Child-JVM entry point: applies the first versions of {@code args[0]} records, then the second versions, each
     * one batch, under {@code args[1]} bytes into {@code args[2]}.
     */
    public static void main(String[] args) {
        long n = Long.parseLong(args[0]);
        long budget = Long.parseLong(args[1]);
        boolean stable = Boolean.parseBoolean(args[4]);
        Archive<Row> archive = Archive.builder(spec(stable), RecordAccess.rows(SCHEMA)).directory(Path.of(args[2]))
                .spillDirectory(Path.of(args[3])).memoryBudgetBytes(budget).chunkTargetBytes(256 << 10).open();
        ApplyReport first = archive.apply(generate(0, n / 2, n, stable), "first", rej -> {
            throw new IllegalStateException("unexpected rejection " + rej);
        });
        ApplyReport r = archive.apply(generate(n / 2, n, n, stable), "second", rej -> {
            throw new IllegalStateException("unexpected rejection " + rej);
        });
        BoundDataset ds = BoundDataset.bind(spec(stable), SCHEMA);
        long[] out = {0};
        byte[][] last = {null};
        try (Stream<Row> rows = archive.snapshot().rows()) {
            rows.forEach(row -> {
                byte[] order = ds.order(row);
                if (last[0] != null && Arrays.compareUnsigned(last[0], order) >= 0) {
                    throw new IllegalStateException("snapshot not strictly ordered at record " + out[0]);
                }
                if ((Long) row.get("seq") != 1L) {
                    throw new IllegalStateException("an old version survived: " + row.get("id"));
                }
                last[0] = order;
                out[0]++;
            });
        }
        VerifyReport v = archive.verify();
        System.out.println("out=" + out[0] + " superseded=" + r.storedSuperseded() + " moved=" + r.keysMoved()
                + " runs=" + first.batch().spilledRuns() + "," + r.batch().spilledRuns()
                + " partitions=" + archive.snapshot().partitions().size() + " verified=" + v.ok() + " " + v.problems()
                + " heapMax=" + Runtime.getRuntime().maxMemory());
    }

    private static void applyInSmallHeap(Path dir, Path spill, boolean stable) throws Exception {
        long n = 200_000; // two batches of about 25 MB of rows in memory each (12x the budget), in a 64 MB heap
        long budget = 2L << 20;
        String java = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        Process p = new ProcessBuilder(java, "-Xmx64m", "-cp", System.getProperty("java.class.path"),
                ArchiveSpillTest.class.getName(), Long.toString(n), Long.toString(budget), dir.toString(), spill.toString(),
                Boolean.toString(stable)).redirectErrorStream(true).start();
        String output = new String(p.getInputStream().readAllBytes(), StandardCharsets.UTF_8);
        assertTrue(p.waitFor(5, TimeUnit.MINUTES), "child JVM finished");
        assertEquals(0, p.exitValue(), output);
        assertTrue(output.contains("out=100000 superseded=100000 moved=" + (stable ? 0 : 100000) + " "), output);
        assertTrue(output.contains(" partitions=" + HOURS + " verified=true []"), output);
        for (String runs : output.replaceAll("(?s).*runs=(\\d+,\\d+).*", "$1").split(",")) {
            assertTrue(Integer.parseInt(runs) >= 10, "at least 10 spilled runs for a batch of >= 10x the budget: " + output);
        }
        try (Stream<Path> left = Files.list(spill)) {
            assertEquals(List.of(), left.toList(), "spill files removed");
        }
    }

    @Test
    void apply_batchOfTenTimesBudgetInSmallHeapJvm(@TempDir Path dir, @TempDir Path spill) throws Exception {
        applyInSmallHeap(dir, spill, true);
    }

    @Test
    void apply_batchOfTenTimesBudgetWithMovingKeysInSmallHeapJvm(@TempDir Path dir, @TempDir Path spill) throws Exception {
        applyInSmallHeap(dir, spill, false);
    }
}
