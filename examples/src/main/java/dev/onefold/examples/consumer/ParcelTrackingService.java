package dev.onefold.examples.consumer;

import dev.onefold.gate.Decision;
import dev.onefold.gate.GateMetrics;
import dev.onefold.gate.StreamGate;
import java.time.Duration;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.Properties;
import java.util.Set;
import java.util.concurrent.ConcurrentHashMap;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;
import org.apache.kafka.clients.consumer.CloseOptions;
import org.apache.kafka.clients.consumer.ConsumerConfig;
import org.apache.kafka.clients.consumer.ConsumerRecord;
import org.apache.kafka.clients.consumer.ConsumerRecords;
import org.apache.kafka.clients.consumer.KafkaConsumer;
import org.apache.kafka.clients.consumer.OffsetAndMetadata;
import org.apache.kafka.common.PartitionInfo;
import org.apache.kafka.common.TopicPartition;
import org.apache.kafka.common.serialization.StringDeserializer;

/**
 * The consumer service of the example: reads parcel scans from every partition of a Kafka topic, passes each
 * through an exact-mode {@link StreamGate} (reordering by scan time within an hour), hands emits to a
 * {@link TableWriter} that upserts them into the {@link ParcelTable} and acknowledges after each commit, and
 * commits to Kafka only the gate's safe offsets. Rejected scans are written to the table before their offset
 * can be committed.
 *
 * <p>On start it seeks every partition to the group's committed offset (or the beginning) and tells the gate,
 * so redelivered scans are recognised. {@link #crash()} stops it abruptly as a killed process would (no commit,
 * queued writes lost); {@link #close()} stops it cleanly. One consumer thread; the control methods are
 * thread-safe.
 */
public final class ParcelTrackingService implements AutoCloseable {

    /** Sees every offset become done and every commit, to check that no commit passes an unfinished offset. */
    public interface Audit {
        void done(String partition, long offset);

        void committing(String partition, long offset);
    }

    private final String bootstrap;
    private final String topic;
    private final String group;
    private final ParcelTable table;
    private final Audit audit;
    private final StreamGate<String> gate;
    private final Map<String, Long> committed = new ConcurrentHashMap<>();
    private final CountDownLatch stopped = new CountDownLatch(1);
    private final Thread thread;
    private volatile boolean crashing;
    private volatile boolean closing;
    private volatile RuntimeException failure;

    public ParcelTrackingService(String bootstrap, String topic, String group, ParcelTable table, Audit audit) {
        this.bootstrap = bootstrap;
        this.topic = topic;
        this.group = group;
        this.table = table;
        this.audit = audit;
        this.gate = StreamGate.builder(ParcelScans.SPEC, ParcelScans.TEXT)
                .exact(table)
                .windowKeys(32) // fewer than the day's parcels, so the table is consulted
                .reorder("scanned_at", Duration.ofHours(1).toMillis())
                .maxAwaitingAck(512, 8L << 20)
                .build();
        this.thread = new Thread(this::run, "parcel-tracking-consumer");
        this.thread.setDaemon(true);
    }

    public void start() {
        thread.start();
    }

    private void run() {
        Properties p = new Properties();
        p.put(ConsumerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(ConsumerConfig.GROUP_ID_CONFIG, group);
        p.put(ConsumerConfig.ENABLE_AUTO_COMMIT_CONFIG, "false");
        p.put(ConsumerConfig.MAX_POLL_RECORDS_CONFIG, "50");
        p.put(ConsumerConfig.FETCH_MAX_WAIT_MS_CONFIG, "50");
        TableWriter writer = new TableWriter(table, gate, d -> audit.done(d.partition(), d.offset()), "parcel-table-writer");
        try (KafkaConsumer<String, String> consumer = new KafkaConsumer<>(p, new StringDeserializer(), new StringDeserializer())) {
            Map<String, TopicPartition> partitions = assignAndSeek(consumer);
            while (!crashing && !closing) {
                ConsumerRecords<String, String> records = consumer.poll(Duration.ofMillis(100));
                for (ConsumerRecord<String, String> r : records) {
                    if (crashing) {
                        break;
                    }
                    handle(gate.offer(name(r.topic(), r.partition()), r.offset(), r.value()), writer);
                }
                if (records.isEmpty()) {
                    handle(gate.flush(), writer); // idle: nothing later can arrive to pass the held scans
                }
                if (!crashing) {
                    commitSafeOffsets(consumer, partitions);
                }
            }
            if (crashing) {
                writer.halt();
                consumer.close(CloseOptions.timeout(Duration.ZERO));
                return;
            }
            handle(gate.flush(), writer);
            writer.close();
            commitSafeOffsets(consumer, partitions);
        } catch (RuntimeException e) {
            failure = e;
            writer.halt();
        } finally {
            stopped.countDown();
        }
    }

    private Map<String, TopicPartition> assignAndSeek(KafkaConsumer<String, String> consumer) {
        Map<String, TopicPartition> partitions = new HashMap<>();
        for (PartitionInfo info : consumer.partitionsFor(topic, Duration.ofSeconds(10))) {
            TopicPartition tp = new TopicPartition(topic, info.partition());
            partitions.put(name(topic, info.partition()), tp);
        }
        consumer.assign(partitions.values());
        Map<TopicPartition, OffsetAndMetadata> last = consumer.committed(Set.copyOf(partitions.values()), Duration.ofSeconds(10));
        Map<TopicPartition, Long> beginning = consumer.beginningOffsets(partitions.values(), Duration.ofSeconds(10));
        partitions.forEach((name, tp) -> {
            OffsetAndMetadata c = last.get(tp);
            long start = c != null ? c.offset() : beginning.get(tp);
            consumer.seek(tp, start);
            gate.resumeAt(name, start);
            committed.put(name, start);
        });
        return partitions;
    }

    private void handle(List<Decision<String>> decisions, TableWriter writer) {
        for (Decision<String> d : decisions) {
            if (d.rejection() != null) {
                table.apply(List.of(d)); // kept before its offset can be committed
            }
            if (d.action() == Decision.Action.DROP && d.reason() != Decision.Reason.REDELIVERED) {
                audit.done(d.partition(), d.offset());
            }
            writer.submit(d);
        }
    }

    private void commitSafeOffsets(KafkaConsumer<String, String> consumer, Map<String, TopicPartition> partitions) {
        Map<TopicPartition, OffsetAndMetadata> commit = new HashMap<>();
        gate.committableOffsets().forEach((name, offset) -> {
            if (offset > committed.getOrDefault(name, -1L)) {
                audit.committing(name, offset);
                commit.put(partitions.get(name), new OffsetAndMetadata(offset));
            }
        });
        if (!commit.isEmpty()) {
            consumer.commitSync(commit);
            commit.forEach((tp, o) -> committed.put(name(tp.topic(), tp.partition()), o.offset()));
        }
    }

    private static String name(String topic, int partition) {
        return topic + "-" + partition;
    }

    /** The offsets committed so far, by partition name ({@code topic-partition}). */
    public Map<String, Long> committedOffsets() {
        return Map.copyOf(committed);
    }

    public GateMetrics gateMetrics() {
        return gate.metrics();
    }

    /** Stops at once without committing, losing queued writes, as a killed process would. */
    public void crash() {
        crashing = true;
        awaitStop();
    }

    /** Writes and acknowledges everything, commits, and stops. */
    @Override
    public void close() {
        closing = true;
        awaitStop();
        if (failure != null) {
            throw failure;
        }
    }

    /** A failure of the consumer thread, or null. */
    public RuntimeException failure() {
        return failure;
    }

    private void awaitStop() {
        try {
            if (thread.isAlive() && !stopped.await(30, TimeUnit.SECONDS)) {
                throw new IllegalStateException("consumer thread did not stop within 30 s");
            }
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
        }
    }
}
