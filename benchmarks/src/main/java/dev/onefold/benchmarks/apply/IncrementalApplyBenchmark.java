package dev.onefold.benchmarks.apply;

import dev.onefold.archive.ApplyReport;
import dev.onefold.archive.Archive;
import dev.onefold.record.Row;
import dev.onefold.spi.RecordAccess;
import dev.onefold.spi.Storage;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Comparator;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
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
 * Question 2: does applying a batch cost the batch and the partitions it touches, not the history? One
 * 50,000-record batch ({@link ApplyWorkload}: 3 recent and 40 late hourly partitions, updates, new keys and
 * duplicates) is applied to archives of 0.5M, 2M and 5M records on local disk, by onefold's archive and by the
 * hand-written full recompute ({@link FullRecompute}). Target: onefold's time into 5M at most 1.3x its time into
 * 0.5M, and at least 30x faster than the full recompute at 5M.
 *
 * <p>Each trial builds its archive once in {@code @Setup} (the build time is printed). Every invocation starts
 * from that same archive: after each onefold apply the version it published and the chunk files it wrote are
 * deleted again (a snapshot reset in {@code @TearDown(Level.Invocation)}, outside the measured time), and the
 * recompute writes a new directory that is deleted the same way. A reset is used rather than copying the
 * directory so the 5M archive is not copied before every invocation, and so the archive object stays open
 * across invocations like a long-running writer's. Single-shot mode: one apply is one measured operation.
 *
 * <p>Run: {@code java -jar benchmarks/target/benchmarks.jar IncrementalApplyBenchmark} (after
 * {@code mvn -B -q package -pl benchmarks -am -DskipTests}); a quick run adds {@code -f 1 -wi 2 -i 3}.
 */
@BenchmarkMode(Mode.SingleShotTime)
@OutputTimeUnit(TimeUnit.MILLISECONDS)
@Fork(value = 1, jvmArgsAppend = {"-Xms4g", "-Xmx4g"})
@Warmup(iterations = 2)
@Measurement(iterations = 5)
public class IncrementalApplyBenchmark {

    /** The workload and a scratch directory, shared by both sides. */
    @State(Scope.Benchmark)
    public abstract static class Workload {
        @Param({"500000", "2000000", "5000000"})
        public long archiveRecords;

        /** Records per hourly partition; tests lower it to run the benchmark on a tiny archive. */
        int perHour = ApplyWorkload.PER_HOUR;
        ApplyWorkload workload;
        List<Row> batch;
        Path root;

        void prepare() throws IOException {
            workload = new ApplyWorkload(archiveRecords, perHour);
            batch = workload.batch();
            root = Files.createTempDirectory("onefold-apply-bench-");
        }
    }

    /** An onefold archive holding the history, reset to its built version after every invocation. */
    public static class OnefoldArchive extends Workload {
        @Param({"true"})
        public boolean stablePartitions;

        Archive<Row> archive;
        Storage storage;
        long builtVersion;
        final Set<String> builtFiles = new HashSet<>();

        @Setup(Level.Trial)
        public void build() throws IOException {
            prepare();
            storage = Storage.local(root.resolve("archive"));
            archive = Archive.builder(ApplyWorkload.spec(stablePartitions), RecordAccess.rows(ApplyWorkload.SCHEMA))
                    .storage(storage).spillDirectory(root.resolve("spill")).open();
            long start = System.nanoTime();
            applyHistory(archive, workload);
            System.out.printf("%nbuilt a %,d-record archive (%d hourly partitions) in %.1f s%n",
                    workload.historyRecords(), workload.hours(), (System.nanoTime() - start) / 1e9);
            builtVersion = archive.snapshot().version();
            builtFiles.addAll(storage.list(""));
        }

        /** Deletes what the last apply published: its manifest version and the chunk files it wrote. */
        @TearDown(Level.Invocation)
        public void reset() {
            for (String name : storage.list("")) {
                if (!builtFiles.contains(name)) {
                    storage.delete(name);
                }
            }
            if (archive.snapshot().version() != builtVersion) {
                throw new IllegalStateException("reset left version " + archive.snapshot().version());
            }
        }

        @TearDown(Level.Trial)
        public void delete() {
            deleteTree(root);
        }
    }

    /** The hand-written approach's files holding the same history. */
    public static class HandWrittenArchive extends Workload {
        Path stored;
        Path output;

        @Setup(Level.Trial)
        public void build() throws IOException {
            prepare();
            stored = root.resolve("stored");
            output = root.resolve("output");
            FullRecompute.write(workload.history(0, workload.hours()), stored);
        }

        @TearDown(Level.Invocation)
        public void reset() {
            deleteTree(output);
        }

        @TearDown(Level.Trial)
        public void delete() {
            deleteTree(root);
        }
    }

    /** Applies the history in slices of 100 hours (500,000 records), each slice one apply. */
    static void applyHistory(Archive<Row> archive, ApplyWorkload workload) {
        for (int from = 0; from < workload.hours(); from += 100) {
            archive.apply(workload.history(from, Math.min(workload.hours(), from + 100)), "history", r -> {
                throw new IllegalStateException("generated history rejected: " + r);
            });
        }
    }

    @Benchmark
    public ApplyReport onefoldApply(OnefoldArchive s) {
        return s.archive.apply(s.batch);
    }

    @Benchmark
    public long handWrittenFullRecompute(HandWrittenArchive s) {
        return FullRecompute.apply(s.stored, s.batch, s.output);
    }

    static void deleteTree(Path dir) {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> walk = Files.walk(dir)) {
            for (Path p : walk.sorted(Comparator.reverseOrder()).toList()) {
                Files.delete(p);
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
