package dev.onefold.benchmarks.gate;

import dev.onefold.DatasetSpec;
import dev.onefold.gate.Decision;
import dev.onefold.gate.StreamGate;
import dev.onefold.record.FieldType;
import dev.onefold.record.Row;
import dev.onefold.record.RowSchema;
import dev.onefold.spi.RecordAccess;
import java.lang.management.ManagementFactory;
import java.lang.management.MemoryMXBean;
import java.util.List;
import java.util.concurrent.TimeUnit;
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
import org.openjdk.jmh.annotations.Warmup;

/**
 * Question 4 of the benchmark suite: how many decisions per second does one streaming gate make on one core,
 * and how many heap bytes does its window retain per key, with windows of 1M and 10M keys?
 *
 * <p>Set-up, not timed: a last-writer gate whose window holds {@code windowKeys} keys, filled by offering one
 * record per key (each emit acknowledged at once). Retained bytes per key: used heap after a full collection
 * ({@link MemoryMXBean}, three {@code System.gc()} calls) with the filled gate, minus the same with the empty
 * gate, divided by the keys; printed as {@code retained-bytes-per-key} in the run's output.
 *
 * <p>Timed: each operation offers one record of a key drawn across the whole window (so the window's memory is
 * touched the way a real stream touches it); every second record repeats the previous one, so half the
 * decisions are emits of a newer version (acknowledged at once, as a keeping-up sink does) and half are drops as
 * duplicates. The score is decisions per second on one thread. Windowed mode: with every key in the window,
 * exact mode decides the same way without reading its store.
 *
 * <p>Run: {@code java -jar benchmarks/target/benchmarks.jar StreamGateBenchmark}
 */
@State(Scope.Thread)
@BenchmarkMode(Mode.Throughput)
@OutputTimeUnit(TimeUnit.SECONDS)
@Warmup(iterations = 3, time = 2)
@Measurement(iterations = 5, time = 2)
@Fork(value = 1, jvmArgsAppend = {"-Xmx8g"})
public class StreamGateBenchmark {
    static final RowSchema SCHEMA = RowSchema.builder("reading")
            .field("k", FieldType.int64())
            .field("ver", FieldType.int64())
            .field("at", FieldType.timestampMillis())
            .field("val", FieldType.int64().nullable())
            .build();

    static final DatasetSpec SPEC = DatasetSpec.fromJson(
            "{\"key\": [\"k\"], \"order\": [\"at\"], \"merge\": {\"policy\": \"last-writer\", \"version\": \"ver\"}}",
            "benchmark spec");

    /** Keys the window holds. */
    @Param({"1000000", "10000000"})
    public long windowKeys;

    StreamGate<Row> gate;
    private long offset;
    private long sequence;
    private Row previous;
    private boolean repeat;
    /** The measured retained heap bytes per key of the filled window. */
    double retainedBytesPerKey;

    static Row reading(long key, long version) {
        return Row.of(SCHEMA, key, version, 1_709_164_800_000L + version, version % 7 == 0 ? null : version);
    }

    @Setup(Level.Trial)
    public void setUp() {
        long empty = usedHeapAfterGc();
        gate = StreamGate.builder(SPEC, RecordAccess.rows(SCHEMA)).windowed().windowKeys(windowKeys).build();
        for (long k = 0; k < windowKeys; k++) {
            offerAndAcknowledge(reading(k, 1));
        }
        long filled = usedHeapAfterGc();
        retainedBytesPerKey = (double) (filled - empty) / windowKeys;
        System.out.printf("retained-bytes-per-key windowKeys=%d: %.1f (used heap %d -> %d bytes; window holds %d keys)%n",
                windowKeys, retainedBytesPerKey, empty, filled, gate.metrics().windowKeys());
        sequence = 2;
    }

    static long usedHeapAfterGc() {
        MemoryMXBean memory = ManagementFactory.getMemoryMXBean();
        for (int i = 0; i < 3; i++) {
            System.gc();
        }
        return memory.getHeapMemoryUsage().getUsed();
    }

    private Decision<Row> offerAndAcknowledge(Row record) {
        List<Decision<Row>> decisions = gate.offer("p", offset++, record);
        Decision<Row> d = decisions.get(decisions.size() - 1);
        gate.acknowledge(d);
        return d;
    }

    /** One decision: a newer version of a key across the window, or a duplicate of the previous record. */
    @Benchmark
    public Decision<Row> offer() {
        Row record;
        repeat = previous != null && !repeat;
        if (!repeat) {
            long s = sequence++;
            // a multiplicative hash spreads consecutive records over the whole window
            record = reading(Math.floorMod(s * 0x9E3779B97F4A7C15L, windowKeys), s);
            previous = record;
        } else {
            record = previous;
        }
        return offerAndAcknowledge(record);
    }
}
