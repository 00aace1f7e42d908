package dev.onefold.benchmarks.batch;

import dev.onefold.BatchEngine;
import dev.onefold.BatchReport;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import java.sql.SQLException;
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
 * All three get the same {@link Workload} and must produce the same output: every measured call checks its
 * output checksum against a reference computed in {@code @Setup} by a different peer (hand-written for
 * onefold and DuckDB, onefold for hand-written) and throws on a mismatch, so no timing of a wrong result counts.
 *
 * <p>One call = one whole batch; throughput is {@code records / time}. DuckDB's loading is its own benchmark
 * ({@link #duckdbLoad}), the query ({@link #duckdbQuery}) runs on a table loaded in setup.
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
        }
    }

    /** The hand-written peer's input: the batch as plain Java records. */
    @State(Scope.Benchmark)
    public static class HandWrittenInput {
        MergeCase policy;
        List<Reading> readings;
        long expected;
        String what;

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
    }

    /** DuckDB with the batch loaded, for the query benchmark. */
    @State(Scope.Benchmark)
    public static class LoadedTable {
        MergeCase policy;
        DuckDbDedupe duckdb;
        long expected;
        String what;

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
    public long onefold(OnefoldInput in) {
        OutputChecksum out = new OutputChecksum();
        BatchReport report = in.engine.dedupe(in.rows.iterator(), "benchmark", out::add, BatchDedupeBenchmark::rejected);
        requireInMemory(report, in.what);
        OutputChecksum.requireEqual("onefold", in.what, in.expected, out.value());
        return out.value();
    }

    @Benchmark
    public long handWritten(HandWrittenInput in) {
        OutputChecksum out = new OutputChecksum();
        HandWrittenDedupe.dedupe(in.policy, in.readings).forEach(out::add);
        OutputChecksum.requireEqual("hand-written", in.what, in.expected, out.value());
        return out.value();
    }

    @Benchmark
    public long duckdbQuery(LoadedTable t) throws SQLException {
        OutputChecksum out = new OutputChecksum();
        t.duckdb.dedupe(t.policy, out);
        OutputChecksum.requireEqual("DuckDB", t.what, t.expected, out.value());
        return out.value();
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
