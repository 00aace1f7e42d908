package dev.onefold.examples.consumer;

import java.util.ArrayList;
import java.util.Collections;
import java.util.List;
import java.util.Properties;
import java.util.Random;
import java.util.concurrent.ExecutionException;
import org.apache.kafka.clients.producer.KafkaProducer;
import org.apache.kafka.clients.producer.ProducerConfig;
import org.apache.kafka.clients.producer.ProducerRecord;
import org.apache.kafka.common.serialization.StringSerializer;

/**
 * The scanners' side of the example, as an at-least-once producer behaves: it sends scans keyed by parcel, a
 * little out of order, resends some (a retry after a lost acknowledgement lands a second copy), and after a
 * restart resends its last scans because it cannot know which of them arrived. Every value sent is remembered,
 * repeats included, so a test can compute what the table must end up holding.
 *
 * <p>Not thread-safe. Cost: one synchronous send per value.
 */
public final class ScanProducer implements AutoCloseable {
    private final String bootstrap;
    private final String topic;
    private final Random rnd;
    private final List<String> sent = new ArrayList<>();
    private KafkaProducer<String, String> producer;

    public ScanProducer(String bootstrap, String topic, long seed) {
        this.bootstrap = bootstrap;
        this.topic = topic;
        this.rnd = new Random(seed);
        this.producer = open();
    }

    private KafkaProducer<String, String> open() {
        Properties p = new Properties();
        p.put(ProducerConfig.BOOTSTRAP_SERVERS_CONFIG, bootstrap);
        p.put(ProducerConfig.ACKS_CONFIG, "all");
        p.put(ProducerConfig.LINGER_MS_CONFIG, "0"); // one synchronous send at a time: do not wait to batch
        return new KafkaProducer<>(p, new StringSerializer(), new StringSerializer());
    }

    /** Sends scans in roughly their order (neighbours swapped now and then), some of them twice. */
    public void send(List<String> scans) {
        List<String> order = new ArrayList<>(scans);
        for (int i = 1; i < order.size(); i++) {
            if (rnd.nextInt(4) == 0) {
                Collections.swap(order, i - 1, i);
            }
        }
        for (String scan : order) {
            sendOne(scan);
            if (rnd.nextInt(7) == 0) {
                sendOne(scan); // a retry whose first attempt did arrive
            }
        }
    }

    /** Sends one value as it is (for example a malformed scan). */
    public void sendOne(String value) {
        String parcel = value.contains("|") ? value.substring(0, value.indexOf('|')) : value;
        try {
            producer.send(new ProducerRecord<>(topic, parcel, value)).get();
        } catch (InterruptedException e) {
            Thread.currentThread().interrupt();
            throw new IllegalStateException("interrupted while sending " + value, e);
        } catch (ExecutionException e) {
            throw new IllegalStateException("sending " + value + " failed", e.getCause());
        }
        sent.add(value);
    }

    /** Restarts the producer; the new one resends the last {@code resend} values it cannot be sure arrived. */
    public void restart(int resend) {
        producer.close();
        producer = open();
        List<String> last = new ArrayList<>(sent.subList(Math.max(0, sent.size() - resend), sent.size()));
        last.forEach(this::sendOne);
    }

    /** Every value sent so far, repeats included. */
    public List<String> sent() {
        return List.copyOf(sent);
    }

    @Override
    public void close() {
        producer.close();
    }
}
