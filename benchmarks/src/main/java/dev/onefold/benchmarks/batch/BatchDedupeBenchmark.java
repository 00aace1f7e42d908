package dev.onefold.benchmarks.batch;

import dev.onefold.BatchEngine;
import dev.onefold.BatchReport;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.sql.SQLException;
import java.util.ArrayList;
import java.util.List;
import java.util.concurrent.TimeUnit;
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
import org.openjdk.jmh.infra.BenchmarkParams;

/**
 * Question 1: how fast does onefold deduplicate and order a batch held in memory, per merge policy, next to
 * the code a team writes by hand ({@link HandWrittenDedupe}) and an embedded SQL engine ({@link DuckDbDedupe})?
 * All three get the same {@link Workload} and must produce the same output: after every measured call, outside
 * the timing ({@code @TearDown(Level.Invocation)}), the output's checksum is compared with a reference computed
 * in {@code @Setup} by a different peer (hand-written for onefold and DuckDB, onefold for hand-written), and a
 * mismatch throws, so no timing of a wrong result counts.
 *
 * <p>One call = one whole batch, from the records in memory to the survivors, in order, in a list (for DuckDB:
 * read from its result set into {@link Reading}s); throughput is {@code records / time}. Checking the output is
 * not timed: it reads every field of every survivor in output order, a fixed cost of about 0.3-0.45 s per call
 * at 1M records on this machine that is the same for every peer and measures the check, not the peer. DuckDB's
 * loading is its own benchmark ({@link #duckdbLoad}); the query ({@link #duckdbQuery}) runs on a table loaded in
 * setup.
 *
 * <p>Run: {@code benchmarks/run.sh short --questions q1} (all sizes), or directly
 * {@code java -jar benchmarks/target/benchmarks.jar BatchDedupeBenchmark -p records=1000000 -f 1 -wi 1 -i 3 -gc true}.
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.SingleShotTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Fork(value = 1, jvmArgsAppend = {"-Xms2g", "-Xmx8g"})
public class BatchDedupeBenchmark {

    @Param({"last-writer", "vector-clock", "field-wise"})
    public String policy;

    @Param({"100000", "1000000", "5000000"})
    public int records;

    static MergeCase policy(BenchmarkParams p) {
        return MergeCase.fromParam(p.getParam("policy"));
    }

    static Workload workload(BenchmarkParams p) {
        return Workload.of(Integer.parseInt(p.getParam("records")));
    }

    static String describe(MergeCase policy, Workload w) {
        return policy.paramName() + " on " + w.records() + " records";
    }

    /** onefold's input: the batch as rows, and an engine whose budget keeps it in memory. */
    @State(Scope.Benchmark)
    public static class OnefoldInput {
        MergeCase policy;
        List<Row> rows;
        BatchEngine<Row> engine;
        long expected;
        String what;
        List<Row> output = new ArrayList<>();

        @Setup(Level.Trial)
        public void setUp(BenchmarkParams p) {
            prepare(policy(p), workload(p));
        }

        void prepare(MergeCase policy, Workload w) {
            this.policy = policy;
            what = describe(policy, w);
            expected = handWrittenChecksum(policy, w.readings());
            rows = w.rows();
            engine = inMemoryEngine(policy);
            output = new ArrayList<>(w.keys());
        }

        /** Checks the last call's output against the reference and empties it for the next call. */
        @TearDown(Level.Invocation)
        public void verify() {
            OutputChecksum c = new OutputChecksum();
            output.forEach(c::add);
            output.clear();
            OutputChecksum.requireEqual("onefold", what, expected, c.value());
        }
    }

    /** The hand-written peer's input: the batch as plain Java records. */
    @State(Scope.Benchmark)
    public static class HandWrittenInput {
        MergeCase policy;
        List<Reading> readings;
        long expected;
        String what;
        List<Reading> output = List.of();

        @Setup(Level.Trial)
        public void setUp(BenchmarkParams p) {
            prepare(policy(p), workload(p));
        }

        void prepare(MergeCase policy, Workload w) {
            this.policy = policy;
            what = describe(policy, w);
            List<Row> rows = w.rows();
            OutputChecksum reference = new OutputChecksum();
            BatchReport report = inMemoryEngine(policy).dedupe(rows.iterator(), "reference", reference::add, BatchDedupeBenchmark::rejected);
            requireInMemory(report, what);
            expected = reference.value();
            readings = w.readings();
        }

        /** Checks the last call's output against the reference. */
        @TearDown(Level.Invocation)
        public void verify() {
            requireChecksum("hand-written", what, expected, output);
            output = List.of();
        }
    }

    /** DuckDB with the batch loaded, for the query benchmark. */
    @State(Scope.Benchmark)
    public static class LoadedTable {
        MergeCase policy;
        DuckDbDedupe duckdb;
        long expected;
        String what;
        List<Reading> output = List.of();

        @Setup(Level.Trial)
        public void setUp(BenchmarkParams p) throws SQLException {
            prepare(policy(p), workload(p));
        }

        void prepare(MergeCase policy, Workload w) throws SQLException {
            this.policy = policy;
            what = describe(policy, w);
            List<Reading> readings = w.readings();
            expected = handWrittenChecksum(policy, readings);
            duckdb = new DuckDbDedupe();
            duckdb.load(readings);
        }

        /** Checks the last call's output against the reference. */
        @TearDown(Level.Invocation)
        public void verify() {
            requireChecksum("DuckDB", what, expected, output);
            output = List.of();
        }

        @TearDown(Level.Trial)
        public void tearDown() throws SQLException {
            duckdb.close();
        }
    }

    /** DuckDB and the batch in memory, for the load benchmark. */
    @State(Scope.Benchmark)
    public static class TableToLoad {
        List<Reading> readings;
        DuckDbDedupe duckdb;
        String what;

        @Setup(Level.Trial)
        public void setUp(BenchmarkParams p) throws SQLException {
            prepare(policy(p), workload(p));
        }

        void prepare(MergeCase policy, Workload w) throws SQLException {
            what = describe(policy, w);
            readings = w.readings();
            duckdb = new DuckDbDedupe();
        }

        @TearDown(Level.Trial)
        public void tearDown() throws SQLException {
            duckdb.close();
        }
    }

    static BatchEngine<Row> inMemoryEngine(MergeCase policy) {
        // Question 1 measures batches held in memory: a budget of the whole heap keeps the engine from spilling
        long budget = Runtime.getRuntime().maxMemory();
        return BatchEngine.builder(policy.spec(), RecordAccess.rows(Workload.SCHEMA)).memoryBudgetBytes(budget).build();
    }

    static long handWrittenChecksum(MergeCase policy, List<Reading> readings) {
        OutputChecksum c = new OutputChecksum();
        HandWrittenDedupe.dedupe(policy, readings).forEach(c::add);
        return c.value();
    }

    static void requireChecksum(String peer, String what, long expected, List<Reading> output) {
        OutputChecksum c = new OutputChecksum();
        output.forEach(c::add);
        OutputChecksum.requireEqual(peer, what, expected, c.value());
    }

    static void rejected(dev.onefold.Rejection r) {
        throw new IllegalStateException("generated record rejected: " + r);
    }

    static void requireInMemory(BatchReport report, String what) {
        if (report.spilledRuns() != 0) {
            throw new IllegalStateException("onefold spilled " + report.spilledRuns() + " runs for " + what
                    + "; question 1 measures in-memory batches: give the fork more heap");
        }
    }

    @Benchmark
    public int onefold(OnefoldInput in) {
        BatchReport report = in.engine.dedupe(in.rows.iterator(), "benchmark", in.output::add, BatchDedupeBenchmark::rejected);
        requireInMemory(report, in.what);
        return in.output.size();
    }

    @Benchmark
    public int handWritten(HandWrittenInput in) {
        in.output = HandWrittenDedupe.dedupe(in.policy, in.readings);
        return in.output.size();
    }

    @Benchmark
    public int duckdbQuery(LoadedTable t) throws SQLException {
        t.output = t.duckdb.dedupe(t.policy);
        return t.output.size();
    }

    @Benchmark
    public long duckdbLoad(TableToLoad t) throws SQLException {
        t.duckdb.load(t.readings);
        long rows = t.duckdb.count();
        if (rows != t.readings.size()) {
            throw new IllegalStateException("DuckDB loaded " + rows + " of " + t.readings.size() + " rows for " + t.what);
        }
        return rows;
    }
}
