package dev.onefold.examples.consumer;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.onefold.BatchEngine;
import dev.onefold.BatchResult;
import dev.onefold.gate.GateMetrics;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.stream.Collectors;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringDeserializer;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.Timeout;
import org.junit.jupiter.api.io.TempDir;

/**
 * The consumer-service example end to end against a real Kafka broker: scans produced with duplicates, retries
 * and a producer restart; the service crashes mid-stream and restarts from its committed offsets; the table must
 * end up equal to the batch engine's result over every value produced, and no commit may pass an offset that was
 * not done (dropped, or written and acknowledged).
 */
class ParcelTrackingServiceTest {
    private static final String TOPIC = "parcel-scans";
    private static final String BAD_SCAN = "LF-99999|not-a-number|1767225600000|Mill Lane|sorted|false";

    /** Which offsets became done, and a check of every commit against them. */
    private static final class CommitAudit implements ParcelTrackingService.Audit {
        final Map<String, Set<Long>> done = new ConcurrentHashMap<>();
        final List<String> violations = new ArrayList<>();
        final Map<String, Long> checkedUpTo = new ConcurrentHashMap<>();
        int commits;

        @Override
        public void done(String partition, long offset) {
            done.computeIfAbsent(partition, p -> ConcurrentHashMap.newKeySet()).add(offset);
        }

        @Override
        public synchronized void committing(String partition, long offset) {
            commits++;
            Set<Long> d = done.getOrDefault(partition, Set.of());
            for (long o = checkedUpTo.getOrDefault(partition, 0L); o < offset; o++) {
                if (!d.contains(o)) {
                    violations.add("commit of " + partition + " at " + offset + " passes offset " + o + ", not done");
                }
            }
            checkedUpTo.merge(partition, offset, Math::max);
        }
    }

    @Test
    @Timeout(120)
    void crashAndRestart_tableEqualsBatchEngineAndNoCommitPassesUnfinishedOffset(@TempDir Path dir) throws Exception {
        Path brokerDir;
        try (LoopbackKafkaBroker broker = new LoopbackKafkaBroker()) {
            brokerDir = broker.logDir();
            broker.createTopic(TOPIC, 3);
                        ParcelTable table = new ParcelTable("jdbc:h2:" + dir.resolve("tracking").toAbsolutePath());
            long started = System.nanoTime();
            CommitAudit audit = new CommitAudit();
            List<String> day = ParcelScans.day(60, 20260101L);
            int half = day.size() / 2;

            List<String> sent;
            try (ScanProducer producer = new ScanProducer(broker.bootstrap(), TOPIC, 7L)) {
                producer.send(day.subList(0, half));
                producer.sendOne(BAD_SCAN);

                ParcelTrackingService first = new ParcelTrackingService(broker.bootstrap(), TOPIC, "tracking", table, audit);
                first.start();
                producer.restart(12);
                producer.send(day.subList(half, day.size()));
                sent = producer.sent();
                awaitOffered(first, sent.size() / 2);
                first.crash();
                assertNull(first.failure());
            }

            ParcelTrackingService second = new ParcelTrackingService(broker.bootstrap(), TOPIC, "tracking", table, audit);
            second.start();
            Map<String, Long> end = endOffsets(broker.bootstrap());
            long deadline = System.nanoTime() + 60_000_000_000L;
            while (!second.committedOffsets().equals(end)) {
                assertTrue(System.nanoTime() < deadline, "service did not catch up: committed "
                        + second.committedOffsets() + ", end " + end);
                assertNull(second.failure());
                Thread.sleep(50);
            }
                        GateMetrics afterRestart = second.gateMetrics();
            second.close();

            // the reference: the batch engine over every value produced, duplicates and the bad scan included
            BatchResult<String> expected = BatchEngine.builder(ParcelScans.SPEC, ParcelScans.TEXT).build().dedupe(sent);
            assertEquals(expected.survivors().stream().sorted().toList(), table.trackedScans().stream().sorted().toList());
            long badCopies = sent.stream().filter(v -> v.equals(BAD_SCAN)).count();
            assertEquals(badCopies, expected.rejections().size());
            List<String> rejected = table.rejectedScans();
            assertEquals(badCopies, rejected.size(), "one rejection kept per offset: " + rejected);
            assertTrue(rejected.get(0).contains("'seq' is not a number"), rejected.get(0));

            assertEquals(List.of(), audit.violations);
            assertTrue(audit.commits > 0);
            assertTrue(afterRestart.storeHits() > 0, "the restarted gate found states in the table");
            assertTrue(afterRestart.duplicates() + afterRestart.superseded() > 0,
                    "replayed scans were recognised: " + afterRestart.toMap());
            System.out.println("parcel tracking: " + sent.size() + " values sent, " + expected.survivors().size()
                    + " parcels tracked, " + (System.nanoTime() - started) / 1_000_000 + " ms; after restart "
                    + afterRestart.toMap());
            table.close();
        }
        assertFalse(Files.exists(brokerDir), "broker directory removed");
    }

    private static void awaitOffered(ParcelTrackingService service, long records) throws InterruptedException {
        long deadline = System.nanoTime() + 30_000_000_000L;
        while (service.gateMetrics().offered() < records) {
            assertTrue(System.nanoTime() < deadline, "first service offered only " + service.gateMetrics().offered());
            assertNull(service.failure());
            Thread.sleep(5);
        }
    }

    private static Map<String, Long> endOffsets(String bootstrap) {
        Map<String, Object> p = new HashMap<>();
        p.put("bootstrap.servers", bootstrap);
        try (KafkaConsumer<String, String> c = new KafkaConsumer<>(p, new StringDeserializer(), new StringDeserializer())) {
            List<TopicPartition> tps = c.partitionsFor(TOPIC).stream()
                    .map((PartitionInfo i) -> new TopicPartition(TOPIC, i.partition())).toList();
            return c.endOffsets(tps).entrySet().stream()
                    .collect(Collectors.toMap(e -> e.getKey().toString(), Map.Entry::getValue));
        }
    }
}
