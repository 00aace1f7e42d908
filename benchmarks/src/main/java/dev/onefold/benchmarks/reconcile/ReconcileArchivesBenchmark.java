package dev.onefold.benchmarks.reconcile;

import dev.onefold.reconcile.ReconciliationReport;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;
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
 * Question 5: how long does it take to prove two archives of {@code records} records agree, and to locate ten
 * differences between them? Two local-directory archives of the same records are built once per trial
 * ({@link ArchivePair}: independently, with different batch sizes and orders; setup time is printed as
 * {@code setup:} lines, not measured). {@link #compareAgreeing} opens both snapshots and compares their
 * manifest digests ({@code hours} hourly partitions, 30 days by default); {@link #locateTenDifferences} compares against a version of the
 * second archive with 4 changed, 3 deleted and 3 added keys and drills down to them (sketch per differing
 * partition, then the keys' versions). Every call checks its answer and throws when it is wrong.
 *
 * <p>Run: {@code java -jar benchmarks/target/benchmarks.jar ReconcileArchivesBenchmark -f 1 -wi 2 -i 3}
 * (add {@code -p records=500000} for a smaller pair).
 */
@State(Scope.Benchmark)
@BenchmarkMode(Mode.AverageTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Fork(value = 1, jvmArgsAppend = {"-Xmx3g"})
@Warmup(iterations = 2, time = 2)
@Measurement(iterations = 3, time = 3)
public class ReconcileArchivesBenchmark {

    @Param({"5000000"})
    public int records;

    @Param({"720"})
    public int hours;

    Path dir;
    ArchivePair pair;

    @Setup(Level.Trial)
    public void build() throws IOException {
        dir = Files.createTempDirectory("onefold-reconcile-bench-");
        long started = System.nanoTime();
        pair = ArchivePair.build(dir, records, hours, 250_000, 400_000);
        double seconds = (System.nanoTime() - started) / 1e9;
        System.out.printf("%nsetup: built two archives of %,d records each (+10 differences) in %.1f s, %,.0f records/s%n",
                records, seconds, 2.0 * records / seconds);
        pair.requireAgreement(pair.compareAgreeing());
        pair.requireTheDifferences(pair.locateDifferences());
    }

    @TearDown(Level.Trial)
    public void delete() throws IOException {
        try (Stream<Path> files = Files.walk(dir)) {
            for (Path p : files.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(p);
            }
        }
    }

    /** Two archives that agree: open both snapshots, compare every partition's digest. */
    @Benchmark
    public ReconciliationReport compareAgreeing() {
        return pair.requireAgreement(pair.compareAgreeing());
    }

    /** Two archives with ten differing keys: compare, drill down, and name each key with both versions. */
    @Benchmark
    public ReconciliationReport locateTenDifferences() {
        return pair.requireTheDifferences(pair.locateDifferences());
    }
}
