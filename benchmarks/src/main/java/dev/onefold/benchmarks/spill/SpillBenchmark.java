package dev.onefold.benchmarks.spill;

import dev.onefold.BatchEngine;
import dev.onefold.BatchReport;
import dev.onefold.benchmarks.batch.MergeCase;
import dev.onefold.benchmarks.batch.Workload;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
import org.openjdk.jmh.annotations.AuxCounters;
import org.openjdk.jmh.annotations.Benchmark;
import org.openjdk.jmh.annotations.BenchmarkMode;
import org.openjdk.jmh.annotations.Fork;
import org.openjdk.jmh.annotations.Level;
import org.openjdk.jmh.annotations.Mode;
import org.openjdk.jmh.annotations.OutputTimeUnit;
import org.openjdk.jmh.annotations.Param;
import org.openjdk.jmh.annotations.Scope;
import org.openjdk.jmh.annotations.Setup;
import org.openjdk.jmh.annotations.State;
import org.openjdk.jmh.annotations.TearDown;

/**
 * Question 6: what does spilling cost? A last-writer batch streamed from the {@link Workload} generator (so the
 * input itself takes no heap) is deduplicated twice: {@link #inMemory} with a budget larger than the batch, in a
 * large heap, and {@link #spilled} with a budget of {@code budgetMiB} (48 MiB for 1M records: about a tenth
 * of what the engine accounts for the batch), in a heap of 256 MiB. Peak heap comes from
 * {@link dev.onefold.benchmarks.support.PeakHeapProfiler}; the spilled runs are reported as {@code spilledRuns}.
 *
 * <p>Every call checks its output as it streams out: one record per key, strictly ordered, and each key's
 * {@code seq} equal to the known last-writer winner ({@link Workload#expectedLastWriterSeq}).
 *
 * <p>Run: {@code benchmarks/run.sh short --questions q6}, or directly {@code java -jar benchmarks/target/benchmarks.jar
 * SpillBenchmark -f 1 -wi 1 -i 3 -prof dev.onefold.benchmarks.support.PeakHeapProfiler}.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.SingleShotTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
public class SpillBenchmark {

    @Param({"1000000"})
    public int records;

    @Param({"48"})
    public int budgetMiB;

    Workload workload;
    Path spillDir;

    /** Spilled runs of the last call, reported next to the timing. */
    @State(Scope.Thread)
    @AuxCounters(AuxCounters.Type.EVENTS)
    public static class Runs {
        public long spilledRuns;

        @Setup(Level.Iteration)
        public void reset() {
            spilledRuns = 0;
        }
    }

    @Setup(Level.Trial)
    public void setUp() throws IOException {
        workload = Workload.of(records);
        spillDir = Files.createTempDirectory("onefold-spill-bench-");
    }

    @TearDown(Level.Trial)
    public void tearDown() throws IOException {
        try (Stream<Path> left = Files.walk(spillDir)) {
            for (Path p : left.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(p);
            }
        }
    }

    /** Deduplicates the streamed batch under a budget, checking the output; returns the report. */
    public static BatchReport dedupe(Workload workload, long budgetBytes, Path spillDir) {
        BatchEngine<Row> engine = BatchEngine.builder(MergeCase.LAST_WRITER.spec(), RecordAccess.rows(Workload.SCHEMA))
                .memoryBudgetBytes(budgetBytes).spillDirectory(spillDir).build();
        OrderCheck check = new OrderCheck(workload);
        BatchReport report = engine.dedupe(workload.streamRows(), "generated", check::accept, r -> {
            throw new IllegalStateException("generated record rejected: " + r);
        });
        check.requireComplete();
        return report;
    }

    /**
     * Each spilled run holds half the budget's worth of records (the two stages share the budget), so the batch is
     * about {@code spilledRuns / 2} times the budget by the engine's own accounting.
     *
     * @throws IllegalStateException when the batch was less than 10x the budget
     */
    static void requireTenTimesBudget(BatchReport r) {
        if (r.spilledRuns() < 20) {
            throw new IllegalStateException("a batch of 10x the budget spills at least 20 runs (10 per stage), this one "
                    + r.spilledRuns() + ": lower budgetMiB or raise records");
        }
    }

    @Benchmark
    @Fork(value = 1, jvmArgsAppend = {"-Xmx3g"})
    public long inMemory(Runs runs) {
        BatchReport r = dedupe(workload, Runtime.getRuntime().maxMemory(), spillDir);
        if (r.spilledRuns() != 0) {
            throw new IllegalStateException("the in-memory case spilled " + r.spilledRuns() + " runs");
        }
        runs.spilledRuns = r.spilledRuns();
        return r.out();
    }

    @Benchmark
    @Fork(value = 1, jvmArgsAppend = {"-Xmx256m"})
    public long spilled(Runs runs) {
        BatchReport r = dedupe(workload, budgetMiB * (1L << 20), spillDir);
        requireTenTimesBudget(r);
        runs.spilledRuns = r.spilledRuns();
        return r.out();
    }
}
