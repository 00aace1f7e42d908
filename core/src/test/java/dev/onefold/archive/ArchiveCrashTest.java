package dev.onefold.archive;

import static dev.onefold.archive.ArchiveFixtures.DAY0;
import static dev.onefold.archive.ArchiveFixtures.HOUR;
import static dev.onefold.archive.ArchiveFixtures.event;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.DatasetSpec;
import dev.onefold.OnefoldException;
import dev.onefold.internal.archive.MemoryStorage;
import dev.onefold.record.Row;
import dev.onefold.spi.Storage;
import java.io.File;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.ArrayList;
import java.util.List;
import java.util.Random;
import java.util.concurrent.TimeUnit;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/** Promise 4: a failure or a kill at any point leaves the last committed version intact; re-applying converges. */
class ArchiveCrashTest {
    /** Files appear a minute before the archive's clock reading, so a zero grace period lets cleanup take them. */
    private static final Clock BEFORE_NOW = Clock.offset(ArchiveFixtures.FIXED, Duration.ofMinutes(-1));
    private final DatasetSpec spec = ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false);

    private static List<Row> first() {
        return ArchiveFixtures.randomEvents(new Random(11), 150, 60, 4);
    }

    /** Updates, deletes and key moves into new hours. */
    private static List<Row> second() {
        List<Row> rows = new ArrayList<>(ArchiveFixtures.randomEvents(new Random(12), 100, 80, 6));
        rows.add(event("k1", 99, DAY0 + 9 * HOUR, 5L, false));
        rows.add(event("k2", 99, DAY0, null, true));
        return rows;
    }

    private Archive<Row> open(Storage s) {
        return ArchiveFixtures.builder(spec, s).parallelism(1).open();
    }

    @Test
    void apply_failureAtEveryWriteSyncAndCreateLeavesLastVersionIntact() {
        MemoryStorage reference = new MemoryStorage();
        InstrumentedStorage counting = new InstrumentedStorage(reference);
        open(counting).apply(first());
        List<Row> firstRows = ArchiveFixtures.rows(open(reference));
        counting.resetCounters();
        open(counting).apply(second());
        List<String> points = List.copyOf(counting.mutations);
        List<String> expectedEntries = ArchiveConvergenceProperties.entries(open(reference));
        List<Row> expectedRows = ArchiveFixtures.rows(open(reference));
        assertTrue(points.size() >= 5, "apply should have several write, sync and create points: " + points);

        for (InstrumentedStorage.When when : InstrumentedStorage.When.values()) {
            for (int i = 0; i < points.size(); i++) {
                MemoryStorage memory = new MemoryStorage();
                InstrumentedStorage faulty = new InstrumentedStorage(memory);
                open(faulty).apply(first());
                faulty.failAt(i, when);
                String where = "failure " + when + " " + points.get(i);
                OnefoldException e = assertThrows(OnefoldException.class, () -> open(faulty).apply(second()), where);
                assertTrue(e.getMessage().contains("injected"), where + ": " + e.getMessage());
                memory.dropUnsynced();
                Archive<Row> after = open(memory);
                boolean committed = after.snapshot().version() == 2;
                assertEquals(committed ? expectedRows : firstRows, ArchiveFixtures.rows(after), where);
                assertTrue(after.verify().ok(), () -> where + ": " + after.verify().problems());
                after.apply(second());
                assertEquals(expectedEntries, ArchiveConvergenceProperties.entries(after), where);
                assertEquals(expectedRows, ArchiveFixtures.rows(after), where);
            }
        }
    }

    @Test
    void sweep_failureAtEveryDeleteLeavesLatestVersionIntact() {
        MemoryStorage reference = new MemoryStorage(BEFORE_NOW);
        InstrumentedStorage counting = new InstrumentedStorage(reference);
        Archive<Row> a = open(counting);
        a.apply(first());
        a.apply(second());
        List<Row> expected = ArchiveFixtures.rows(a);
        counting.resetCounters();
        SweepReport report = a.sweep(new SweepRules(1, Duration.ZERO, Duration.ZERO));
        assertTrue(!report.deletedFiles().isEmpty() && report.expiredVersions().equals(List.of(1L)), report.toString());
        int points = counting.mutations.size();
        for (int i = 0; i < points; i++) {
            MemoryStorage memory = new MemoryStorage(BEFORE_NOW);
            InstrumentedStorage faulty = new InstrumentedStorage(memory);
            Archive<Row> b = open(faulty);
            b.apply(first());
            b.apply(second());
            faulty.failAt(i, InstrumentedStorage.When.BEFORE);
            assertThrows(OnefoldException.class, () -> b.sweep(new SweepRules(1, Duration.ZERO, Duration.ZERO)));
            assertEquals(expected, ArchiveFixtures.rows(open(memory)));
            assertTrue(open(memory).verify().ok());
            b.sweep(new SweepRules(1, Duration.ZERO, Duration.ZERO));
            assertEquals(expected, ArchiveFixtures.rows(open(memory)));
        }
    }

    // --- a separate JVM killed at random moments

    @Test
    void apply_killedProcessLeavesReadableArchive(@TempDir Path dir) throws Exception {
        Random r = new Random(5);
        for (int kill = 0; kill < 3; kill++) {
            Process p = new ProcessBuilder(Path.of(System.getProperty("java.home"), "bin", "java").toString(),
                    "-cp", System.getProperty("java.class.path"), KillTarget.class.getName(), dir.toString())
                    .redirectErrorStream(true).redirectOutput(dir.resolve("child-" + kill + ".log").toFile()).start();
            waitForFirstCommit(dir, p);
            Thread.sleep(50 + r.nextInt(400));
            p.destroyForcibly();
            assertTrue(p.waitFor(30, TimeUnit.SECONDS));
            Archive<Row> a = open(Storage.local(dir));
            assertTrue(a.verify().ok(), () -> a.verify().problems().toString());
            ArchiveFixtures.rows(a);
        }
        Archive<Row> survivor = open(Storage.local(dir));
        Archive<Row> reference = open(Storage.inMemory());
        for (int i = 0; i < KillTarget.BATCHES; i++) {
            survivor.apply(KillTarget.batch(i));
            reference.apply(KillTarget.batch(i));
        }
        assertEquals(ArchiveFixtures.rows(reference), ArchiveFixtures.rows(survivor));
        assertEquals(ArchiveConvergenceProperties.entries(reference), ArchiveConvergenceProperties.entries(survivor));
    }

    private static void waitForFirstCommit(Path dir, Process p) throws InterruptedException {
        long deadline = System.nanoTime() + TimeUnit.SECONDS.toNanos(60);
        while (System.nanoTime() < deadline && p.isAlive()) {
            File[] m = dir.resolve("manifests").toFile().listFiles();
            if (m != null && m.length > 0) {
                return;
            }
            Thread.sleep(20);
        }
        assertTrue(Files.isDirectory(dir.resolve("manifests")), "child never committed");
    }

    /** The child process: applies deterministic batches to a local archive until killed (or done). */
    public static final class KillTarget {
        static final int BATCHES = 12;

        static List<Row> batch(int i) {
            return ArchiveFixtures.randomEvents(new Random(1000 + i), 200, 300, 8);
        }

        public static void main(String[] args) {
            Archive<Row> a = ArchiveFixtures.builder(ArchiveFixtures.spec(ArchiveFixtures.Policy.LAST_WRITER, false),
                    Storage.local(Path.of(args[0]))).open();
            for (int round = 0; round < 1000; round++) {
                for (int i = 0; i < BATCHES; i++) {
                    a.apply(batch(i));
                }
            }
        }
    }
}
